import { and, asc, count, desc, eq, gte, isNull, like, lt, or, sql, type SQL } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import { files, laserSetups, measurementSessions as ms, sessionResults, users, type User } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { MeasurementSession, MeasurementSessionRow, Page } from '../../../shared/records'
import type { SessionInput } from '../../../shared/schemas/records'
import type { SessionListQuery, SessionPreviewInput, SessionUpdateInput } from '../../../shared/schemas/measurements'
import { diffFields, writeAudit } from '../audit/audit'
import { requireValidSignoff } from '../laser-safety/signoffs'
import { nextCode, withCodeRetry } from '../laser-safety/laser-setups'
import { compareResult, deriveEfficiency, loadArrayContexts, type Reader } from './session-compare'
import { ConflictError, NotFoundError, fieldError } from '../../errors'
import { formatSi } from '../../../shared/format'
import { codePrefixes, idCondition, prefixPattern, textHitIds, type TextTarget } from '../search/text-search'
import { likePattern } from '../inventory/codes'
import { plainRows } from '../../db/plain-rows'

/**
 * Measurement sessions: one session (pump, detection) on one or more arrays, with the observed
 * channels per array compared against the engine. Contemporaneous records (docs/records.md §3):
 * createdAt is the entry time, performedAt the activity time; entries more than 24 h after the
 * activity are flagged, and edits to entries older than 24 h need a reason.
 */
const DAY_MS = 24 * 3600 * 1000
const BACKDATED = 'Back-dated entry: recorded more than 24 h after the measurement (contemporaneous-record rule).'
const isBackdated = (performedAt: Date, createdAt: Date) => createdAt.getTime() - performedAt.getTime() > DAY_MS

type ResultInput = SessionInput['results'][number]

function checkPerformedAt(s: string): Date {
  const d = new Date(s)
  if (d.getTime() > Date.now() + 5 * 60 * 1000)
    throw fieldError('performedAt', 'The measurement cannot be in the future')
  return d
}

/**
 * The setup must exist, be in use and hold a valid sign-off on the session date (issue 5,
 * server-enforced), and the session's pump power must not exceed the setup's registered maximum:
 * the sign-off covers only what was described.
 */
async function checkSetup(tx: DbOrTx, id: number, performedAt: Date, avgPowerMw: number): Promise<void> {
  const [s] = await tx.select().from(laserSetups).where(eq(laserSetups.id, id))
  if (!s) throw fieldError('laserSetupId', 'No such laser setup')
  if (s.retiredAt) throw fieldError('laserSetupId', 'This laser setup is retired')
  await requireValidSignoff(tx, s, performedAt)
  checkPower(s, avgPowerMw)
}

function checkPower(s: { code: string; maxAvgPowerMw: number | null }, avgPowerMw: number): void {
  if (s.maxAvgPowerMw === null || avgPowerMw <= s.maxAvgPowerMw) return
  throw fieldError(
    'avgPowerMw',
    `${avgPowerMw} mW is above the maximum average power registered for ${s.code} (${s.maxAvgPowerMw} mW); ` +
      'its sign-off covers only what was described. Register the higher power on the setup and have it signed off again first.',
  )
}

/** Every array must exist, be in use and appear once; field errors name the result row. */
async function checkArrays(tx: Reader, results: ResultInput[]) {
  const ctx = await loadArrayContexts(
    tx,
    results.map((r) => r.arrayId),
  )
  results.forEach((r, i) => {
    const a = ctx.get(r.arrayId)
    if (!a) throw fieldError(`results.${i}.arrayId`, 'No such array')
    if (a.retiredAt) throw fieldError(`results.${i}.arrayId`, `Array ${a.code} is retired`)
    if (results.findIndex((x) => x.arrayId === r.arrayId) !== i)
      throw fieldError(`results.${i}.arrayId`, `Array ${a.code} is listed twice`)
  })
  return ctx
}

const resultRows = (sessionId: number, results: ResultInput[]) => results.map((r) => ({ sessionId, ...r }))

/** "A-…-B2 already has a harmonic power of 2 nW recorded": the words of every refused overwrite. */
export const recordedPowerText = (arrayCode: string, watts: number) =>
  `${arrayCode} already has a harmonic power of ${formatSi(watts, 'W')} recorded`

/**
 * A measured harmonic power is never replaced silently: the results of an edit that change, clear
 * or drop a power already recorded are a 409 on that row unless the person confirmed.
 */
