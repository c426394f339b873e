import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from './helpers'
import { disk, makeChip, uid } from './inventory-helpers'
import { countWrites, onBumpFailed, readDataVersion, sharedVersionReader, statementKind } from '../../server/db/data-version'
import { forgetUser, rememberedUser, rememberSessionReads } from '../../server/auth/signed-in-cache'
import { plainRows } from '../../server/db/plain-rows'
import { arrays, chips } from '../../server/db/schema/index'
import { eq, sql } from 'drizzle-orm'

/**
 * The response cache (server/middleware/response-cache.ts) and the data version behind it
 * (server/db/data-version.ts): a cached answer must never hide a committed write, on this app
 * server or on another one sharing the database.
 */
let a: Awaited<ReturnType<typeof startTestApp>>
let b: Awaited<ReturnType<typeof startTestApp>>
let fabA: TestAgent, fabB: TestAgent
beforeAll(async () => {
  a = await startTestApp(); b = await startTestApp()
  fabA = await signedInAs(a.app, 'fab_technician'); fabB = await signedInAs(b.app, 'fab_technician')
})
afterAll(async () => { await a.stop(); await b.stop() })

const cacheOf = (res: request.Response) => res.headers['x-response-cache']

describe('statements and the data version', () => {
  it('sorts statements into reads, counted writes and transaction control', () => {
    expect(statementKind('select * from `arrays`')).toBe('read')
    expect(statementKind('  SELECT id FROM chips FOR UPDATE')).toBe('read')
    expect(statementKind('insert into `arrays` (`code`) values (?)')).toBe('write')
    expect(statementKind('INSERT IGNORE INTO audit_log VALUES (1)')).toBe('write')
    expect(statementKind('update `chips` set `status` = ?')).toBe('write')
    expect(statementKind('delete from `files` where id = 1')).toBe('write')
    expect(statementKind('CREATE TABLE x (id int)')).toBe('write')
    expect(statementKind('/* note */ update `wafers` set notes = 1')).toBe('write')
    // the session store and the sign-in throttle are not data any cached answer shows
    expect(statementKind('INSERT INTO ?? (??, ??, ??) VALUES (?, ?, ?)', ['sessions', 'session_id', 'expires', 'data'])).toBe('read')
    expect(statementKind('UPDATE ?? SET ?? = ? WHERE ?? = ?', ['sessions'])).toBe('read')
    expect(statementKind('INSERT INTO ?? (??) VALUES (?)', ['chips'])).toBe('write')
    expect(statementKind('insert into `throttle_hits` values (1)')).toBe('read')
    // nor are export jobs (their progress is written about twice a second while one runs)
    expect(statementKind('update `export_jobs` set `done` = ?, `updated_at` = ? where `export_jobs`.`id` = ?')).toBe('read')
    expect(statementKind('delete from `export_jobs` where `export_jobs`.`id` in (?)')).toBe('read')
    expect(statementKind('begin')).toBe('begin')
    expect(statementKind('START TRANSACTION')).toBe('begin')
    expect(statementKind('commit')).toBe('commit')
    expect(statementKind('rollback')).toBe('end')
    expect(statementKind('rollback to savepoint sp1')).toBe('read')
    expect(statementKind('savepoint sp1')).toBe('read')
    expect(statementKind('WITH t AS (SELECT 1) UPDATE chips SET notes = 1')).toBe('write')
  })

  it('goes up after a lone write, once at the commit of a transaction, and not for a rollback', async () => {
    const v0 = (await readDataVersion(a.pool))!
    expect(v0).toBeGreaterThanOrEqual(0)
    await a.db.update(arrays).set({ notes: sql`${arrays.notes}` }).where(eq(arrays.id, -1))
    const v1 = (await readDataVersion(a.pool))!
    expect(v1).toBe(v0 + 1)

    let inside = -1
    await a.db.transaction(async (tx) => {
      await tx.update(arrays).set({ notes: sql`${arrays.notes}` }).where(eq(arrays.id, -1))
      await tx.update(chips).set({ notes: sql`${chips.notes}` }).where(eq(chips.id, -1))
      inside = (await readDataVersion(b.pool))! // another server, before the commit
    })
    expect(inside).toBe(v1)
    expect(await readDataVersion(b.pool)).toBe(v1 + 1)

    await expect(a.db.transaction(async (tx) => {
      await tx.update(arrays).set({ notes: sql`${arrays.notes}` }).where(eq(arrays.id, -1))
      throw new Error('changed my mind')
    })).rejects.toThrow('changed my mind')
    expect(await readDataVersion(a.pool)).toBe(v1 + 1)

    // mysql2's own transaction calls count the same way
    const conn = await a.pool.getConnection()
    try {
      await conn.beginTransaction()
      await conn.query('UPDATE `chips` SET `notes` = `notes` WHERE `id` = -1')
      expect(await readDataVersion(b.pool)).toBe(v1 + 1)
      await conn.commit()
      expect(await readDataVersion(b.pool)).toBe(v1 + 2)
    } finally { conn.release() }
  })
})

