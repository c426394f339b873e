import { mysqlTable, int, varchar, json, datetime, mysqlEnum, index, text } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { users } from './users'

/** Field-level change: before and after. */
export type AuditChanges = Record<string, { from: unknown; to: unknown }>

/**
 * Append-only audit trail: who, what (field-level before/after), when (server clock), why.
 * Written in the same transaction as the change it records; never updated or deleted by the app.
 */
export const auditLog = mysqlTable(
  'audit_log',
  {
    id: int('id').autoincrement().primaryKey(),
    at: datetime('at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    userId: int('user_id').references(() => users.id, { onDelete: 'restrict' }),
    entity: varchar('entity', { length: 40 }).notNull(),
    entityId: int('entity_id').notNull(),
    action: mysqlEnum('action', ['create', 'update', 'retire', 'signoff', 'revoke', 'login', 'other']).notNull(),
    changes: json('changes').$type<AuditChanges>().notNull(),
    reason: text('reason'),
  },
  (t) => [index('audit_entity_idx').on(t.entity, t.entityId), index('audit_at_idx').on(t.at)],
)
