import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { spawn, type ChildProcess } from 'node:child_process'
import path from 'node:path'
import ExcelJS from 'exceljs'
import mysql from 'mysql2/promise'
import request from 'supertest'
import { createDb } from '../../server/db/client'
import { createApp } from '../../server/app'
import { loadEnv } from '../../server/env'
import type { AppContext } from '../../server/context'
import { silentLogger } from '../../server/logger'
import { DEMO_PASSWORD } from '../../server/db/seed/people'
import { freePort, migrateAndSeed, startPrivateDb, type PrivateDb } from './private-db'
import { listRoutes } from '../server/route-list'

/**
 * Faults, on a private MariaDB (never the shared dev or test database):
 * 1. MariaDB restarted under a running app: /api/health answers 503 "degraded" while it is down,
 *    then ok again; a session cookie made before the restart still works (sessions live in MariaDB).
 * 2. The server process killed (SIGKILL) in the middle of a large Excel import: after a restart the
 *    wafer/chip/array counts are either unchanged or the whole file is in, never a part of it.
 * 3. MariaDB stopped, then frozen (SIGSTOP): every API route answers 503 with a JSON message (not
 *    500, and not a request that hangs as long as the database is frozen), health says the
 *    database is down, and the app recovers by itself when the database is back.
 */
let pdb: PrivateDb
let url = ''
const children: ChildProcess[] = []
const ORIGIN = 'http://overtone.test'

beforeAll(async () => {
  pdb = await startPrivateDb('faults')
  url = pdb.createDatabase('overtone_faults')
  await migrateAndSeed(url)
}, 180_000)

afterAll(async () => {
  for (const c of children) if (!hasExited(c)) c.kill('SIGKILL')
  await pdb?.destroy()
}, 120_000)

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms))
/** A child killed by a signal keeps exitCode null (signalCode is set instead), so test both. */
const hasExited = (c: ChildProcess) => c.exitCode !== null || c.signalCode !== null
const whenExited = (c: ChildProcess) =>
  new Promise<void>((r) => {
    if (hasExited(c)) r()
    else c.once('exit', () => r())
  })

describe('MariaDB restart while the app runs', () => {
  it('reports unhealthy while the database is down, reconnects, and the old session still works', async () => {
    const env = loadEnv({
      ...process.env,
      DATABASE_URL: url,
      DATA_DIR: path.join(pdb.dir, 'data'),
      SESSION_SECRET: 'faults-secret-faults-secret',
      LOG_LEVEL: 'silent',
    })
    const { pool, db } = createDb(url, 5)
    const ctx: AppContext = {
      db,
      pool,
      env,
      log: silentLogger(),
      publicUrl: ORIGIN,
      mailUp: async () => true,
      startedAt: Date.now(),
    }
    const { app, close } = createApp(ctx)
    try {
      const agent = request.agent(app)
      expect(
        (await agent.post('/api/auth/login').send({ email: 'admin@kestrel-lab.example', password: DEMO_PASSWORD }))
          .status,
      ).toBe(200)
      expect((await agent.get('/api/health')).status).toBe(200)
      await pdb.stop()
      // A load balancer's probe carries no cookie; a signed-in browser's does. Both get 503:
      // health is answered before the session store is asked.
      for (const probe of [request(app).get('/api/health'), agent.get('/api/health')]) {
        const down = await probe
        expect(down.status).toBe(503)
        expect(down.body).toMatchObject({ status: 'degraded', database: 'down' })
      }
      await pdb.start()
      let health = 0
      for (let i = 0; i < 100 && health !== 200; i++) {
        health = (await agent.get('/api/health')).status
        if (health !== 200) await sleep(200)
      }
      expect(health).toBe(200)
      const me = await agent.get('/api/auth/me')
      expect(me.status).toBe(200)
      expect(JSON.stringify(me.body)).toContain('admin@kestrel-lab.example')
    } finally {
      await close().catch(() => {})
      await pool.end().catch(() => {})
    }
  }, 180_000)
})

