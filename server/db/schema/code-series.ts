import { mysqlTable, int, varchar } from 'drizzle-orm/mysql-core'

/**
 * The last number handed out per code series (`W` wafers, `L` locations). Allocation locks only
 * this one row, briefly: a creation takes its number inside its own short transaction, and an
 * Excel import reserves all the numbers it needs in a separate transaction that commits at once,
 * before its long insert transaction. So nobody waits for a running import to get a code (before,
 * `SELECT MAX(code) … FOR UPDATE` locked the whole range of codes for the import's duration).
 * Rows written outside the app are still seen: the next number is max(last, highest code) + 1.
 */
export const codeSeries = mysqlTable('code_series', {
  series: varchar('series', { length: 8 }).primaryKey(),
  last: int('last_number', { unsigned: true }).notNull().default(0),
})
