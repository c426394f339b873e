import { mysqlTable, int, varchar, datetime, mysqlEnum, index, bigint } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { retired } from './columns'
import { users } from './users'

/**
 * Metadata of uploaded files; the bytes live in the file storage, addressed by SHA-256.
 */

export const files = mysqlTable(
  'files',
  {
    id: int('id').autoincrement().primaryKey(),
    sha256: varchar('sha256', { length: 64 }).notNull(),
    originalName: varchar('original_name', { length: 255 }).notNull(),
    mime: varchar('mime', { length: 100 }).notNull(),
    sizeBytes: bigint('size_bytes', { mode: 'number' }).notNull(),
    kind: mysqlEnum('kind', ['sem', 'spectrum', 'sweep', 'camera', 'other']).notNull(),
    entity: varchar('entity', { length: 20 }).notNull(),
    entityId: int('entity_id').notNull(),
    uploadedBy: int('uploaded_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    uploadedAt: datetime('uploaded_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    retiredAt: retired(),
  },
  (t) => [index('files_entity_idx').on(t.entity, t.entityId), index('files_sha_idx').on(t.sha256)],
)
