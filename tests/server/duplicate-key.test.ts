import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import type { PoolConnection } from 'mysql2/promise'
import { startTestApp, signedInAs } from './helpers'
import { duplicateKeyBody } from '../../server/middleware/error-handler'

/**
 * A duplicate key from the database (two people saving the same name at the same moment, a
 * double-click) is a 409 with a field message, never a 500. The race is made deterministic: the
 * test holds an uncommitted row with the same name, so the route's own check does not see it and
 * its INSERT waits on the unique index until the test commits, then fails with ER_DUP_ENTRY.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
})
afterAll(async () => {
  await t.stop()
})

/** Wait (by polling the server's process list, no fixed sleep) until a statement like `pattern` is running. */
async function untilRunning(conn: PoolConnection, pattern: string): Promise<void> {
  for (;;) {
    const [rows] = (await conn.query(
      'SELECT COUNT(*) AS n FROM information_schema.processlist WHERE info LIKE ? AND id <> CONNECTION_ID()',
      [pattern],
    )) as unknown as [{ n: number }[]]
    if (Number(rows[0].n) > 0) return
    await new Promise((r) => setImmediate(r))
  }
}

describe('duplicate keys', () => {
  it('a material name taken meanwhile is 409 on name', async () => {
    const name = `Race ${Date.now()}-${Math.floor(Math.random() * 1e6)}`
    const conn = await t.pool.getConnection()
    try {
      await conn.beginTransaction()
      await conn.query(
        "INSERT INTO materials (name, formula, point_group, coefficients) VALUES (?, 'GaAs', '-43m', '[]')",
        [name],
      )
      const pending = fab
        .post('/api/materials')
        .send({ name, formula: 'GaAs', pointGroup: '-43m' })
        .then((r) => r)
      await untilRunning(conn, 'insert into `materials`%')
      await conn.commit()
      const res = await pending
      expect(res.status).toBe(409)
      expect(res.body.fields.name[0]).toMatch(/already taken/)
      expect(res.body.message).toMatch(/name/)
    } finally {
      conn.release()
    }
  })

  it('names the field of each unique index', () => {
    const dup = (key: string) =>
      duplicateKeyBody({ errno: 1062, code: 'ER_DUP_ENTRY', sqlMessage: `Duplicate entry 'x' for key '${key}'` }).fields
    expect(Object.keys(dup('materials_name_unique')!)).toEqual(['name'])
    expect(Object.keys(dup('arrays_code_unique')!)).toEqual(['code'])
    expect(Object.keys(dup('arrays_chip_position_uq')!)).toEqual(['position'])
    expect(Object.keys(dup('users_email_unique')!)).toEqual(['email'])
    expect(Object.keys(duplicateKeyBody({ errno: 1062, sqlMessage: 'Duplicate entry' }).fields!)).toEqual(['_'])
  })
})
