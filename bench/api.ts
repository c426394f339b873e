/**
 * API bench: list, filter, search and detail routes of a running server (BENCH_BASE_URL) on the
 * large data set, under concurrency 16 with autocannon on loopback, each beside the SAME SQL sent
 * straight through mysql2 at the same concurrency. The SQL is captured by calling the route's
 * service once through a Drizzle instance over a pool that records every statement (capture.ts),
 * so the bare figure is exactly what the route asks of MariaDB; the queries of one request are
 * replayed one after another.
 * Overhead = bare requests/s ÷ API requests/s (= ratio of mean latencies at equal concurrency).
 * Every request runs the route's queries (the server keeps no answers). The first case (auth/me)
 * reads no data at all: it is the floor that HTTP, the session and the load generator set on this
 * machine.
 */
import autocannon from 'autocannon'
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
import { searchUsers } from '../server/services/people/users'
import type { BenchRow } from './engine'
import { capturingPool, type Captured } from './capture'

interface Case {
  name: string
  path: string
  target?: number
  run: (db: Db) => Promise<unknown>
}

const pct = (xs: number[], p: number) => xs[Math.min(xs.length - 1, Math.floor((p / 100) * xs.length))] ?? NaN
const fmtMs = (x: number) => `${x.toFixed(1)} ms`

async function signIn(base: string, email: string, password: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base },
    body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`bench sign-in failed: ${res.status} ${await res.text()}`)
  const cookie = res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .find((c) => c.startsWith('sid='))
  if (!cookie) throw new Error('bench sign-in: no session cookie')
  return cookie
}

/** autocannon for `seconds` at `connections`; latencies of every response, sorted (ms). */
async function hammer(url: string, cookie: string, connections: number, seconds: number) {
  const times: number[] = []
  const inst = autocannon({ url, connections, duration: seconds, headers: { cookie } })
  inst.on('response', (_c: unknown, _status: number, _bytes: number, ms: number) => times.push(ms))
  const result = await inst
  times.sort((a, b) => a - b)
  return { rps: result.requests.total / seconds, non2xx: result.non2xx + result.errors, times }
}

/** The captured queries of one request, replayed by `connections` loops through a mysql2 pool. */
async function bare(pool: mysql.Pool, queries: Captured, connections: number, seconds: number) {
  const times: number[] = []
  const end = Date.now() + seconds * 1000
  await Promise.all(
    Array.from({ length: connections }, async () => {
      while (Date.now() < end) {
        const t0 = performance.now()
        for (const [text, params] of queries) await pool.query(text, params)
        times.push(performance.now() - t0)
      }
    }),
  )
  times.sort((a, b) => a - b)
  return { rps: times.length / seconds, times }
}

async function cases(pool: mysql.Pool): Promise<Case[]> {
  const [[mid]] = (await pool.query(
    'SELECT a.id, a.code, c.code AS chip FROM arrays a JOIN chips c ON c.id = a.chip_id ORDER BY a.id LIMIT 1 OFFSET 50000',
  )) as unknown as [[{ id: number; code: string; chip: string }]]
  const q = (s: string) => Object.fromEntries(new URLSearchParams(s))
  const chipPrefix = mid.chip.slice(0, 8) // e.g. C-0061-2
  return [
    // The floor of this machine: a signed-in request that reads only its session and person rows.
    { name: 'floor: signed-in, no data (auth/me)', path: '/api/auth/me', run: async () => {} },
    {
      name: 'arrays list (page 1)',
      path: '/api/arrays?page=1&pageSize=25',
      target: 20,
      run: (db) => listArrays(db, listQuerySchema.parse(q('page=1&pageSize=25'))),
    },
    {
      name: 'arrays list, deep page 2000',
      path: '/api/arrays?page=2000&pageSize=25',
      run: (db) => listArrays(db, listQuerySchema.parse(q('page=2000&pageSize=25'))),
    },
    {
      name: 'arrays filter shape+lattice, sorted by period',
      path: '/api/arrays?shape=ring&lattice=hexagonal&sort=periodXNm&dir=desc&page=3',
      target: 20,
      run: (db) =>
        listArrays(db, {
          ...listQuerySchema.parse(q('sort=periodXNm&dir=desc&page=3')),
          shape: 'ring',
          lattice: 'hexagonal',
        }),
    },
    {
      name: 'arrays text filter q=<code prefix>',
      path: `/api/arrays?q=${encodeURIComponent(mid.code.slice(0, 9))}`,
      target: 20,
      run: (db) => listArrays(db, listQuerySchema.parse(q(`q=${mid.code.slice(0, 9)}`))),
    },
    {
      name: 'global search (code prefix)',
      path: `/api/search?q=${encodeURIComponent(chipPrefix)}`,
      target: 20,
      run: async (db) => Promise.all([searchRecords(db, chipPrefix), searchUsers(db, chipPrefix)]),
    },
    {
      name: 'chips list, status filter',
      path: '/api/chips?status=measured&page=2',
      target: 20,
      run: (db) => listChips(db, listQuerySchema.parse(q('status=measured&page=2'))),
    },
    {
      name: 'sessions list (newest first)',
      path: '/api/sessions?page=1',
      target: 20,
      run: (db) => listSessions(db, sessionListQuerySchema.parse(q('page=1'))),
    },
    {
      name: 'sessions filter by array code',
      path: `/api/sessions?array=${encodeURIComponent(mid.code)}`,
      target: 20,
      run: (db) => listSessions(db, sessionListQuerySchema.parse(q(`array=${mid.code}`))),
    },
    { name: 'array detail', path: `/api/arrays/${mid.id}`, run: (db) => getArray(db, mid.id) },
  ]
}

