import { mysqlTable, int, varchar, json } from 'drizzle-orm/mysql-core'
import { created } from './columns'
import { users } from './users'

/**
 * Label print jobs.
 */

export const labelJobs = mysqlTable('label_jobs', {
  id: int('id').autoincrement().primaryKey(),
  template: varchar('template', { length: 40 }).notNull(),
  codes: json('codes').$type<string[]>().notNull(),
  createdBy: int('created_by')
    .notNull()
    .references(() => users.id, { onDelete: 'restrict' }),
  createdAt: created(),
})
