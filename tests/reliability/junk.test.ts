import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fc from 'fast-check'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import type { Express } from 'express'
import { createDb } from '../../server/db/client'
import { createApp } from '../../server/app'
import { loadEnv } from '../../server/env'
import type { AppContext } from '../../server/context'
import { silentLogger } from '../../server/logger'
import { DEMO_PASSWORD } from '../../server/db/seed/people'
import { migrateAndSeed, startPrivateDb, type PrivateDb } from './private-db'
import { listRoutes } from '../server/route-list'

/**
 * Bad input, property-based: generated junk params, query strings and JSON bodies (plus malformed
 * JSON) sent to EVERY route of the Express app, as the admin (who may do everything) and as
 * anonymous. Never a 500; error answers are JSON; a 4xx leaves every table's row count unchanged
 * (no partial row). The routes are read from the app's router stack, so a new route is covered
 * automatically. Runs on a private MariaDB: junk that an admin may legitimately save (2xx) must not
 * land in the shared test database. Fixed seed; JUNK_RUNS (default 10) runs per route and role.
 */
const RUNS = Number(process.env.JUNK_RUNS ?? 10)
const SEED = 20240607
/** Routes outside /api (none: the client's files and pages are one middleware, server/middleware/client-files.ts). */
const NOT_API = new Set<string>([])

const junkText = fc.oneof(
  fc.string({ maxLength: 40 }),
  fc.constantFrom(
    '../../etc/passwd',
    '..%2F..%2F',
    '0',
    '-1',
    '1e309',
    '99999999999999999999',
    'NaN',
    'null',
    '<script>',
    "' OR 1=1 --",
    '%00',
    'Ａ-０００１',
    '😀'.repeat(30),
  ),
  fc.integer().map(String),
  fc.double().map(String),
  fc.uuid(),
)
const junkValue = fc.oneof(
  junkText,
  fc.integer(),
  fc.double(),
  fc.boolean(),
  fc.constant(null),
  fc.array(junkText, { maxLength: 3 }),
)
const junkBody = fc.oneof(
  fc.anything({ maxDepth: 2 }),
  fc.dictionary(
    fc.oneof(
      fc.string({ maxLength: 12 }),
      fc.constantFrom(
        'id',
        'email',
        'password',
        'name',
        'code',
        'reason',
        'chipId',
        'waferId',
        'ids',
        'results',
        'page',
      ),
    ),
    junkValue,
    { maxKeys: 6 },
  ),
)
const junkQuery = fc.dictionary(
  fc.oneof(
    fc.string({ maxLength: 10 }),
    fc.constantFrom(
      'page',
      'pageSize',
      'sort',
      'dir',
      'q',
      'status',
      'parentId',
      'includeRetired',
      'dryRun',
      'from',
      'to',
      'array',
    ),
  ),
  junkText,
  { maxKeys: 5 },
)

let pdb: PrivateDb
let t: { app: Express; ctx: AppContext; close: () => Promise<void> }
let admin: TestAgent
let tables: string[] = []

async function counts(): Promise<Record<string, number>> {
  const q = tables.map((n) => `SELECT '${n}' AS t, COUNT(*) AS n FROM \`${n}\``).join(' UNION ALL ')
  const [rows] = (await t.ctx.pool.query(q)) as unknown as [{ t: string; n: number }[]]
  return Object.fromEntries(rows.map((r) => [r.t, Number(r.n)]))
}

async function signInAdmin(): Promise<TestAgent> {
  const agent = request.agent(t.app)
  const res = await agent.post('/api/auth/login').send({ email: 'admin@kestrel-lab.example', password: DEMO_PASSWORD })
  if (res.status !== 200) throw new Error(`admin sign-in: ${res.status}`)
  return agent
}