function refuseSilentOverwrite(
  prev: { arrayId: number; harmonicPowerW: number | null }[],
  next: ResultInput[],
  codes: Map<number, string>,
): void {
  const fields: Record<string, string[]> = {}
  for (const old of prev) {
    if (old.harmonicPowerW === null) continue
    const code = codes.get(old.arrayId) ?? `Array #${old.arrayId}`
    const i = next.findIndex((r) => r.arrayId === old.arrayId)
    if (i < 0)
      (fields.results ??= []).push(
        `${recordedPowerText(code, old.harmonicPowerW)}; removing it from the session drops that value. Confirm to remove it.`,
      )
    else if (next[i]!.harmonicPowerW !== old.harmonicPowerW) {
      const to =
        next[i]!.harmonicPowerW === null ? 'clear it' : `replace it with ${formatSi(next[i]!.harmonicPowerW, 'W')}`
      fields[`results.${i}.harmonicPowerW`] = [`${recordedPowerText(code, old.harmonicPowerW)}; confirm to ${to}.`]
    }
  }
  if (Object.keys(fields).length) throw new ConflictError(Object.values(fields).flat().join(' '), fields)
}

export async function createSession(db: Db, actor: User, input: SessionInput): Promise<MeasurementSession> {
  const performedAt = checkPerformedAt(input.performedAt)
  const { results, safetyNotesRead, ...fields } = input
  const id = await withCodeRetry(() =>
    db.transaction(async (tx) => {
      await checkSetup(tx, input.laserSetupId, performedAt, input.avgPowerMw)
      await checkArrays(tx, results)
      const code = await nextCode(tx, 'measurement_sessions', 'S', 4)
      const values = { ...fields, code, performedAt, operatorId: actor.id }
      const [{ id }] = await tx.insert(ms).values(values).$returningId()
      await tx.insert(sessionResults).values(resultRows(id, results))
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'session',
        entityId: id,
        action: 'create',
        changes: diffFields({}, { ...values, results, safetyNotesRead }),
      })
      return id
    }),
  )
  return getSession(db, id)
}

export async function updateSession(
  db: Db,
  actor: User,
  id: number,
  input: SessionUpdateInput,
): Promise<MeasurementSession> {
  const { reason, results, performedAt, safetyNotesRead: _read, confirmOverwrite, ...fields } = input
  await db.transaction(async (tx) => {
    const [before] = await tx.select().from(ms).where(eq(ms.id, id)).for('update')
    if (!before) throw new NotFoundError('No such session')
    if (Date.now() - before.createdAt.getTime() > DAY_MS && !reason)
      throw fieldError('reason', 'This entry is more than 24 h old: say why it is being changed')
    const next: Record<string, unknown> = { ...fields }
    if (performedAt !== undefined) next.performedAt = checkPerformedAt(performedAt)
    const power = fields.avgPowerMw ?? before.avgPowerMw
    if (fields.laserSetupId !== undefined && fields.laserSetupId !== before.laserSetupId)
      await checkSetup(tx, fields.laserSetupId, (next.performedAt as Date | undefined) ?? before.performedAt, power)
    else if (fields.avgPowerMw !== undefined && fields.avgPowerMw !== before.avgPowerMw) {
      const [s] = await tx
        .select({ code: laserSetups.code, maxAvgPowerMw: laserSetups.maxAvgPowerMw })
        .from(laserSetups)
        .where(eq(laserSetups.id, before.laserSetupId))
      if (s) checkPower(s, power)
    }
    const changes = diffFields(before as unknown as Record<string, unknown>, next)
    if (results) {
      const ctx = await checkArrays(tx, results)
      const old = await tx
        .select()
        .from(sessionResults)
        .where(eq(sessionResults.sessionId, id))
        .orderBy(asc(sessionResults.arrayId))
        .for('update')
      const prev = old.map(({ sessionId: _s, ...r }) => r)
      if (!confirmOverwrite) {
        const gone = prev.filter((r) => r.harmonicPowerW !== null && !ctx.has(r.arrayId)).map((r) => r.arrayId)
        const codes = new Map([...ctx.values()].map((a) => [a.id, a.code]))
        if (gone.length) for (const a of (await loadArrayContexts(tx, gone)).values()) codes.set(a.id, a.code)
        refuseSilentOverwrite(prev, results, codes)
      }
      const now = [...results].sort((a, b) => a.arrayId - b.arrayId)
      if (JSON.stringify(prev) !== JSON.stringify(now)) {
        changes.results = { from: prev, to: now }
        // The previous results stay readable in this audit row (no silent overwrite).
        await tx.delete(sessionResults).where(eq(sessionResults.sessionId, id))
        await tx.insert(sessionResults).values(resultRows(id, results))
      }
    }
    if (!Object.keys(changes).length) return
    await tx
      .update(ms)
      .set({ ...next, updatedAt: new Date() })
      .where(eq(ms.id, id))
    await writeAudit(tx, { userId: actor.id, entity: 'session', entityId: id, action: 'update', changes, reason })
  })
  return getSession(db, id)
}

