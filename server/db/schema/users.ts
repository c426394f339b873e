import { mysqlTable, int, varchar, json, boolean, datetime, index } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import type { Role } from '../../../shared/roles'

/** People. Accounts are deactivated, never deleted or reused (unique personal accounts). */
export const users = mysqlTable(
  'users',
  {
    id: int('id').autoincrement().primaryKey(),
    email: varchar('email', { length: 190 }).notNull().unique(),
    name: varchar('name', { length: 120 }).notNull(),
    /** `scrypt$N$r$p$salt$hash`; null while an invitation is pending. */
    passwordHash: varchar('password_hash', { length: 255 }),
    roles: json('roles').$type<Role[]>().notNull(),
    active: boolean('active').notNull().default(true),
    notifyByMail: boolean('notify_by_mail').notNull().default(true),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('users_name_idx').on(t.name)],
)

/** One-time invitation links. Only the SHA-256 of the token is stored. */
export const invitations = mysqlTable('invitations', {
  id: int('id').autoincrement().primaryKey(),
  userId: int('user_id')
    .notNull()
    .references(() => users.id, { onDelete: 'restrict' }),
  tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
  createdBy: int('created_by')
    .notNull()
    .references(() => users.id, { onDelete: 'restrict' }),
  expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
  usedAt: datetime('used_at', { mode: 'date', fsp: 3 }),
  createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`),
})

export type User = typeof users.$inferSelect
export type NewUser = typeof users.$inferInsert