export interface ApiBenchOptions {
  baseUrl: string
  databaseUrl: string
  email: string
  password: string
  seconds?: number
  connections?: number
  only?: string
  log?: (m: string) => void
}

export async function runApiBench(o: ApiBenchOptions): Promise<BenchRow[]> {
  const seconds = o.seconds ?? 5,
    connections = o.connections ?? 16,
    log = o.log ?? (() => {})
  const pool = mysql.createPool({
    uri: o.databaseUrl,
    connectionLimit: connections,
    timezone: 'Z',
    supportBigNumbers: true,
  })
  const captured: Captured = []
  const db = drizzle({ client: capturingPool(pool, captured), schema, mode: 'planetscale' }) as unknown as Db
  const cookie = await signIn(o.baseUrl, o.email, o.password)
  const rows: BenchRow[] = []
  try {
    const only = o.only?.toLowerCase()
    for (const c of (await cases(pool)).filter((x) => !only || x.name.toLowerCase().includes(only))) {
      captured.length = 0
      await c.run(db)
      const queries = [...captured]
      log(`[bench] ${c.name}: ${queries.length} queries`)
      await hammer(o.baseUrl + c.path, cookie, connections, 1) // warm-up (JIT, pools, caches), not counted
      // The route as served, then the bare SQL.
      const api = await hammer(o.baseUrl + c.path, cookie, connections, seconds)
      if (!queries.length) {
        // the floor: nothing to replay
        rows.push({
          name: `GET ${c.path} ${c.name}: p95`,
          value: pct(api.times, 95),
          unit: 'ms',
          note: `${Math.round(api.rps)} req/s, p50 ${fmtMs(pct(api.times, 50))}, p99 ${fmtMs(pct(api.times, 99))}`,
        })
        continue
      }
      const raw = await bare(pool, queries, connections, seconds)
      const [b50, b95, b99] = [50, 95, 99].map((p) => pct(raw.times, p))
      const summary = (h: typeof api) =>
        `${Math.round(h.rps)} req/s, p50 ${fmtMs(pct(h.times, 50))}, p99 ${fmtMs(pct(h.times, 99))}${h.non2xx ? `, ${h.non2xx} non-2xx!` : ''}`
      rows.push({
        name: `GET ${c.path.split('?')[0]} ${c.name}: p95`,
        value: pct(api.times, 95),
        unit: 'ms',
        target: c.target,
        better: 'lower',
        note: `${summary(api)} | bare SQL (${queries.length} q): ${Math.round(raw.rps)}/s, p50 ${fmtMs(b50)}, p95 ${fmtMs(b95)}, p99 ${fmtMs(b99)}`,
      })
      rows.push({
        name: '  ↳ overhead vs bare mysql2 (rps ratio)',
        value: raw.rps / api.rps,
        unit: '×',
        target: 3,
        better: 'lower',
        note: `p95 ratio ${(pct(api.times, 95) / b95).toFixed(2)}×`,
      })
    }
  } finally {
    await pool.end()
  }
  return rows
}
