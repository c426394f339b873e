import { mysqlTable, tinyint, bigint } from 'drizzle-orm/mysql-core'

/**
 * One row whose counter goes up after every committed write of the app (server/db/data-version.ts).
 * App servers read it (from MariaDB's query cache) before answering a GET from their response
 * cache, so a write through any server is seen by all of them at once.
 */
export const dataVersion = mysqlTable('data_version', {
  id: tinyint('id').primaryKey(),
  n: bigint('n', { mode: 'number', unsigned: true }).notNull(),
})