describe('a failed bump', () => {
  it('does not fail the committed write; the response caches are told instead', async () => {
    const sent: string[] = []
    const fakePool = {
      query: async (text: string) => {
        sent.push(text)
        if (/data_version/.test(text)) throw Object.assign(new Error('Lock wait timeout exceeded'), { errno: 1205 })
        return [{ affectedRows: 1 }]
      },
      execute: async () => [[]],
      getConnection: async () => { throw new Error('not used') },
    }
    const heard: unknown[] = []
    const stop = onBumpFailed((e) => heard.push(e))
    const stopThrowing = onBumpFailed(() => { throw new Error('a listener that fails') })
    try {
      countWrites(fakePool as never)
      await expect(fakePool.query('update `chips` set notes = 1')).resolves.toEqual([{ affectedRows: 1 }])
      expect(sent).toHaveLength(2) // the write, then the bump
      expect(heard).toHaveLength(1)
      await fakePool.query('select 1')
      expect(heard).toHaveLength(1) // a read bumps nothing
    } finally { stop(); stopThrowing() }
  })

  it('counts a lone write whose answer was lost (it may have committed)', async () => {
    const sent: string[] = []
    const fakePool = {
      query: async (text: string) => {
        sent.push(text)
        if (/^update `chips`/.test(text)) throw Object.assign(new Error('Connection lost'), { code: 'PROTOCOL_CONNECTION_LOST' })
        return [{ affectedRows: 1 }]
      },
      execute: async () => [[]],
      getConnection: async () => { throw new Error('not used') },
    }
    countWrites(fakePool as never)
    await expect(fakePool.query('update `chips` set notes = 1')).rejects.toThrow('Connection lost')
    expect(sent[1]).toMatch(/data_version/)
  })
})

describe('shared version reader', () => {
  it('never answers a caller with a read sent before it asked, and serves a batch with one read', async () => {
    let version = 10
    const sent: ((v: number) => void)[] = []
    const fakePool = { query: () => new Promise((resolve) => { const v = version; sent.push(() => resolve([[{ n: v }]])) }) }
    const read = sharedVersionReader(fakePool as never)
    const first = read() // sends read #1 (sees 10)
    version = 11 // a write commits while read #1 is on its way
    const late = [read(), read(), read()] // asked after read #1 was sent: must wait for read #2
    expect(sent).toHaveLength(1)
    sent[0](0)
    expect(await first).toBe(10)
    await new Promise((r) => setTimeout(r, 0))
    expect(sent).toHaveLength(2) // one read for the three late callers
    sent[1](0)
    expect(await Promise.all(late)).toEqual([11, 11, 11])
    const alone = read() // nothing in flight: a read of its own
    expect(sent).toHaveLength(3)
    sent[2](0)
    expect(await alone).toBe(11)
  })
})

