import { and, asc, count, desc, eq, gte, inArray, isNull, lt, like, or, sql } from 'drizzle-orm'
import {
  chips,
  laserSetupSignoffs,
  laserSetups,
  measurementSessions as ms,
  noticeLog,
  sessionResults,
  wafers,
} from '../../db/schema/index'
import type { MySqlColumn } from 'drizzle-orm/mysql-core'
import type { Db } from '../../db/client'
import { compareResult, loadArrayContexts } from '../measurements/session-compare'
import type { DigestContent } from './notice-templates'

/**
 * What the group lead's digest reports, and the laser-setup sign-off states the scheduler needs.
 * Kept cheap: counts in SQL, at most LIST_MAX codes per list, and the prediction comparison only
 * for the window's sessions (at most ANOMALY_SCAN of them).
 */
const LIST_MAX = 25
const ANOMALY_SCAN = 300
const DAY_MS = 24 * 3600 * 1000
export const EXPIRY_WARN_DAYS = 14

/** YYYY-MM-DD of a date in UTC. */
export const utcDay = (d: Date) => d.toISOString().slice(0, 10)

/** The current sign-off of every laser setup in use (the latest decision row; none: never decided). */
export async function setupSignoffStates(db: Pick<Db, 'select'>) {
  const latest = sql`(SELECT MAX(x.id) FROM laser_setup_signoffs x WHERE x.setup_id = ${laserSetups.id})`
  return db
    .select({
      id: laserSetups.id,
      code: laserSetups.code,
      name: laserSetups.name,
      decision: laserSetupSignoffs.decision,
      expiresOn: laserSetupSignoffs.expiresOn,
    })
    .from(laserSetups)
    .leftJoin(laserSetupSignoffs, eq(laserSetupSignoffs.id, latest))
    .where(isNull(laserSetups.retiredAt))
    .orderBy(asc(laserSetups.code))
}

/** Approved setups whose sign-off expires between `now` (today) and `now` + 14 days. */
export async function expiringSetups(db: Pick<Db, 'select'>, now: Date) {
  const today = utcDay(now)
  const limit = utcDay(new Date(now.getTime() + EXPIRY_WARN_DAYS * DAY_MS))
  return (await setupSignoffStates(db))
    .filter((s) => s.decision === 'approved' && s.expiresOn && s.expiresOn >= today && s.expiresOn <= limit)
    .map((s) => ({
      ...s,
      expiresOn: s.expiresOn!,
      daysLeft: Math.round((Date.parse(s.expiresOn!) - Date.parse(today)) / DAY_MS),
    }))
}

/** When the previous digest (weekly or on demand) went out before `now`, if any. */
export async function previousDigestAt(db: Db, now: Date): Promise<Date | null> {
  const [r] = await db
    .select({ at: noticeLog.sentAt })
    .from(noticeLog)
    .where(
      and(
        or(like(noticeLog.noticeKey, 'digest:%'), like(noticeLog.noticeKey, 'digest-now:%')),
        lt(noticeLog.sentAt, now),
      ),
    )
    .orderBy(desc(noticeLog.sentAt))
    .limit(1)
  return r?.at ?? null
}

/** Sessions in the window whose observed results contradict the prediction ("anomalies"). */
async function findAnomalies(db: Db, since: Date, until: Date): Promise<string[]> {
  const sessions = await db
    .select({ id: ms.id, code: ms.code, pump: ms.pump, order: ms.harmonicOrder })
    .from(ms)
    .where(and(gte(ms.performedAt, since), lt(ms.performedAt, until)))
    .orderBy(asc(ms.performedAt))
    .limit(ANOMALY_SCAN)
  if (!sessions.length) return []
  const results = await db
    .select()
    .from(sessionResults)
    .where(
      inArray(
        sessionResults.sessionId,
        sessions.map((s) => s.id),
      ),
    )
  const ctx = await loadArrayContexts(db, [...new Set(results.map((r) => r.arrayId))])
  const out: string[] = []
  for (const s of sessions) {
    const flagged = results
      .filter((r) => r.sessionId === s.id && ctx.has(r.arrayId))
      .map((r) => ({
        code: ctx.get(r.arrayId)!.code,
        flags: compareResult(ctx.get(r.arrayId)!, r, s.pump, s.order).flags,
      }))
      .filter((r) => r.flags.length)
    if (flagged.length) out.push(`${s.code}: ${flagged.map((f) => `${f.code}: ${f.flags[0]}`).join(' | ')}`)
  }
  return out
}

/** Everything the digest lists for the window [since, until). */
export async function collectDigest(db: Db, since: Date, until: Date): Promise<DigestContent> {
  const win = (col: MySqlColumn) => and(gte(col, since), lt(col, until))
  const [[w], [c], [s]] = await Promise.all([
    db.select({ n: count() }).from(wafers).where(win(wafers.createdAt)),
    db.select({ n: count() }).from(chips).where(win(chips.createdAt)),
    db
      .select({ n: count() })
      .from(ms)
      .where(and(gte(ms.performedAt, since), lt(ms.performedAt, until))),
  ])
  const waferRows = await db
    .select({ code: wafers.code, lot: wafers.lot })
    .from(wafers)
    .where(win(wafers.createdAt))
    .orderBy(asc(wafers.code))
    .limit(LIST_MAX)
  const chipRows = await db
    .select({ code: chips.code })
    .from(chips)
    .where(win(chips.createdAt))
    .orderBy(asc(chips.code))
    .limit(LIST_MAX)
  const sessionRows = await db
    .select({ code: ms.code, name: laserSetups.name, wl: ms.wavelengthNm, order: ms.harmonicOrder })
    .from(ms)
    .innerJoin(laserSetups, eq(laserSetups.id, ms.laserSetupId))
    .where(and(gte(ms.performedAt, since), lt(ms.performedAt, until)))
    .orderBy(asc(ms.code))
    .limit(LIST_MAX)
  const anomalies = await findAnomalies(db, since, until)
  let setupsWaiting: string[] = []
  let setupsExpiring: string[] = []
  try {
    setupsWaiting = (await setupSignoffStates(db))
      .filter((x) => !x.decision || x.decision === 'voided')
      .map((x) => `${x.code} ${x.name}`)
    setupsExpiring = (await expiringSetups(db, until)).map((x) => `${x.code} ${x.name}: expires ${x.expiresOn}`)
  } catch {
    // The sign-off table may not be migrated yet on an older database: the digest goes out without it.
  }
  return {
    since,
    until,
    anomalies,
    setupsWaiting,
    setupsExpiring,
    wafers: waferRows.map((r) => `${r.code} (lot ${r.lot})`),
    chips: chipRows.map((r) => r.code),
    sessions: sessionRows.map((r) => `${r.code}: ${r.name}, ${r.wl} nm, order ${r.order}`),
    counts: { wafers: Number(w.n), chips: Number(c.n), sessions: Number(s.n), anomalies: anomalies.length },
  }
}
