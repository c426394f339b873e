import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fs from 'node:fs'
import path from 'node:path'
import net from 'node:net'
import { sql, inArray } from 'drizzle-orm'
import { createDb } from '../../server/db/client'
import { parseDatabaseUrl } from '../../server/db/url'
import { FailoverPool } from '../../server/db/failover-pool'
import { isRetryableTxError, TX_ATTEMPTS } from '../../server/db/tx-retry'
import { loadEnv } from '../../server/env'
import { codeSeries } from '../../server/db/schema/index'
import { uid } from './inventory-helpers'

/**
 * What running on a MariaDB Galera cluster asks of the app, checked on the single test database:
 * several hosts in DATABASE_URL with failover, a refused (deadlocked) transaction run again, no
 * table without a primary key, no table or named locks. tests/cluster/ runs the same on a real
 * three-node cluster.
 */
const url = process.env.DATABASE_URL!
const real = parseDatabaseUrl(url).hosts[0]

/** A local port nothing listens on (taken, then released). */
async function closedPort(): Promise<number> {
  const s = net.createServer()
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()))
  const port = (s.address() as net.AddressInfo).port
  await new Promise((r) => s.close(r))
  return port
}
const withHosts = (hosts: string) => url.replace(/@[^/]+\//, `@${hosts}/`)

describe('DATABASE_URL with several hosts', () => {
  it('parses a list of host:port, and refuses a bad one on the field at start-up', () => {
    const u = parseDatabaseUrl('mysql://u:p%40ss@n1:3306,n2,[::1]:3307/lab?ssl=x')
    expect(u.hosts).toEqual([
      { host: 'n1', port: 3306 },
      { host: 'n2', port: 3306 },
      { host: '[::1]', port: 3307 },
    ])
    expect(u).toMatchObject({ userInfo: 'u:p%40ss', database: 'lab', query: 'ssl=x' })
    const base = { SESSION_SECRET: 'test-secret-test-secret' }
    expect(() => loadEnv({ ...base, DATABASE_URL: 'mysql://u:p@n1:3306,n2:99999/lab' })).toThrow(
      /DATABASE_URL: .*port of "n2:99999"/,
    )
    expect(() => loadEnv({ ...base, DATABASE_URL: 'mysql://u:p@n1:3306,/lab' })).toThrow(/DATABASE_URL/)
    expect(() => loadEnv({ ...base, DATABASE_URL: 'mysql://u:p@n1:3306' })).toThrow(
      /DATABASE_URL must name the database/,
    )
    expect(loadEnv({ ...base, DATABASE_URL: 'mysql://u:p@n1:3306,n2:3307/lab' }).DATABASE_URL).toBe(
      'mysql://u:p@n1:3306,n2:3307/lab',
    )
  })

  it('uses the next host when the first does not answer, and keeps using the first while it answers', async () => {
    const dead = await closedPort()
    const a = createDb(withHosts(`127.0.0.1:${dead},${real.host}:${real.port}`), 2)
    const b = createDb(withHosts(`${real.host}:${real.port},127.0.0.1:${dead}`), 2)
    try {
      const [rows] = (await a.pool.query('SELECT 1 AS one')) as unknown as [{ one: number }[]]
      expect(rows[0].one).toBe(1)
      expect((a.pool as unknown as FailoverPool).currentHost()).toEqual(real)
      // Drizzle queries and transactions go the same way.
      expect(
        await a.db.transaction(
          async (tx) =>
            (
              await tx
                .select({ n: sql<number>`1` })
                .from(codeSeries)
                .limit(1)
            ).length,
        ),
      ).toBeLessThanOrEqual(1)
      await b.pool.query('SELECT 1')
      expect((b.pool as unknown as FailoverPool).currentHost()).toEqual(real)
    } finally {
      await a.pool.end()
      await b.pool.end()
    }
  })

  it("fails with the last host's connection error (answered 503) when no host answers", async () => {
    const d1 = await closedPort(),
      d2 = await closedPort()
    const { pool } = createDb(withHosts(`127.0.0.1:${d1},127.0.0.1:${d2}`), 1)
    try {
      await expect(pool.query('SELECT 1')).rejects.toMatchObject({ code: 'ECONNREFUSED' })
    } finally {
      await pool.end()
    }
  })

  it('on a plain MariaDB sets no Galera option (wsrep_sync_wait stays as the server has it)', async () => {
    const { pool } = createDb(url, 1)
    try {
      await pool.query('SELECT 1')
      expect((pool as unknown as FailoverPool).galera).toEqual([false])
      const [rows] = (await pool.query('SELECT @@session.wsrep_sync_wait AS w')) as unknown as [{ w: number }[]]
      expect(Number(rows[0].w)).toBe(0)
    } finally {
      await pool.end()
    }
  })
})

describe('a transaction the database refuses as a whole', () => {
  let t: ReturnType<typeof createDb>
  const tag = uid().slice(-5)
  const keys = [`T${tag}a`, `T${tag}b`] // series are at most 8 characters
  beforeAll(async () => {
    t = createDb(url, 4)
    await t.db.insert(codeSeries).values(keys.map((series) => ({ series, last: 0 })))
  })
  afterAll(async () => {
    await t.db.delete(codeSeries).where(inArray(codeSeries.series, keys))
    await t.pool.end()
  })

  it('is run again after a deadlock (InnoDB 1213, as Galera reports a certification conflict), so both writers commit', async () => {
    // Two transactions take the two rows in opposite order; the second lock of each waits for the
    // other, and InnoDB refuses one of them with ER_LOCK_DEADLOCK at once.
    let runs = 0
    let firstLocks = 0
    let bothLocked!: () => void
    const barrier = new Promise<void>((r) => {
      bothLocked = r
    })
    const bump = (first: string, second: string) =>
      t.db.transaction(async (tx) => {
        const run = ++runs
        await tx.execute(sql`UPDATE code_series SET last_number = last_number + 1 WHERE series = ${first}`)
        if (run <= 2) {
          if (++firstLocks === 2) bothLocked()
          await barrier
        }
        await tx.execute(sql`UPDATE code_series SET last_number = last_number + 1 WHERE series = ${second}`)
      })
    await Promise.all([bump(keys[0], keys[1]), bump(keys[1], keys[0])])
    expect(runs).toBe(3) // one of the two was refused once and run again
    const rows = await t.db.select().from(codeSeries).where(inArray(codeSeries.series, keys))
    expect(rows.map((r) => r.last)).toEqual([2, 2]) // both committed, the refused first run left nothing
  })

  it('is not run again for an error of its own, nor when the connection broke during COMMIT; at most TX_ATTEMPTS times', async () => {
    let runs = 0
    await expect(
      t.db.transaction(async () => {
        runs++
        throw new Error('a rule said no')
      }),
    ).rejects.toThrow('a rule said no')
    expect(runs).toBe(1)
    const lost = { code: 'PROTOCOL_CONNECTION_LOST' }
    expect(isRetryableTxError({ message: 'Failed query', cause: lost }, false)).toBe(true)
    expect(isRetryableTxError({ message: 'Failed query', cause: lost }, true)).toBe(false)
    expect(isRetryableTxError({ cause: { errno: 1213, code: 'ER_LOCK_DEADLOCK' } }, true)).toBe(true)
    expect(isRetryableTxError({ cause: { errno: 1047 } }, true)).toBe(true)
    expect(isRetryableTxError({ cause: { errno: 1062, code: 'ER_DUP_ENTRY' } }, false)).toBe(false)
    runs = 0
    const deadlock = Object.assign(new Error('Deadlock found when trying to get lock'), {
      errno: 1213,
      code: 'ER_LOCK_DEADLOCK',
    })
    await expect(
      t.db.transaction(async () => {
        runs++
        throw deadlock
      }),
    ).rejects.toBe(deadlock)
    expect(runs).toBe(TX_ATTEMPTS)
  })
})

describe('Galera rules', () => {
  it('every table has a primary key (Galera replicates rows by it; a table without one is not safe to write)', async () => {
    const { pool } = createDb(url, 1)
    try {
      const [rows] = (await pool.query(`SELECT t.table_name AS name FROM information_schema.tables t
        WHERE t.table_schema = DATABASE() AND t.table_type = 'BASE TABLE' AND NOT EXISTS (
          SELECT 1 FROM information_schema.table_constraints c WHERE c.table_schema = t.table_schema AND c.table_name = t.table_name AND c.constraint_type = 'PRIMARY KEY')`)) as unknown as [
        { name: string }[],
      ]
      expect(rows.map((r) => r.name)).toEqual([])
      const [all] = (await pool.query(
        "SELECT count(*) AS n FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE'",
      )) as unknown as [{ n: number }[]]
      expect(Number(all[0].n)).toBeGreaterThan(20)
    } finally {
      await pool.end()
    }
  })

  it('no code takes table locks or named locks (Galera does not replicate them)', () => {
    const hits: string[] = []
    const walk = (dir: string) => {
      for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
        const p = path.join(dir, e.name)
        if (e.isDirectory()) walk(p)
        else if (
          /\.(ts|sql)$/.test(e.name) &&
          /\b(LOCK\s+TABLES?|GET_LOCK\s*\(|LOCK\s+IN\s+EXCLUSIVE)/i.test(fs.readFileSync(p, 'utf8'))
        )
          hits.push(p)
      }
    }
    for (const d of ['server', 'drizzle']) walk(path.resolve(d))
    expect(hits).toEqual([])
  })
})
