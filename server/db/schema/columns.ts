import { datetime } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'

/** Timestamps shared by the record tables (millisecond precision, set by the database clock). */
export const created = () =>
  datetime('created_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
export const updated = () =>
  datetime('updated_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
export const retired = () => datetime('retired_at', { mode: 'date', fsp: 3 })
