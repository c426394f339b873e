import { and, desc, eq } from 'drizzle-orm'
import { analysisFits, files, measurementSessions as ms, sessionResults, users, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { FileStorage } from '../files/storage'
import type { BarePatternInput, FitRequest, PatternQuery, SpectrumRequest } from '../../../shared/schemas/analysis'
import { ENGINE_VERSION } from '../../../shared/engine'
import { writeAudit } from '../audit/audit'
import { compareResult, loadArrayContexts } from '../measurements/session-compare'
import { computePattern, crystalPattern, loadArrayCrystal, loadChipCrystal, type PatternAnswer } from './analysis-model'
import { runFit, type FitAnswer } from './analysis-fit'
import { runSpectrum, type SpectrumAnswer } from './analysis-spectrum'
import { ConflictError, NotFoundError, fieldError } from '../../errors'
import { formatSi } from '../../../shared/format'
import { recordedPowerText } from '../measurements/sessions'

/**
 * Measurement analysis (issue 6): predicted polar patterns of arrays, chips and bare crystals,
 * polar fits of sweeps and harmonic peaks of spectra uploaded to a session, saved with the session.
 * The maths is in shared/analysis; this service loads the records and stores the answers.
 */
export const ANALYSIS_VERSION = `engine ${ENGINE_VERSION}; analysis 1`

export async function arrayPattern(
  db: Db,
  arrayId: number,
  q: PatternQuery,
): Promise<PatternAnswer & { array: { id: number; code: string }; chip: { id: number; code: string } }> {
  const c = await loadArrayCrystal(db, arrayId, q.order)
  return {
    ...crystalPattern(c, q.step),
    array: { id: c.array.id, code: c.array.code },
    chip: { id: c.chip.id, code: c.chip.code },
  }
}

export async function chipPattern(
  db: Db,
  chipId: number,
  q: PatternQuery,
): Promise<PatternAnswer & { chip: { id: number; code: string } }> {
  const c = await loadChipCrystal(db, chipId, q.order)
  return { ...crystalPattern(c, q.step), chip: { id: c.chip.id, code: c.chip.code } }
}

export function barePattern(input: BarePatternInput): PatternAnswer {
  const frame = `pump angle θ from lab x; at azimuth 0 the crystal direction ${JSON.stringify(input.reference)} lies along lab x, and the crystal is turned ${input.azimuthDeg}° counter-clockwise (seen from the outward normal)`
  const note = input.ratios
    ? 'tensor ratios as given'
    : 'unit ratios: the first independent component = 1, the others 0 (illustrative shape)'
  return computePattern(
    { pointGroup: input.pointGroup, normal: input.normal, reference: input.reference, order: input.order },
    input.azimuthDeg,
    input.step,
    input.ratios,
    frame,
    [note],
  )
}

/** The session row, 404 when missing. */
async function loadSession(db: Db, id: number) {
  const [s] = await db.select().from(ms).where(eq(ms.id, id))
  if (!s) throw new NotFoundError('No such session')
  return s
}

/** The text of a CSV file attached to this session (field errors on `fileId`). */
async function sessionFileText(db: Db, storage: FileStorage, sessionId: number, fileId: number) {
  const [f] = await db.select().from(files).where(eq(files.id, fileId))
  if (!f || f.entity !== 'session' || f.entityId !== sessionId)
    throw fieldError('fileId', 'This file is not attached to this session')
  if (f.retiredAt) throw fieldError('fileId', 'This file is retired')
  if (f.mime !== 'text/csv' && f.mime !== 'text/plain')
    throw fieldError('fileId', 'Only CSV/TXT tables can be analysed; this file is ' + f.mime)
  if (!(await storage.has(f.sha256)))
    throw fieldError('fileId', 'The stored content of this file is missing; restore it from the back-up')
  return { file: f, text: (await storage.read(f.sha256)).toString('utf8') }
}

/** The array must be one of the session's results. */
async function checkSessionArray(db: Db, sessionId: number, arrayId: number) {
  const [r] = await db
    .select()
    .from(sessionResults)
    .where(and(eq(sessionResults.sessionId, sessionId), eq(sessionResults.arrayId, arrayId)))
  if (!r) throw fieldError('arrayId', 'This array was not measured in this session')
  return r
}

async function saveAnalysis(
  tx: Parameters<Parameters<Db['transaction']>[0]>[0],
  actor: User,
  row: {
    sessionId: number
    arrayId: number | null
    fileId: number
    kind: 'polar_fit' | 'spectrum_peak'
    params: Record<string, unknown>
    result: Record<string, unknown>
  },
) {
  const values = { ...row, version: ANALYSIS_VERSION, createdBy: actor.id }
  const [{ id }] = await tx.insert(analysisFits).values(values).$returningId()
  const summary =
    row.kind === 'polar_fit'
      ? {
          azimuthDeg: (row.result as unknown as FitAnswer).azimuth,
          rSquared: (row.result as unknown as FitAnswer).rSquared,
        }
      : {
          integral: (row.result as unknown as SpectrumAnswer).peak.integral,
          snr: (row.result as unknown as SpectrumAnswer).peak.snr,
        }
  const changes = Object.fromEntries(
    Object.entries({
      sessionId: row.sessionId,
      arrayId: row.arrayId,
      fileId: row.fileId,
      kind: row.kind,
      version: values.version,
      params: row.params,
      ...summary,
    }).map(([k, v]) => [k, { from: null, to: v }]),
  )
  await writeAudit(tx, { userId: actor.id, entity: 'analysis', entityId: id, action: 'create', changes })
  return id
}

export async function fitSession(
  db: Db,
  storage: FileStorage,
  actor: User,
  sessionId: number,
  input: FitRequest,
): Promise<
  FitAnswer & { savedId: number | null; arrayId: number; arrayCode: string; fileId: number; fileName: string }
> {
  const session = await loadSession(db, sessionId)
  await checkSessionArray(db, sessionId, input.arrayId)
  const { file, text } = await sessionFileText(db, storage, sessionId, input.fileId)
  const crystal = await loadArrayCrystal(db, input.arrayId, input.order ?? session.harmonicOrder)
  const answer = runFit(text, crystal, input)
  let savedId: number | null = null
  if (input.save) {
    const params = {
      fileId: input.fileId,
      arrayId: input.arrayId,
      angleUnit: input.angleUnit,
      columns: input.columns ?? null,
      order: answer.order,
    }
    savedId = await db.transaction((tx) =>
      saveAnalysis(tx, actor, {
        sessionId,
        arrayId: input.arrayId,
        fileId: input.fileId,
        kind: 'polar_fit',
        params,
        result: answer as unknown as Record<string, unknown>,
      }),
    )
  }
  return {
    ...answer,
    savedId,
    arrayId: crystal.array.id,
    arrayCode: crystal.array.code,
    fileId: file.id,
    fileName: file.originalName,
  }
}

export async function spectrumSession(
  db: Db,
  storage: FileStorage,
  actor: User,
  sessionId: number,
  input: SpectrumRequest,
): Promise<SpectrumAnswer & { savedId: number | null; fileId: number; fileName: string }> {
  const session = await loadSession(db, sessionId)
  if (input.arrayId !== undefined) await checkSessionArray(db, sessionId, input.arrayId)
  const { file, text } = await sessionFileText(db, storage, sessionId, input.fileId)
  let channel = null
  if (input.arrayId !== undefined) {
    const ctx = (await loadArrayContexts(db, [input.arrayId])).get(input.arrayId)!
    channel = {
      arrayId: ctx.id,
      arrayCode: ctx.code,
      predicted: compareResult(
        ctx,
        { observedNormal: 'not_checked', observedM: [] },
        session.pump,
        session.harmonicOrder,
      ).predicted,
    }
  }
  const answer = runSpectrum(text, session, input.calibration, channel, input.wattsPerCount)
  let savedId: number | null = null
  if (input.record) {
    const arrayId = input.arrayId!
    const params = {
      fileId: input.fileId,
      arrayId,
      calibration: input.calibration ?? null,
      wattsPerCount: input.wattsPerCount ?? null,
    }
    savedId = await db.transaction(async (tx) => {
      // A different power already recorded is replaced only when the person confirmed (checked under the row lock).
      const [before] = await tx
        .select()
        .from(sessionResults)
        .where(and(eq(sessionResults.sessionId, sessionId), eq(sessionResults.arrayId, arrayId)))
        .for('update')
      if (
        answer.harmonicPowerW !== null &&
        before?.harmonicPowerW != null &&
        before.harmonicPowerW !== answer.harmonicPowerW &&
        !input.confirmOverwrite
      ) {
        const msg = `${recordedPowerText(channel!.arrayCode, before.harmonicPowerW)}; this spectrum gives ${formatSi(answer.harmonicPowerW, 'W')}. Confirm to replace it.`
        throw new ConflictError(msg, { harmonicPowerW: [msg] })
      }
      const id = await saveAnalysis(tx, actor, {
        sessionId,
        arrayId,
        fileId: input.fileId,
        kind: 'spectrum_peak',
        params,
        result: answer as unknown as Record<string, unknown>,
      })
      if (answer.harmonicPowerW !== null) {
        await tx
          .update(sessionResults)
          .set({ harmonicPowerW: answer.harmonicPowerW })
          .where(and(eq(sessionResults.sessionId, sessionId), eq(sessionResults.arrayId, arrayId)))
        await writeAudit(tx, {
          userId: actor.id,
          entity: 'session',
          entityId: sessionId,
          action: 'update',
          changes: {
            [`results.${channel!.arrayCode}.harmonicPowerW`]: {
              from: before?.harmonicPowerW ?? null,
              to: answer.harmonicPowerW,
            },
          },
          reason: `harmonic signal recorded from spectrum file #${input.fileId} (analysis #${id})`,
        })
      }
      return id
    })
  }
  return { ...answer, savedId, fileId: file.id, fileName: file.originalName }
}

export interface SavedAnalysis {
  id: number
  sessionId: number
  arrayId: number | null
  fileId: number
  kind: 'polar_fit' | 'spectrum_peak'
  params: Record<string, unknown>
  result: Record<string, unknown>
  version: string
  createdBy: { id: number; name: string }
  createdAt: string
}

export async function listSessionAnalyses(db: Db, sessionId: number): Promise<SavedAnalysis[]> {
  await loadSession(db, sessionId)
  const rows = await db
    .select({ f: analysisFits, u: { id: users.id, name: users.name } })
    .from(analysisFits)
    .innerJoin(users, eq(users.id, analysisFits.createdBy))
    .where(eq(analysisFits.sessionId, sessionId))
    .orderBy(desc(analysisFits.id))
    .limit(200)
  return rows.map(({ f, u }) => ({ ...f, createdBy: u, createdAt: f.createdAt.toISOString() }))
}
