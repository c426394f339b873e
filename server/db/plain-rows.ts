import { is, sql, Column, SQL } from 'drizzle-orm'
import type { SelectResultFields } from 'drizzle-orm/query-builders/select.types'
import type { Db } from './client'

type Field = Column | SQL | SQL.Aliased
type Built = { toSQL(): { sql: string; params: unknown[] } }
type ColumnMeta = { name: string; columnType?: number; extendedFormat?: string }
/** What plainRows needs of a field list, made once (list pages pass the same module-level object every time). */
interface Prepared {
  aliased: Record<string, SQL.Aliased>
  jsonKeys: string[]
  boolKeys: string[]
}
const prepared = new WeakMap<object, Prepared>()

function prepare(fields: Record<string, Field>): Prepared {
  let p = prepared.get(fields)
  if (!p) {
    const keys = Object.keys(fields)
    const ofType = (t: string) => keys.filter((k) => is(fields[k], Column) && (fields[k] as Column).columnType === t)
    p = {
      aliased: Object.fromEntries(keys.map((k) => [k, sql`${fields[k]}`.as(k)])),
      jsonKeys: ofType('MySqlJson'),
      boolKeys: ofType('MySqlBoolean'),
    }
    prepared.set(fields, p)
  }
  return p
}

/**
 * Rows of a hot read (a big list page) built with Drizzle's query builder but run straight through
 * mysql2, without Drizzle's per-field result mapping (a type-cast callback per value, then a decoder
 * per field), which was a third of the server's CPU on a 25-row page. Every field is aliased to its
 * key so mysql2 hands back keyed rows; mysql2 already gives numbers, (timezone 'Z') Dates and, where
 * the server marks them, decoded JSON, so only JSON left as text and booleans are decoded here. The
 * row type is Drizzle's own.
 *
 *   const rows = await plainRows(db, { id: arrays.id, code: arrays.code }, (f) => db.select(f).from(arrays).limit(25))
 *
 * `cache: true` lets MariaDB answer from its query cache (started with query_cache_type=DEMAND by
 * scripts/lib.sh). The cache drops a result at the commit of any write to a table the query reads,
 * so an answer is never stale; where the cache is off the hint is ignored.
 */
export async function plainRows<F extends Record<string, Field>>(
  db: Db,
  fields: F,
  build: (aliased: Record<keyof F, SQL.Aliased>) => Built,
  opts: { cache?: boolean } = {},
): Promise<SelectResultFields<F>[]> {
  const { aliased, jsonKeys, boolKeys } = prepare(fields)
  const built = build(aliased as Record<keyof F, SQL.Aliased>).toSQL()
  const text = opts.cache ? built.sql.replace(/^select /, 'select SQL_CACHE ') : built.sql
  const params = built.params
  const [rows, meta] = (await db.$client.query(text, params)) as unknown as [Record<string, unknown>[], ColumnMeta[]]
  // mysql2 decodes JSON itself where the server says a value is JSON (MySQL's JSON type, MariaDB's
  // extended metadata); only a JSON column that still arrives as text is parsed here.
  const decoded = jsonKeys.length
    ? new Set(meta.filter((f) => f.columnType === 245 || f.extendedFormat === 'json').map((f) => f.name))
    : null
  const json = decoded ? jsonKeys.filter((k) => !decoded.has(k)) : jsonKeys
  if (json.length || boolKeys.length) {
    for (const r of rows) {
      for (const k of json) if (typeof r[k] === 'string') r[k] = JSON.parse(r[k] as string)
      for (const k of boolKeys) if (r[k] !== null) r[k] = Boolean(r[k])
    }
  }
  return rows as SelectResultFields<F>[]
}
