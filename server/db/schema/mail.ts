import { mysqlTable, int, varchar, text, mediumtext, datetime, mysqlEnum, index } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'

/**
 * Outgoing mail queue. A user action only inserts a row here (in its own transaction); the mail
 * worker sends it with retry, so a mail server that is down never fails or blocks the action.
 */
export const mailQueue = mysqlTable(
  'mail_queue',
  {
    id: int('id').autoincrement().primaryKey(),
    toAddress: varchar('to_address', { length: 190 }).notNull(),
    subject: varchar('subject', { length: 250 }).notNull(),
    textBody: mediumtext('text_body').notNull(),
    htmlBody: mediumtext('html_body'),
    status: mysqlEnum('status', ['queued', 'sent', 'failed']).notNull().default('queued'),
    attempts: int('attempts').notNull().default(0),
    lastError: text('last_error'),
    nextAttemptAt: datetime('next_attempt_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    sentAt: datetime('sent_at', { mode: 'date', fsp: 3 }),
    /**
     * The mail worker (one per app server) that is sending this message, until `claimed_until`
     * (database time). A worker sends only a row it has claimed, so two app servers never send the
     * same message; a claim of a worker that stopped runs out and the row is sent by another.
     */
    claimedBy: varchar('claimed_by', { length: 64 }),
    claimedUntil: datetime('claimed_until', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('mail_queue_status_idx').on(t.status, t.nextAttemptAt)],
)

/** Messages received by the local SMTP sink (development and tests), shown in the Mail outbox page. */
export const mailReceived = mysqlTable('mail_received', {
  id: int('id').autoincrement().primaryKey(),
  fromAddress: varchar('from_address', { length: 250 }).notNull(),
  toAddress: varchar('to_address', { length: 500 }).notNull(),
  subject: varchar('subject', { length: 250 }).notNull(),
  textBody: mediumtext('text_body').notNull(),
  htmlBody: mediumtext('html_body'),
  receivedAt: datetime('received_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`),
})
