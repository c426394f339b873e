/**
 * The SQL each benchmarked API route sends, timed one at a time (mean of 5) with its EXPLAIN:
 * `DATABASE_URL=… npx tsx bench/query-plans.ts [case-name-part]` on a database with the large
 * seed (bench/seed-large.ts). Used to choose the indexes listed in DEVELOPERS.md. Statements sent with
 * SQL_CACHE are timed with SQL_NO_CACHE: the time is what MariaDB spends when the cache cannot answer.
 */
import mysql from 'mysql2/promise'
import { drizzle } from 'drizzle-orm/mysql2'
import * as schema from '../server/db/schema/index'
import type { Db } from '../server/db/client'
import { listQuerySchema } from '../shared/schemas/records'
import { sessionListQuerySchema } from '../shared/schemas/measurements'
import { listArrays, getArray } from '../server/services/inventory/arrays'
import { listChips } from '../server/services/inventory/chips'
import { listSessions } from '../server/services/measurements/sessions'
import { searchRecords } from '../server/services/search/resolve'
import { capturingPool, type Captured } from './capture'
const url = process.env.DATABASE_URL!
const pool = mysql.createPool({ uri: url, timezone: 'Z', connectionLimit: 2 })
const caught: Captured = []
const db = drizzle({ client: capturingPool(pool, caught), schema, mode: 'planetscale' }) as unknown as Db
const q = (s: string) => Object.fromEntries(new URLSearchParams(s))
const [[mid]] = (await pool.query(
  'SELECT a.id, a.code, c.code AS chip FROM arrays a JOIN chips c ON c.id = a.chip_id ORDER BY a.id LIMIT 1 OFFSET 50000',
)) as unknown as [[{ id: number; code: string; chip: string }]]
const cases: [string, () => Promise<unknown>][] = [
  ['arrays p1', () => listArrays(db, listQuerySchema.parse(q('page=1&pageSize=25')))],
  [
    'arrays filter',
    () =>
      listArrays(db, {
        ...listQuerySchema.parse(q('sort=periodXNm&dir=desc&page=3')),
        shape: 'ring',
        lattice: 'hexagonal',
      }),
  ],
  ['arrays q', () => listArrays(db, listQuerySchema.parse(q(`q=${mid.code.slice(0, 9)}`)))],
  ['search', () => searchRecords(db, mid.chip.slice(0, 8))],
  ['chips status', () => listChips(db, listQuerySchema.parse(q('status=measured&page=2')))],
  ['sessions', () => listSessions(db, sessionListQuerySchema.parse(q('page=1')))],
  ['sessions by array', () => listSessions(db, sessionListQuerySchema.parse(q(`array=${mid.code}`)))],
  ['detail', () => getArray(db, mid.id)],
]
const only = process.argv[2]
for (const [name, run] of cases) {
  if (only && !name.includes(only)) continue
  caught.length = 0
  await run()
  console.log(`\n=== ${name}`)
  for (const [sent, params] of caught) {
    const text = sent.replace(/\bSQL_CACHE\b/g, 'SQL_NO_CACHE')
    const t0 = performance.now()
    for (let i = 0; i < 5; i++) await pool.query(text, params)
    const ms = (performance.now() - t0) / 5
    console.log(`${ms.toFixed(2)} ms  ${mysql.format(text, params as never).slice(0, 400)}`)
    {
      const [rows] = (await pool.query('EXPLAIN ' + text, params)) as unknown as [Record<string, unknown>[]]
      for (const r of rows) console.log('   ', r.table, r.type, r.key, r.rows, r.Extra)
    }
  }
}
await pool.end()
