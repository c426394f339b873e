import { mysqlTable, char, int, varchar, datetime, bigint, mysqlEnum, index } from 'drizzle-orm/mysql-core'
import { users } from './users'
import { EXPORT_PHASES } from '../../../shared/excel'

/**
 * Inventory export jobs (server/services/excel/excel-export.ts), shared by every app server on this
 * database: whichever server a person's progress poll or download reaches reads the job here. The
 * server writing the workbook updates its row (progress, phase, and `updated_at` as a heartbeat);
 * the finished workbook is a blob of the FileStorage, named by `blob_sha256`. Rows and blobs are
 * swept an hour after the job started.
 */
export const exportJobs = mysqlTable(
  'export_jobs',
  {
    id: char('id', { length: 36 }).primaryKey(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    phase: mysqlEnum('phase', EXPORT_PHASES).notNull(),
    done: int('done', { unsigned: true }).notNull().default(0),
    total: int('total', { unsigned: true }).notNull().default(0),
    startedAt: datetime('started_at', { mode: 'date', fsp: 3 }).notNull(),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
    fileName: varchar('file_name', { length: 120 }).notNull(),
    sizeBytes: bigint('size_bytes', { mode: 'number', unsigned: true }),
    error: varchar('error', { length: 1000 }),
    /** SHA-256 of the finished workbook in the FileStorage; null until it is stored. */
    blobSha256: char('blob_sha256', { length: 64 }),
    /** Last write of the server running the job (at least every HEARTBEAT_MS while it runs). */
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull(),
  },
  (t) => [
    index('export_jobs_user_idx').on(t.userId, t.phase),
    index('export_jobs_started_idx').on(t.startedAt),
    index('export_jobs_blob_idx').on(t.blobSha256),
  ],
)

export type ExportJobRow = typeof exportJobs.$inferSelect
