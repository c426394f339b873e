import { mysqlTable, varchar, int, mediumtext } from 'drizzle-orm/mysql-core'

/** Login sessions, in the shape express-mysql-session expects (the migration owns the table). */
export const sessions = mysqlTable('sessions', {
  sessionId: varchar('session_id', { length: 128 }).primaryKey(),
  expires: int('expires', { unsigned: true }).notNull(),
  data: mediumtext('data'),
})