describe('database down or frozen', () => {
  async function appOnPrivateDb() {
    const env = loadEnv({
      ...process.env,
      DATABASE_URL: url,
      DATA_DIR: path.join(pdb.dir, 'data'),
      SESSION_SECRET: 'faults-secret-faults-secret',
      LOG_LEVEL: 'silent',
    })
    const { pool, db } = createDb(url, 5)
    const ctx: AppContext = {
      db,
      pool,
      env,
      log: silentLogger(),
      publicUrl: ORIGIN,
      mailUp: async () => true,
      startedAt: Date.now(),
    }
    const { app, close } = createApp(ctx)
    return {
      app,
      stop: async () => {
        await close().catch(() => {})
        await pool.end().catch(() => {})
      },
    }
  }
  const fill = (p: string) =>
    p
      .replace(/:id\b/g, '1')
      .replace(/:entity\b/, 'chip')
      .replace(/:template\b/, 'x')
      .replace(/:(\w+)/g, 'x')
  type Send = Record<string, (u: string) => request.Test>
  async function untilHealthy(agent: ReturnType<typeof request.agent>) {
    for (let i = 0; i < 150; i++) {
      if ((await agent.get('/api/health')).status === 200) return
      await sleep(200)
    }
    throw new Error('the app did not recover')
  }

  it('stopped: every API route answers 503 with a JSON message, health says so, and the app recovers', async () => {
    // Signed in through one app; the sweep runs on a second one, whose caches are empty, so every
    // request has to read its session from the database (as on a server that just started).
    const first = await appOnPrivateDb()
    const second = await appOnPrivateDb()
    try {
      const login = await request(first.app)
        .post('/api/auth/login')
        .send({ email: 'admin@kestrel-lab.example', password: DEMO_PASSWORD })
      expect(login.status).toBe(200)
      const cookie = (login.headers['set-cookie'] as unknown as string[]).map((c) => c.split(';')[0]).join('; ')
      await pdb.stop()
      try {
        const wrong: string[] = []
        for (const r of listRoutes(second.app).filter(
          (x) => x.path.startsWith('/api') && x.path !== '/api/auth/logout',
        )) {
          const res = await (request(second.app) as unknown as Send)
            [r.method.toLowerCase()](fill(r.path))
            .set('Cookie', cookie)
            .send({})
          if (res.status !== 503 || !/json/.test(res.headers['content-type'] ?? '') || !res.body.message)
            wrong.push(`${r.method} ${r.path} → ${res.status} ${JSON.stringify(res.body).slice(0, 120)}`)
        }
        expect(wrong).toEqual([])
        const health = await request(second.app).get('/api/health')
        expect(health.body).toMatchObject({ status: 'degraded', database: 'down' })
        expect(health.body.message).toMatch(/database/)
      } finally {
        await pdb.start()
      }
      const agent = request.agent(second.app)
      await untilHealthy(agent)
      expect((await agent.get('/api/wafers').set('Cookie', cookie)).status).toBe(200)
    } finally {
      await first.stop()
      await second.stop()
    }
  }, 240_000)

  it('frozen: requests answer 503 instead of hanging, health says so, and all is well after it thaws', async () => {
    const { app, stop } = await appOnPrivateDb()
    try {
      const agent = request.agent(app)
      expect(
        (await agent.post('/api/auth/login').send({ email: 'admin@kestrel-lab.example', password: DEMO_PASSWORD }))
          .status,
      ).toBe(200)
      expect((await agent.get('/api/wafers')).status).toBe(200)
      pdb.freeze()
      try {
        // A frozen database keeps its connections open and never answers; each of these would hang
        // for as long as the freeze lasts (the test's own timeout) without the fix.
        const [list, detail, write, health] = await Promise.all([
          agent.get('/api/wafers'),
          agent.get('/api/materials/1'),
          agent.post('/api/materials').send({ name: `Frozen ${Date.now()}`, formula: 'GaAs', pointGroup: '-43m' }),
          request(app).get('/api/health'),
        ])
        for (const [label, res] of [
          ['list', list],
          ['detail', detail],
          ['write', write],
        ] as const) {
          expect(res.status, label).toBe(503)
          expect(res.body.message, label).toMatch(/database/i)
        }
        expect(health.status).toBe(503)
        expect(health.body.database).toBe('down')
      } finally {
        pdb.thaw()
      }
      await untilHealthy(agent)
      expect((await agent.get('/api/wafers')).status).toBe(200)
      expect((await agent.get('/api/auth/me')).status).toBe(200)
    } finally {
      await stop()
    }
  }, 60_000)
})