/** Predictions, flags and derived quantities for a session body that is not saved (the form's live view). */
export async function previewSession(db: Db, input: SessionPreviewInput) {
  const ctx = await loadArrayContexts(
    db,
    input.results.map((r) => r.arrayId),
  )
  const results = input.results.map((r, i) => {
    const a = ctx.get(r.arrayId)
    if (!a) throw fieldError(`results.${i}.arrayId`, 'No such array')
    return { arrayId: a.id, arrayCode: a.code, ...compareResult(a, r, input.pump, input.harmonicOrder) }
  })
  const derived = input.results.map((r) => ({
    arrayId: r.arrayId,
    ...deriveEfficiency(input.avgPowerMw, r.harmonicPowerW, input.harmonicOrder),
  }))
  return { results, derived }
}

const operators = alias(users, 'operators')

export async function getSession(db: Db, id: number): Promise<MeasurementSession> {
  const [row] = await db
    .select({
      s: ms,
      setup: { id: laserSetups.id, code: laserSetups.code, name: laserSetups.name },
      operator: { id: operators.id, name: operators.name },
    })
    .from(ms)
    .innerJoin(laserSetups, eq(laserSetups.id, ms.laserSetupId))
    .innerJoin(operators, eq(operators.id, ms.operatorId))
    .where(eq(ms.id, id))
  if (!row) throw new NotFoundError('No such session')
  const { s } = row
  const stored = await db.select().from(sessionResults).where(eq(sessionResults.sessionId, id))
  const ctx = await loadArrayContexts(
    db,
    stored.map((r) => r.arrayId),
  )
  const results = stored
    .map(({ sessionId: _s, ...r }) => ({
      ...r,
      arrayCode: ctx.get(r.arrayId)!.code,
      ...compareResult(ctx.get(r.arrayId)!, r, s.pump, s.harmonicOrder),
    }))
    .sort((a, b) => a.arrayCode.localeCompare(b.arrayCode))
  const [{ n }] = await db
    .select({ n: count() })
    .from(files)
    .where(and(eq(files.entity, 'session'), eq(files.entityId, id), isNull(files.retiredAt)))
  const backdated = isBackdated(s.performedAt, s.createdAt)
  const { operatorId: _o, laserSetupId: _l, ...plain } = s
  return {
    ...plain,
    laserSetup: row.setup,
    operator: row.operator,
    performedAt: s.performedAt.toISOString(),
    results,
    derived: results.map((r) => ({
      arrayId: r.arrayId,
      ...deriveEfficiency(s.avgPowerMw, r.harmonicPowerW, s.harmonicOrder),
    })),
    fileCount: Number(n),
    createdAt: s.createdAt.toISOString(),
    updatedAt: s.updatedAt.toISOString(),
    isBackdated: backdated,
    flags: backdated ? [BACKDATED] : [],
  }
}

const SORTABLE = {
  performedAt: ms.performedAt,
  code: ms.code,
  wavelengthNm: ms.wavelengthNm,
  harmonicOrder: ms.harmonicOrder,
  createdAt: ms.createdAt,
} as const
const dayEnd = (s: string) =>
  /^\d{4}-\d{2}-\d{2}$/.test(s) ? new Date(Date.parse(s) + DAY_MS) : new Date(Date.parse(s) + 1)

/**
 * Sessions whose code starts with the text, whose notes or detector have its words, or that measured an array whose
 * code starts with it.
 */
const SESSION_TEXT: TextTarget = {
  table: 'measurement_sessions',
  letter: 'S',
  wordColumns: ['notes', 'detector'],
  extra: (text) =>
    codePrefixes(text, 'A').map(
      (p) =>
        sql`SELECT sr.session_id AS id FROM session_results sr JOIN arrays a ON a.id = sr.array_id WHERE a.code LIKE ${prefixPattern(p)}`,
    ),
}