describe('response cache', () => {
  it('answers a repeated list from the cache, with the same body and ETag', async () => {
    const url = '/api/arrays?page=1&pageSize=5&sort=code&dir=desc'
    const first = await fabA.get(url)
    const second = await fabA.get(url)
    expect(first.status).toBe(200)
    expect([cacheOf(first), cacheOf(second)]).toEqual(['miss', 'hit'])
    expect(second.text).toBe(first.text)
    expect(second.headers.etag).toBe(first.headers.etag)
    expect(second.headers['content-type']).toMatch(/^application\/json/)
    expect((await fabA.get(url).set('If-None-Match', first.headers.etag)).status).toBe(304)
  })

  it('never hides a write made through another app server', async () => {
    const { chip } = await makeChip(fabA)
    const url = `/api/arrays?chipId=${chip.id}`
    expect((await fabB.get(url)).body.rows).toHaveLength(0)
    expect(cacheOf(await fabB.get(url))).toBe('hit')
    // written through server A; server B must show it on the very next request
    const created = await fabA.post('/api/arrays').send({ ...disk(chip.id, 'B2'), notes: `cache ${uid()}` })
    expect(created.status).toBe(201)
    const after = await fabB.get(url)
    expect(cacheOf(after)).toBe('miss')
    expect(after.body.rows.map((r: { id: number }) => r.id)).toEqual([created.body.id])
    // and an edit through A is seen by B's cached detail page
    const detail = `/api/arrays/${created.body.id}`
    await fabB.get(detail)
    expect(cacheOf(await fabB.get(detail))).toBe('hit')
    const notes = `edited ${uid()}`
    expect((await fabA.patch(detail).send({ ...disk(chip.id, 'B2'), notes })).status).toBe(200)
    expect((await fabB.get(detail)).body.notes).toBe(notes)
  })

  it('keeps answers per person, skips on Cache-Control: no-cache, and keeps no error answers', async () => {
    const url = '/api/chips?page=1&pageSize=3'
    await fabA.get(url)
    expect(cacheOf(await fabA.get(url))).toBe('hit')
    const lead = await signedInAs(a.app, 'group_lead')
    expect(cacheOf(await lead.get(url))).toBe('miss')
    expect(cacheOf(await fabA.get(url).set('Cache-Control', 'no-cache'))).toBe('bypass')
    // junk parameters long enough to fill the cache are answered, not kept
    const long = await fabA.get(`${url}&junk=${'x'.repeat(3000)}`)
    expect([long.status, cacheOf(long)]).toEqual([200, 'bypass'])
    const bad = '/api/arrays?shape=not-a-shape'
    expect((await fabA.get(bad)).status).toBe(400)
    const again = await fabA.get(bad)
    expect(again.status).toBe(400)
    expect(cacheOf(again)).toBe('miss')
    // nobody signed in: refused before the cache is asked
    expect((await request(a.app).get(url)).status).toBe(401)
  })

  it('can be turned off (RESPONSE_CACHE_MB=0)', async () => {
    const off = await startTestApp({ RESPONSE_CACHE_MB: '0' })
    try {
      const fab = await signedInAs(off.app, 'fab_technician')
      await fab.get('/api/wafers')
      expect(cacheOf(await fab.get('/api/wafers'))).toBe('bypass')
    } finally { await off.stop() }
  })
})

describe('signed-in cache', () => {
  it('reads a session once per moment, hands out copies, and forgets what this server wrote or destroyed', () => {
    const rows = new Map<string, string>([['s1', JSON.stringify({ passport: { user: 7 } })]])
    let reads = 0
    const store = {
      get: (sid: string, cb: (e?: unknown, v?: unknown) => void) => { reads++; const r = rows.get(sid); cb(undefined, r ? JSON.parse(r) : null) },
      set: (sid: string, data: unknown, cb?: (e?: unknown) => void) => { rows.set(sid, JSON.stringify(data)); cb?.() },
      destroy: (sid: string, cb?: (e?: unknown) => void) => { rows.delete(sid); cb?.() },
    }
    rememberSessionReads(store, 60_000)
    const got: Record<string, unknown>[] = []
    store.get('s1', (_e, v) => got.push(v as Record<string, unknown>))
    store.get('s1', (_e, v) => got.push(v as Record<string, unknown>))
    expect(reads).toBe(1)
    expect(got[1]).toEqual(got[0])
    got[0].passport = { user: 99 } // a request changing its copy must not change the next request's
    store.get('s1', (_e, v) => expect(v).toEqual({ passport: { user: 7 } }))
    store.set('s1', { passport: { user: 8 } })
    store.get('s1', (_e, v) => expect(v).toEqual({ passport: { user: 8 } }))
    store.destroy('s1')
    store.get('s1', (_e, v) => expect(v).toBeNull())
    expect(reads).toBe(2)
    store.get('missing', () => {})
    store.get('missing', () => {})
    expect(reads).toBe(4) // a miss is never remembered
  })
})

