import nodemailer, { type Transporter } from 'nodemailer'
import { randomUUID } from 'node:crypto'
import { hostname } from 'node:os'
import { and, asc, eq, lte, lt, desc, or, isNull, sql } from 'drizzle-orm'
import { mailQueue, mailReceived } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { MailMessage, MailSummary } from '../../../shared/types'
import type { Logger } from '../../logger'

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
}

/** Queue a message. Call inside the user's transaction: the mail goes out only if the action commits. */
export async function queueMail(tx: DbOrTx, mail: OutgoingMail): Promise<void> {
  await tx
    .insert(mailQueue)
    .values({ toAddress: mail.to, subject: mail.subject, textBody: mail.text, htmlBody: mail.html ?? null })
}

/** Retry delays after a failed attempt (seconds); after the last one the message is marked failed. */
const BACKOFF_S = [5, 30, 120, 600, 1800, 3600]

/**
 * How long a claim holds (seconds, database clock). Longer than one send can take (the transport's
 * timeouts below add up to well under this), so a claim never runs out while its worker still sends.
 */
export const CLAIM_S = 300
const SMTP_TIMEOUTS = { connectionTimeout: 30_000, greetingTimeout: 30_000, socketTimeout: 60_000 }

/** The SMTP URL with the timeouts above unless it sets its own (nodemailer reads them from the query). */
function withTimeouts(smtpUrl: string): string {
  const u = new URL(smtpUrl)
  for (const [k, v] of Object.entries(SMTP_TIMEOUTS)) if (!u.searchParams.has(k)) u.searchParams.set(k, String(v))
  return u.toString()
}

type QueuedMail = typeof mailQueue.$inferSelect
type MailOutcome = { id: number; set: Partial<QueuedMail> }

/** A Galera certification conflict or an InnoDB deadlock on the claim: another worker has the row. */
const isConflict = (err: unknown) =>
  [1213, 1205].includes(((err as { cause?: { errno?: number } }).cause ?? (err as { errno?: number }))?.errno ?? 0)

/**
 * Sends queued mail in the background with retry. A mail server that is down never fails a user
 * action; messages stay queued and go out when it is back. The outbox shows every state.
 *
 * Every app server runs one worker on the same `mail_queue`. Before sending, a worker claims the row
 * (`claimed_by` = its id, `claimed_until` = now + CLAIM_S, in one UPDATE that matches only an
 * unclaimed or run-out claim of a still queued row); it sends only when that UPDATE matched the
 * row, so two workers never send the same message. On a Galera cluster two claims on different
 * nodes can both match locally; certification lets one commit and refuses the other with a deadlock
 * error, which here means "someone else has it". A sent message whose "sent" mark could not be
 * written (the database node went away) is marked again on the next passes before anything else, so
 * a lost write does not make another worker send it again once the claim runs out. (SMTP is not
 * transactional: a worker killed between the send and the mark leaves a claim that runs out, and
 * the message goes out a second time. That is the only way to get a duplicate.)
 */
export class MailWorker {
  private timer: NodeJS.Timeout | undefined
  private running = false
  private transport: Transporter
  /** Who claims rows: unique per worker (an app server restarted gets a new id). */
  readonly workerId = `${hostname().slice(0, 30)}:${process.pid}:${randomUUID().slice(0, 8)}`
  /** Outcomes already decided (sent, or an attempt failed) whose row could not be written yet. */
  private unrecorded: MailOutcome[] = []

  constructor(
    private db: Db,
    smtpUrl: string,
    private from: string,
    private log: Logger,
    private intervalMs = 1000,
  ) {
    this.transport = nodemailer.createTransport(withTimeouts(smtpUrl))
  }

  start(): void {
    this.timer = setInterval(() => void this.tick(), this.intervalMs)
    this.timer.unref()
  }

  async stop(): Promise<void> {
    clearInterval(this.timer)
    while (this.running) await new Promise((r) => setTimeout(r, 20))
    this.transport.close()
  }

  /** Claim the row for this worker; false when another worker has it (or it is no longer queued). */
  private async claim(id: number): Promise<boolean> {
    try {
      const [res] = await this.db
        .update(mailQueue)
        .set({ claimedBy: this.workerId, claimedUntil: sql`NOW(3) + INTERVAL ${CLAIM_S} SECOND` })
        .where(
          and(
            eq(mailQueue.id, id),
            eq(mailQueue.status, 'queued'),
            or(isNull(mailQueue.claimedUntil), lt(mailQueue.claimedUntil, sql`NOW(3)`)),
          ),
        )
      // affectedRows counts matched rows (mysql2 connects with FOUND_ROWS): 1 = the claim is ours.
      return (res as { affectedRows: number }).affectedRows === 1
    } catch (err) {
      if (isConflict(err)) return false
      throw err
    }
  }

