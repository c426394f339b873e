import { mysqlTable, int, varchar, json, datetime, mysqlEnum, index } from 'drizzle-orm/mysql-core'
import { sql } from 'drizzle-orm'
import { users } from './users'
import { arrays } from './inventory'
import { files } from './files'
import { measurementSessions } from './measurements'

/**
 * Saved analyses of a measurement session (issue 6): a polar fit of a polarisation sweep, or a
 * harmonic peak found in a spectrum. `params` holds what was asked (file, options), `result` the
 * analysis library's answer as JSON; `version` the engine + analysis versions that produced it.
 * Append-only like every lab record: a new analysis is a new row.
 */
export const analysisFits = mysqlTable(
  'analysis_fits',
  {
    id: int('id').autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => measurementSessions.id, { onDelete: 'restrict' }),
    arrayId: int('array_id').references(() => arrays.id, { onDelete: 'restrict' }),
    fileId: int('file_id')
      .notNull()
      .references(() => files.id, { onDelete: 'restrict' }),
    kind: mysqlEnum('kind', ['polar_fit', 'spectrum_peak']).notNull(),
    params: json('params').$type<Record<string, unknown>>().notNull(),
    result: json('result').$type<Record<string, unknown>>().notNull(),
    version: varchar('version', { length: 60 }).notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id, { onDelete: 'restrict' }),
    createdAt: datetime('created_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('analysis_fits_session_idx').on(t.sessionId, t.id), index('analysis_fits_array_idx').on(t.arrayId)],
)

export type AnalysisFitRow = typeof analysisFits.$inferSelect
