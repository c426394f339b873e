import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { eq, sql } from 'drizzle-orm'
import { startTestApp, signedInAs } from './helpers'
import { disk, makeChip } from './inventory-helpers'
import { plainRows } from '../../server/db/plain-rows'
import { arrays, chips } from '../../server/db/schema/index'

let a: Awaited<ReturnType<typeof startTestApp>>
let fabA: TestAgent
beforeAll(async () => {
  a = await startTestApp()
  fabA = await signedInAs(a.app, 'fab_technician')
})
afterAll(async () => {
  await a.stop()
})

describe('plainRows', () => {
  it('gives keyed rows like Drizzle: JSON decoded, dates as Date, same-named columns of two tables apart', async () => {
    const { chip } = await makeChip(fabA)
    const made = await fabA.post('/api/arrays').send(disk(chip.id, 'C3'))
    expect(made.status).toBe(201)
    const fields = {
      id: arrays.id,
      code: arrays.code,
      chipCode: chips.code,
      dims: arrays.dimensionsNm,
      mirrors: arrays.customMirrors,
      createdAt: arrays.createdAt,
      one: sql<number>`1`,
    }
    const build = (f: Record<keyof typeof fields, unknown>) =>
      a.db
        .select(f as typeof fields)
        .from(arrays)
        .innerJoin(chips, eq(chips.id, arrays.chipId))
        .where(eq(arrays.id, made.body.id))
    const [plain] = await plainRows(a.db, fields, build as never)
    const [drizzled] = await a.db
      .select(fields)
      .from(arrays)
      .innerJoin(chips, eq(chips.id, arrays.chipId))
      .where(eq(arrays.id, made.body.id))
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