  /** Write an outcome on our own claim (the claim is released with it). */
  private async record(o: MailOutcome): Promise<void> {
    await this.db
      .update(mailQueue)
      .set({ ...o.set, claimedBy: null, claimedUntil: null })
      .where(and(eq(mailQueue.id, o.id), eq(mailQueue.claimedBy, this.workerId)))
  }

  /** Record, or keep the outcome to record on a later pass when the database does not take it now. */
  private async recordOrKeep(o: MailOutcome): Promise<void> {
    try {
      await this.record(o)
    } catch (err) {
      this.log.warn({ err, mailId: o.id }, 'mail worker: outcome not recorded yet, trying again on the next pass')
      this.unrecorded.push(o)
    }
  }

  /** Try every due message once. Returns the number sent. */
  async tick(): Promise<number> {
    if (this.running) return 0
    this.running = true
    let sent = 0
    try {
      for (const o of this.unrecorded.splice(0)) await this.recordOrKeep(o)
      if (this.unrecorded.length) return 0 // the database still refuses: send nothing new meanwhile
      const due = await this.db
        .select()
        .from(mailQueue)
        .where(
          and(
            eq(mailQueue.status, 'queued'),
            lte(mailQueue.nextAttemptAt, new Date()),
            or(isNull(mailQueue.claimedUntil), lt(mailQueue.claimedUntil, sql`NOW(3)`)),
          ),
        )
        .orderBy(asc(mailQueue.id))
        .limit(20)
      for (const m of due) {
        if (!(await this.claim(m.id))) continue
        let outcome: MailOutcome
        try {
          await this.transport.sendMail({
            from: this.from,
            to: m.toAddress,
            subject: m.subject,
            text: m.textBody,
            html: m.htmlBody ?? undefined,
          })
          // Once sent, the queue keeps the message with its one-time links masked (no usable token at rest).
          outcome = {
            id: m.id,
            set: {
              status: 'sent',
              sentAt: new Date(),
              attempts: m.attempts + 1,
              lastError: null,
              textBody: maskOneTimeLinks(m.textBody),
              htmlBody: maskOneTimeLinks(m.htmlBody),
            },
          }
          sent++
        } catch (err) {
          const attempts = m.attempts + 1
          const delay = BACKOFF_S[attempts - 1]
          outcome = {
            id: m.id,
            set: {
              attempts,
              lastError: String((err as Error).message ?? err).slice(0, 500),
              status: delay === undefined ? 'failed' : 'queued',
              nextAttemptAt: new Date(Date.now() + (delay ?? 0) * 1000),
            },
          }
        }
        await this.recordOrKeep(outcome)
      }
    } catch (err) {
      this.log.error({ err }, 'mail worker: a pass failed')
    } finally {
      this.running = false
    }
    return sent
  }
}

export async function listReceived(db: Db, limit = 200): Promise<MailSummary[]> {
  const rows = await db
    .select({
      id: mailReceived.id,
      from: mailReceived.fromAddress,
      to: mailReceived.toAddress,
      subject: mailReceived.subject,
      receivedAt: mailReceived.receivedAt,
    })
    .from(mailReceived)
    .orderBy(desc(mailReceived.id))
    .limit(limit)
  return rows.map((r) => ({ ...r, receivedAt: r.receivedAt.toISOString() }))
}

/**
 * One-time links (invitation, password reset) in a message as the outbox shows it: the token is
 * masked to its last four characters, so whoever reads the outbox cannot use the link. The
 * database keeps only the token's SHA-256; the link reaches its owner by mail only.
 */
export function maskOneTimeLinks(s: string): string
export function maskOneTimeLinks(s: string | null): string | null
export function maskOneTimeLinks(s: string | null): string | null {
  return s && s.replace(/\/invite\/([A-Za-z0-9_-]{16,})/g, (_m, token: string) => `/invite/••••${token.slice(-4)}`)
}

export async function getReceived(db: Db, id: number): Promise<MailMessage | null> {
  const [r] = await db.select().from(mailReceived).where(eq(mailReceived.id, id))
  if (!r) return null
  return {
    id: r.id,
    from: r.fromAddress,
    to: r.toAddress,
    subject: r.subject,
    receivedAt: r.receivedAt.toISOString(),
    text: maskOneTimeLinks(r.textBody),
    html: maskOneTimeLinks(r.htmlBody),
  }
}

export async function listQueue(db: Db, limit = 200) {
  return db
    .select({
      id: mailQueue.id,
      to: mailQueue.toAddress,
      subject: mailQueue.subject,
      status: mailQueue.status,
      attempts: mailQueue.attempts,
      lastError: mailQueue.lastError,
      createdAt: mailQueue.createdAt,
      sentAt: mailQueue.sentAt,
    })
    .from(mailQueue)
    .orderBy(desc(mailQueue.id))
    .limit(limit)
}