describe('signed-in cache races', () => {
  it('a read on its way while this server signs the session out does not bring it back', () => {
    const rows = new Map<string, string>([['s2', JSON.stringify({ passport: { user: 7 } })]])
    const pending: (() => void)[] = []
    let reads = 0
    const store = {
      get: (sid: string, cb: (e?: unknown, v?: unknown) => void) => { reads++; const r = rows.get(sid); pending.push(() => cb(undefined, r ? JSON.parse(r) : null)) },
      set: (sid: string, data: unknown, cb?: (e?: unknown) => void) => { rows.set(sid, JSON.stringify(data)); cb?.() },
      destroy: (sid: string, cb?: (e?: unknown) => void) => { rows.delete(sid); cb?.() },
    }
    rememberSessionReads(store, 60_000)
    store.get('s2', () => {}) // read sent: sees the signed-in row
    store.destroy('s2') // sign-out on this server
    pending.shift()!() // the old answer lands after the sign-out
    let after: unknown = 'unset'
    store.get('s2', (_e, v) => { after = v })
    expect(reads).toBe(2) // asked the store again instead of trusting the late answer
    pending.shift()!()
    expect(after).toBeNull()
  })

  it('a person read on its way while this server changes the person is not remembered', async () => {
    const id = 900_000 + Math.floor(Math.random() * 1000)
    let release: (u: unknown) => void = () => {}
    let loads = 0
    const load = (active: boolean) => () => { loads++; return new Promise((r) => { release = r }).then(() => ({ id, active }) as never) }
    const first = rememberedUser(id, load(true))
    forgetUser(id) // e.g. deactivated by an admin on this server
    release(undefined)
    expect((await first as unknown as { active: boolean }).active).toBe(true) // that request already had it
    const second = rememberedUser(id, load(false))
    release(undefined)
    expect((await second as unknown as { active: boolean }).active).toBe(false)
    expect(loads).toBe(2)
  })
})

describe('plainRows', () => {
  it('gives keyed rows like Drizzle: JSON decoded, dates as Date, same-named columns of two tables apart', async () => {
    const { chip } = await makeChip(fabA)
    const made = await fabA.post('/api/arrays').send(disk(chip.id, 'C3'))
    expect(made.status).toBe(201)
    const fields = { id: arrays.id, code: arrays.code, chipCode: chips.code, dims: arrays.dimensionsNm, mirrors: arrays.customMirrors, createdAt: arrays.createdAt, one: sql<number>`1` }
    const build = (f: Record<keyof typeof fields, unknown>) => a.db.select(f as typeof fields).from(arrays).innerJoin(chips, eq(chips.id, arrays.chipId)).where(eq(arrays.id, made.body.id))
    const [plain] = await plainRows(a.db, fields, build as never)
    const [drizzled] = await a.db.select(fields).from(arrays).innerJoin(chips, eq(chips.id, arrays.chipId)).where(eq(arrays.id, made.body.id))
    expect(plain.code).toBe(made.body.code)
    expect(plain.chipCode).toBe(chip.code)
    expect(plain.dims).toEqual(made.body.dimensionsNm)
    expect(plain.createdAt).toBeInstanceOf(Date)
    expect({ ...plain, one: Number(plain.one) }).toEqual({ ...drizzled, one: Number(drizzled.one) })
    // JSON that mysql2 has already decoded is not parsed twice (a JSON string value would throw)
    await a.db.execute(sql`UPDATE arrays SET custom_mirrors = '"x"' WHERE id = ${made.body.id}`)
    try {
      const [again] = await plainRows(a.db, fields, build as never)
      expect(again.mirrors).toBe('x')
    } finally {
      // never leave a value the app cannot write in the shared test database
      await a.db.execute(sql`UPDATE arrays SET custom_mirrors = NULL WHERE id = ${made.body.id}`)
    }
  })
})
