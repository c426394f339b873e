import { and, desc, eq, inArray, isNull } from 'drizzle-orm'
import { analysisFits, arrays, chips, measurementSessions as ms, sessionResults } from '../../db/schema/index'
import type { Db } from '../../db/client'
import { compareResult, loadArrayContexts } from '../measurements/session-compare'
import { NotFoundError } from '../../errors'

/**
 * Data of a printable sample sheet that no other route gives in one call: for each array (one, or
 * every array of a chip) the sessions that measured it with their result, flags and saved analyses.
 */
export interface SheetSession {
  id: number
  code: string
  performedAt: string
  wavelengthNm: number
  harmonicOrder: number
  pump: unknown
  avgPowerMw: number
  harmonicPowerW: number | null
  observedNormal: string
  observedM: number[]
  flags: string[]
  analyses: { id: number; kind: string; summary: string; createdAt: string }[]
}
export interface SheetArray {
  id: number
  code: string
  sessions: SheetSession[]
}

function summarise(kind: string, result: Record<string, unknown>): string {
  if (kind === 'polar_fit') {
    const r = result as { sentence?: string; rSquared?: number; isSymmetryMatch?: boolean }
    return `${r.sentence ?? 'polar fit'} R² = ${typeof r.rSquared === 'number' ? r.rSquared.toFixed(3) : '?'}; symmetry ${r.isSymmetryMatch ? 'matches' : 'does not match'} the model.`
  }
  const r = result as {
    peak?: { peakWavelengthNm: number; integral: number; snr: number | null }
    harmonicPowerW?: number | null
  }
  if (!r.peak) return 'spectrum peak'
  return `peak at ${r.peak.peakWavelengthNm.toFixed(1)} nm, integral ${r.peak.integral.toPrecision(4)} counts·nm, SNR ${r.peak.snr === null ? '∞' : r.peak.snr.toFixed(0)}${r.harmonicPowerW ? `, ${r.harmonicPowerW.toPrecision(3)} W` : ''}`
}

export async function sheetSessions(db: Db, target: { arrayId?: number; chipId?: number }): Promise<SheetArray[]> {
  const list = await db
    .select({ id: arrays.id, code: arrays.code })
    .from(arrays)
    .where(
      target.arrayId !== undefined
        ? eq(arrays.id, target.arrayId)
        : and(eq(arrays.chipId, target.chipId!), isNull(arrays.retiredAt)),
    )
    .orderBy(arrays.code)
    .limit(200)
  if (target.arrayId !== undefined && !list.length) throw new NotFoundError('No such array')
  if (
    target.chipId !== undefined &&
    !list.length &&
    !(await db.select({ id: chips.id }).from(chips).where(eq(chips.id, target.chipId)).limit(1)).length
  ) {
    throw new NotFoundError('No such chip')
  }
  const ids = list.map((a) => a.id)
  if (!ids.length) return []
  const rows = await db
    .select({ r: sessionResults, s: ms })
    .from(sessionResults)
    .innerJoin(ms, eq(ms.id, sessionResults.sessionId))
    .where(inArray(sessionResults.arrayId, ids))
    .orderBy(desc(ms.performedAt))
    .limit(1000)
  const saved = await db
    .select()
    .from(analysisFits)
    .where(inArray(analysisFits.arrayId, ids))
    .orderBy(desc(analysisFits.id))
    .limit(1000)
  const ctx = await loadArrayContexts(db, ids)
  return list.map((a) => ({
    ...a,
    sessions: rows
      .filter((x) => x.r.arrayId === a.id)
      .map(({ r, s }) => ({
        id: s.id,
        code: s.code,
        performedAt: s.performedAt.toISOString(),
        wavelengthNm: s.wavelengthNm,
        harmonicOrder: s.harmonicOrder,
        pump: s.pump,
        avgPowerMw: s.avgPowerMw,
        harmonicPowerW: r.harmonicPowerW,
        observedNormal: r.observedNormal,
        observedM: r.observedM,
        flags: compareResult(ctx.get(a.id)!, r, s.pump, s.harmonicOrder).flags,
        analyses: saved
          .filter((f) => f.sessionId === s.id && f.arrayId === a.id)
          .map((f) => ({
            id: f.id,
            kind: f.kind,
            summary: summarise(f.kind, f.result),
            createdAt: f.createdAt.toISOString(),
          })),
      })),
  }))
}