async function listWhere(db: Db, q: SessionListQuery): Promise<SQL | undefined> {
  const w: SQL[] = []
  const inResults = (cond: SQL) =>
    sql`EXISTS (SELECT 1 FROM session_results sr JOIN arrays a ON a.id = sr.array_id JOIN chips c ON c.id = a.chip_id WHERE sr.session_id = ${ms.id} AND ${cond})`
  if (q.array) w.push(inResults(sql`a.code = ${q.array}`))
  if (q.chip) w.push(inResults(sql`c.code = ${q.chip}`))
  if (q.laserSetupId) w.push(eq(ms.laserSetupId, q.laserSetupId))
  if (q.from) w.push(gte(ms.performedAt, new Date(q.from)))
  if (q.to) w.push(lt(ms.performedAt, dayEnd(q.to)))
  if (q.q) {
    const p = likePattern(q.q)
    w.push(
      idCondition(
        ms.id,
        await textHitIds(db, SESSION_TEXT, q.q),
        or(like(ms.code, p), like(ms.notes, p), like(ms.detector, p), inResults(sql`a.code LIKE ${p}`)),
      )!,
    )
  }
  return w.length ? and(...w) : undefined
}

/**
 * The columns of a list row; the measured arrays' codes come as one JSON array per session (at most
 * 200, in code order; NULL for none). mysql2 decodes it itself when MariaDB marks it as JSON.
 */
const LIST_COLUMNS = {
  id: ms.id,
  code: ms.code,
  setupId: laserSetups.id,
  setupCode: laserSetups.code,
  setupName: laserSetups.name,
  operatorId: operators.id,
  operatorName: operators.name,
  performedAt: ms.performedAt,
  wavelengthNm: ms.wavelengthNm,
  harmonicOrder: ms.harmonicOrder,
  pump: ms.pump,
  avgPowerMw: ms.avgPowerMw,
  createdAt: ms.createdAt,
  arrayCodes: sql<
    string[] | string | null
  >`(SELECT JSON_ARRAYAGG(a.code ORDER BY a.code) FROM session_results sr JOIN arrays a ON a.id = sr.array_id WHERE sr.session_id = ${ms.id})`,
}

const jsonList = (v: string[] | string | null): string[] =>
  typeof v === 'string' ? (JSON.parse(v) as string[]) : (v ?? [])

export async function listSessions(db: Db, q: SessionListQuery): Promise<Page<MeasurementSessionRow>> {
  const where = await listWhere(db, q)
  const col = SORTABLE[(q.sort ?? 'performedAt') as keyof typeof SORTABLE] ?? ms.performedAt
  const dir = q.sort ? q.dir : 'desc'
  // The page is cut from measurement_sessions alone (newest first reads sessions_performed_idx
  // backwards; ties by id in the same direction) in a derived table, and only its rows are joined
  // to setup, operator and array codes: one round trip. (Inside the derived table
  // `measurement_sessions` names its own FROM, outside the joined row: one ORDER BY serves both.)
  const order = [dir === 'desc' ? desc(col) : asc(col), dir === 'desc' ? desc(ms.id) : asc(ms.id)]
  const page = db
    .select({ id: ms.id })
    .from(ms)
    .where(where)
    .orderBy(...order)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .as('page')
  const [rows, [{ n }]] = await Promise.all([
    plainRows(
      db,
      LIST_COLUMNS,
      (f) =>
        db
          .select(f)
          .from(page)
          .innerJoin(ms, eq(ms.id, page.id))
          .innerJoin(laserSetups, eq(laserSetups.id, ms.laserSetupId))
          .innerJoin(operators, eq(operators.id, ms.operatorId))
          .orderBy(...order),
      { cache: true },
    ),
    plainRows(db, { n: count() }, (f) => db.select(f).from(ms).where(where), { cache: true }),
  ])
  return {
    rows: rows.map((r) => ({
      id: r.id,
      code: r.code,
      laserSetup: { id: r.setupId, code: r.setupCode, name: r.setupName },
      operator: { id: r.operatorId, name: r.operatorName },
      performedAt: r.performedAt.toISOString(),
      wavelengthNm: r.wavelengthNm,
      harmonicOrder: r.harmonicOrder,
      pump: r.pump,
      avgPowerMw: r.avgPowerMw,
      createdAt: r.createdAt.toISOString(),
      arrayCodes: jsonList(r.arrayCodes),
      isBackdated: isBackdated(r.performedAt, r.createdAt),
    })),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
  }
}
