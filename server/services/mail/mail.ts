import nodemailer, { type Transporter } from 'nodemailer'
import { and, asc, eq, lte, desc } from 'drizzle-orm'
import { mailQueue, mailReceived } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { MailMessage, MailSummary } from '../../../shared/types'
import type { Logger } from '../../logger'

export interface OutgoingMail { to: string; subject: string; text: string; html?: string }

/** Queue a message. Call inside the user's transaction: the mail goes out only if the action commits. */
export async function queueMail(tx: DbOrTx, mail: OutgoingMail): Promise<void> {
  await tx.insert(mailQueue).values({ toAddress: mail.to, subject: mail.subject, textBody: mail.text, htmlBody: mail.html ?? null })
}

/** Retry delays after a failed attempt (seconds); after the last one the message is marked failed. */
const BACKOFF_S = [5, 30, 120, 600, 1800, 3600]

/**
 * Sends queued mail in the background with retry. A mail server that is down never fails a user
 * action; messages stay queued and go out when it is back. The outbox shows every state.
 */
export class MailWorker {
  private timer: NodeJS.Timeout | undefined
  private running = false
  private transport: Transporter

  constructor(private db: Db, smtpUrl: string, private from: string, private log: Logger, private intervalMs = 1000) {
    this.transport = nodemailer.createTransport(smtpUrl)
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

  /** Try every due message once. Returns the number sent. */
  async tick(): Promise<number> {
    if (this.running) return 0
    this.running = true
    let sent = 0
    try {
      const due = await this.db.select().from(mailQueue)
        .where(and(eq(mailQueue.status, 'queued'), lte(mailQueue.nextAttemptAt, new Date())))
        .orderBy(asc(mailQueue.id)).limit(20)
      for (const m of due) {
        try {
          await this.transport.sendMail({ from: this.from, to: m.toAddress, subject: m.subject, text: m.textBody, html: m.htmlBody ?? undefined })
          // Once sent, the queue keeps the message with its one-time links masked (no usable token at rest).
          await this.db.update(mailQueue).set({
            status: 'sent', sentAt: new Date(), attempts: m.attempts + 1, lastError: null,
            textBody: maskOneTimeLinks(m.textBody), htmlBody: maskOneTimeLinks(m.htmlBody),
          }).where(eq(mailQueue.id, m.id))
          sent++
        } catch (err) {
          const attempts = m.attempts + 1
          const delay = BACKOFF_S[attempts - 1]
          await this.db.update(mailQueue).set({
            attempts, lastError: String((err as Error).message ?? err).slice(0, 500),
            status: delay === undefined ? 'failed' : 'queued',
            nextAttemptAt: new Date(Date.now() + (delay ?? 0) * 1000),
          }).where(eq(mailQueue.id, m.id))
        }
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
  const rows = await db.select({ id: mailReceived.id, from: mailReceived.fromAddress, to: mailReceived.toAddress, subject: mailReceived.subject, receivedAt: mailReceived.receivedAt })
    .from(mailReceived).orderBy(desc(mailReceived.id)).limit(limit)
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
  return { id: r.id, from: r.fromAddress, to: r.toAddress, subject: r.subject, receivedAt: r.receivedAt.toISOString(), text: maskOneTimeLinks(r.textBody), html: maskOneTimeLinks(r.htmlBody) }
}

export async function listQueue(db: Db, limit = 200) {
  return db.select({ id: mailQueue.id, to: mailQueue.toAddress, subject: mailQueue.subject, status: mailQueue.status, attempts: mailQueue.attempts, lastError: mailQueue.lastError, createdAt: mailQueue.createdAt, sentAt: mailQueue.sentAt })
    .from(mailQueue).orderBy(desc(mailQueue.id)).limit(limit)
}
