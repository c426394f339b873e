import { mysqlTable, int, varchar, datetime, uniqueIndex } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'

/**
 * Notices already sent, keyed so a scheduled notice goes out once (e.g. `expiring:LS-003:2027-01-31`,
 * `digest:2026-W49`). The mail itself is in mail_queue.
 */
export const noticeLog = mysqlTable(
  'notice_log',
  {
    id: int('id').autoincrement().primaryKey(),
    noticeKey: varchar('notice_key', { length: 120 }).notNull(),
    sentAt: datetime('sent_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('notice_log_key_uq').on(t.noticeKey)],
)