async function startServer(port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: process.cwd(),
    stdio: 'ignore',
    env: {
      ...process.env,
      DATABASE_URL: url,
      PORT: String(port),
      SMTP_SINK_PORT: '0',
      DATA_DIR: path.join(pdb.dir, 'data'),
      LOG_LEVEL: 'silent',
      SESSION_SECRET: 'faults-secret-faults-secret',
      NODE_ENV: 'test',
    },
  })
  children.push(child)
  for (let i = 0; i < 300; i++) {
    if (
      await fetch(`http://127.0.0.1:${port}/api/health`).then(
        (r) => r.ok,
        () => false,
      )
    )
      return child
    if (hasExited(child)) break
    await sleep(200)
  }
  throw new Error('server child did not start')
}

async function recordCounts() {
  const c = await mysql.createConnection(url)
  try {
    const [[row]] = (await c.query(
      'SELECT (SELECT COUNT(*) FROM wafers) w, (SELECT COUNT(*) FROM chips) c, (SELECT COUNT(*) FROM arrays) a',
    )) as unknown as [[Record<string, number>]]
    return { wafers: Number(row.w), chips: Number(row.c), arrays: Number(row.a) }
  } finally {
    await c.end()
  }
}

async function bigWorkbook(material: string, chips: number, perChip: number): Promise<Buffer> {
  const book = new ExcelJS.Workbook()
  book.addWorksheet('Wafers').addRows([
    ['Ref', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot'],
    ['W1', material, '0 0 1', '1 -1 0', 50.8, 350, 'KILL-TEST'],
  ])
  const cs = book.addWorksheet('Chips')
  cs.addRow(['Ref', 'Wafer', 'Index', 'Width (mm)', 'Height (mm)'])
  for (let i = 1; i <= chips; i++) cs.addRow([`W1-${i}`, 'W1', i, 5, 5])
  const as = book.addWorksheet('Arrays')
  as.addRow(['Chip', 'Position', 'Shape', 'Dimensions (nm)', 'Lattice', 'Period X (nm)', 'Period Y (nm)'])
  for (let i = 1; i <= chips; i++)
    for (let p = 1; p <= perChip; p++)
      as.addRow([
        `W1-${i}`,
        `P${p}`,
        p % 2 ? 'disk' : 'cross',
        p % 2 ? 'diameterNm=450' : 'lengthNm=600; widthNm=120',
        'square',
        900 + p,
        900 + p,
      ])
  return Buffer.from(await book.xlsx.writeBuffer())
}

describe('server killed in the middle of a large import', () => {
  it('after a restart nothing partial is visible: counts unchanged, or the whole file imported', async () => {
    const port = await freePort()
    let child = await startServer(port)
    const base = `http://127.0.0.1:${port}`
    const login = await fetch(`${base}/api/auth/login`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', origin: base },
      body: JSON.stringify({ email: 'admin@kestrel-lab.example', password: DEMO_PASSWORD }),
    })
    expect(login.status).toBe(200)
    const cookie = login.headers
      .getSetCookie()
      .map((c) => c.split(';')[0])
      .join('; ')
    const c = await mysql.createConnection(url)
    const [[mat]] = (await c.query(
      'SELECT name FROM materials WHERE retired_at IS NULL ORDER BY id LIMIT 1',
    )) as unknown as [[{ name: string }]]
    await c.end()
    const chips = 60,
      perChip = 40
    const file = await bigWorkbook(mat.name, chips, perChip)
    const before = await recordCounts()

    const form = new FormData()
    form.append('file', new Blob([new Uint8Array(file)]), 'kill-test.xlsx')
    const posted = fetch(`${base}/api/excel/import?dryRun=false`, {
      method: 'POST',
      headers: { cookie, origin: base },
      body: form,
    }).then(
      (r) => r.status,
      () => 'connection lost',
    )
    await sleep(2500)
    child.kill('SIGKILL')
    // undici can keep waiting on a request whose server died mid-upload; after 10 s count it as lost
    // (the stricter branch below: nothing may have been written).
    const outcome = await Promise.race([posted, sleep(10_000).then(() => 'connection lost' as const)])
    await whenExited(child)

    child = await startServer(port)
    const after = await recordCounts()
    const full = { wafers: before.wafers + 1, chips: before.chips + chips, arrays: before.arrays + chips * perChip }
    // 'connection lost' = killed mid-request (the case this test is about); a status = it finished first.
    expect([JSON.stringify(before), JSON.stringify(full)], `outcome ${outcome}`).toContain(JSON.stringify(after))
    if (outcome === 'connection lost') expect(after).toEqual(before)
    child.kill('SIGINT')
  }, 240_000)
})
