import { eq } from 'drizzle-orm'
import { noticeLog } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import { getNoticeBaseUrl, queueNotice, recipientsWithRole } from './notices'
import { digestNotice, setupExpiringNotice } from './notice-templates'
import { collectDigest, expiringSetups, previousDigestAt } from './notice-digest'
import type { Logger } from '../../logger'

/**
 * Scheduled notices, run in-process by every app server: "sign-off expiring soon" to the safety
 * officers and the weekly digest to the group leads. Each scheduled notice first claims a unique
 * key in notice_log inside the transaction that queues its mail, so it goes out once even with
 * several app servers (the second server's insert hits the unique key and it skips).
 */

const DAY_MS = 24 * 3600 * 1000
const DIGEST_HOUR_UTC = 7

/** ISO-8601 week of a date (UTC), e.g. `2026-W49`. */
export function isoWeek(d: Date): string {
  const t = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()))
  const dow = t.getUTCDay() || 7
  t.setUTCDate(t.getUTCDate() + 4 - dow) // the Thursday of this week decides the year
  const year = t.getUTCFullYear()
  const week = Math.ceil(((t.getTime() - Date.UTC(year, 0, 1)) / DAY_MS + 1) / 7)
  return `${year}-W${String(week).padStart(2, '0')}`
}

/** Monday 07:00 UTC of the ISO week of `d`. */
export function digestTimeOfWeek(d: Date): Date {
  const dow = d.getUTCDay() || 7
  return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - (dow - 1), DIGEST_HOUR_UTC))
}

const isDuplicateKey = (err: unknown): boolean => {
  const e = err as { code?: string; errno?: number; cause?: { code?: string; errno?: number } }
  return (
    e?.code === 'ER_DUP_ENTRY' || e?.errno === 1062 || e?.cause?.code === 'ER_DUP_ENTRY' || e?.cause?.errno === 1062
  )
}

/** Claim a once-only notice key; false when it was already claimed (by this or another server). */
export async function claimNoticeKey(tx: DbOrTx, key: string, now: Date): Promise<boolean> {
  try {
    await tx.insert(noticeLog).values({ noticeKey: key, sentAt: now })
    return true
  } catch (err) {
    if (isDuplicateKey(err)) return false
    throw err
  }
}

/** Queue "sign-off expiring soon" once per setup and expiry date. Returns the number of mails queued. */
export async function queueExpiringNotices(db: Db, now: Date): Promise<number> {
  let queued = 0
  for (const s of await expiringSetups(db, now)) {
    queued += await db.transaction(async (tx) => {
      if (!(await claimNoticeKey(tx, `expiring:${s.code}:${s.expiresOn}`, now))) return 0
      return queueNotice(
        tx,
        await recipientsWithRole(tx, 'safety_officer'),
        setupExpiringNotice({ setupId: s.id, ...s }, getNoticeBaseUrl()),
      )
    })
  }
  return queued
}

export interface DigestOutcome {
  isSent: boolean
  key: string
  recipients: number
  since: string
  until: string
}

/**
 * Queue the digest to every active group lead who wants notices, covering the time since the
 * previous digest (at most 7 days). `onDemand`: "send now" (its own key), otherwise the weekly one.
 */
export async function queueDigest(db: Db, now: Date, onDemand = false): Promise<DigestOutcome> {
  const key = onDemand ? `digest-now:${now.toISOString()}` : `digest:${isoWeek(now)}`
  const [done] = await db.select({ id: noticeLog.id }).from(noticeLog).where(eq(noticeLog.noticeKey, key))
  if (done) return { isSent: false, key, recipients: 0, since: now.toISOString(), until: now.toISOString() }
  const prev = await previousDigestAt(db, now)
  const since = new Date(Math.max(prev?.getTime() ?? 0, now.getTime() - 7 * DAY_MS))
  const content = await collectDigest(db, since, now)
  const recipients = await db.transaction(async (tx) => {
    if (!(await claimNoticeKey(tx, key, now))) return -1
    return queueNotice(tx, await recipientsWithRole(tx, 'group_lead'), digestNotice(content, getNoticeBaseUrl()))
  })
  return {
    isSent: recipients >= 0,
    key,
    recipients: Math.max(recipients, 0),
    since: since.toISOString(),
    until: now.toISOString(),
  }
}

/** Runs the scheduled notices every `intervalMs`; never throws (errors are logged). */
export class NoticeScheduler {
  private timer: NodeJS.Timeout | undefined
  private running: Promise<unknown> | null = null

  constructor(
    private db: Db,
    private log: Logger,
    private intervalMs = 300_000,
  ) {}

  start(): void {
    this.timer = setInterval(() => void this.runOnce(new Date()), this.intervalMs)
    this.timer.unref()
    setTimeout(() => void this.runOnce(new Date()), 5_000).unref()
  }

  async stop(): Promise<void> {
    clearInterval(this.timer)
    await this.running
  }

  /** One pass: expiring sign-offs, then the weekly digest when it is due (Monday ≥ 07:00 UTC or later that week). */
  async runOnce(now: Date): Promise<{ expiring: number; digest: DigestOutcome | null }> {
    if (this.running) return { expiring: 0, digest: null }
    const pass = (async () => {
      let expiring = 0
      let digest: DigestOutcome | null = null
      try {
        expiring = await queueExpiringNotices(this.db, now)
      } catch (err) {
        this.log.error({ err }, 'notices: expiring sign-offs failed')
      }
      try {
        if (now >= digestTimeOfWeek(now)) digest = await queueDigest(this.db, now)
      } catch (err) {
        this.log.error({ err }, 'notices: digest failed')
      }
      return { expiring, digest }
    })()
    this.running = pass
    try {
      return await pass
    } finally {
      this.running = null
    }
  }
}
