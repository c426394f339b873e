import { mysqlTable, int, varchar, datetime, index } from 'drizzle-orm/mysql-core'

/**
 * Sign-in throttle counters, shared by every app server on this database (a per-process counter
 * would let an attacker spread guesses over the servers behind a proxy). One row per key
 * (address + e-mail, hashed) and window; expired rows are swept by the store.
 */
export const throttleHits = mysqlTable(
  'throttle_hits',
  {
    key: varchar('hit_key', { length: 80 }).primaryKey(),
    hits: int('hits').notNull(),
    resetAt: datetime('reset_at', { mode: 'date', fsp: 3 }).notNull(),
  },
  (t) => [index('throttle_hits_reset_idx').on(t.resetAt)],
)