beforeAll(async () => {
  pdb = await startPrivateDb('junk')
  const url = pdb.createDatabase('overtone_junk')
  await migrateAndSeed(url)
  const env = loadEnv({
    ...process.env,
    DATABASE_URL: url,
    DATA_DIR: `${pdb.dir}/data`,
    SESSION_SECRET: 'junk-secret-junk-secret',
    LOG_LEVEL: 'silent',
    LOGIN_MAX_FAILURES: '1000',
  })
  const { pool, db } = createDb(url, 5)
  const ctx: AppContext = {
    db,
    pool,
    env,
    log: silentLogger(),
    publicUrl: 'http://overtone.test',
    mailUp: async () => true,
    startedAt: Date.now(),
  }
  const { app, close } = createApp(ctx)
  t = {
    app,
    ctx,
    close: async () => {
      await close()
      await pool.end()
    },
  }
  // sessions and sign-in throttle counters change on refusals by design (a failed sign-in counts)
  const [rows] = (await pool.query(
    "SELECT table_name AS n FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' AND table_name NOT IN ('sessions', '__drizzle_migrations', 'throttle_hits')",
  )) as unknown as [{ n: string }[]]
  tables = rows.map((r) => r.n)
  admin = await signInAdmin()
}, 180_000)

afterAll(async () => {
  await t?.close()
  await pdb?.destroy()
}, 120_000)

function fill(path: string, params: string[]): string {
  let i = 0
  return path.replace(
    /:(\w+)(\.\w+)?/g,
    (_m, _name, ext: string | undefined) => encodeURIComponent(params[i++ % params.length] || 'x') + (ext ?? ''),
  )
}

describe('junk input on every route', () => {
  it('finds the API routes in the router stack (a new route is covered without editing this file)', () => {
    const routes = listRoutes(t.app)
    expect(routes.length).toBeGreaterThan(50)
    expect(
      routes
        .filter((r) => !r.path.startsWith('/api'))
        .map((r) => `${r.method} ${r.path}`)
        .sort(),
    ).toEqual([...NOT_API].sort())
  })

  it('never answers 500, answers errors as JSON, and a 4xx changes no row count', async () => {
    const routes = listRoutes(t.app).filter((r) => r.path.startsWith('/api'))
    const failures: string[] = []
    for (const route of routes) {
      for (const who of ['admin', 'anonymous'] as const) {
        if (who === 'admin' && route.path === '/api/auth/logout') continue // would end the admin's own session
        await fc.assert(
          fc.asyncProperty(
            fc.array(junkText, { minLength: 1, maxLength: 3 }),
            junkQuery,
            junkBody,
            fc.boolean(),
            async (params, query, body, raw) => {
              const url = fill(route.path, params)
              const before = await counts()
              const agent = who === 'admin' ? admin : request(t.app)
              let req = (agent as unknown as Record<string, (u: string) => request.Test>)
                [route.method.toLowerCase()](url)
                .query(query)
              if (route.method !== 'GET')
                req = raw
                  ? req.set('Content-Type', 'application/json').send(JSON.stringify(body).slice(0, -1) || '{')
                  : req.send(body as object)
              const res = await req
              const label = `${who} ${route.method} ${url} → ${res.status}`
              if (res.status >= 500) failures.push(`${label}: ${JSON.stringify(res.body).slice(0, 200)}`)
              if (res.status >= 400) {
                if (!/json/.test(res.headers['content-type'] ?? ''))
                  failures.push(`${label}: not JSON (${res.headers['content-type']})`)
                const after = await counts()
                const changed = Object.keys(before).filter((k) => before[k] !== after[k])
                if (changed.length) failures.push(`${label}: rows changed in ${changed.join(', ')}`)
              }
              if (who === 'admin' && res.status === 401) admin = await signInAdmin()
              return true
            },
          ),
          { numRuns: RUNS, seed: SEED, endOnFailure: true },
        )
        if (failures.length > 20) break
      }
    }
    expect(failures).toEqual([])
  }, 600_000)
})
