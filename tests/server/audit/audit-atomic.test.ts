import { describe, it, expect, beforeAll, afterAll, afterEach, vi } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { and, eq, like, sql } from 'drizzle-orm'
import { startTestApp, signedInAs } from '../helpers'
import { makeChip, makeWafer, uid, disk } from '../inventory-helpers'
import { makeLaserSetup, makeSample, sessionBody } from '../measurements/fixtures-measurements'
import { arrays, auditLog, chips, materials, measurementSessions, wafers } from '../../../server/db/schema/index'
import type { AuditEntry } from '../../../server/services/audit/audit'

/**
 * "A failed write leaves neither the change nor its audit row." The audit module is wrapped so a
 * test can make one chosen audit insert throw, in the middle of a service's transaction.
 */
const failing = vi.hoisted(() => ({ when: null as null | ((e: AuditEntry, n: number) => boolean), calls: 0 }))
vi.mock('../../../server/services/audit/audit', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../../server/services/audit/audit')>()
  return {
    ...real,
    writeAudit: async (tx: Parameters<typeof real.writeAudit>[0], entry: AuditEntry) => {
      failing.calls += 1
      if (failing.when?.(entry, failing.calls)) throw new Error('simulated audit failure')
      return real.writeAudit(tx, entry)
    },
  }
})
const failOn = (when: (e: AuditEntry, n: number) => boolean) => {
  failing.calls = 0
  failing.when = when
}
afterEach(() => {
  failing.when = null
})

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let optics: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

const auditCount = async (entity: string, entityId: number) =>
  Number(
    (
      await t.db
        .select({ n: sql<number>`count(*)` })
        .from(auditLog)
        .where(and(eq(auditLog.entity, entity), eq(auditLog.entityId, entityId)))
    )[0].n,
  )

describe('a failed write leaves neither the change nor its audit row', () => {
  it('dicing 3 chips, the 2nd audit insert fails → no chip rows, no chip audit rows', async () => {
    const { wafer } = await makeWafer(fab)
    failOn((e, n) => e.entity === 'chip' && n === 2)
    const res = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 3, widthMm: 5, heightMm: 5 })
    expect(res.status).toBe(500)
    expect(await t.db.select().from(chips).where(eq(chips.waferId, wafer.id))).toEqual([])
    const chipAudits = await t.db
      .select()
      .from(auditLog)
      .where(
        and(
          eq(auditLog.entity, 'chip'),
          sql`JSON_VALUE(${auditLog.changes}, '$.code.to') LIKE ${`C-${wafer.code.slice(2)}-%`}`,
        ),
      )
    expect(chipAudits).toEqual([])
    failing.when = null
    const ok = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 3, widthMm: 5, heightMm: 5 })
    expect(ok.body.chips.map((c: { code: string }) => c.code.slice(-2))).toEqual(['01', '02', '03'])
  })

  it('a wafer update that fails validation changes nothing and writes no audit row', async () => {
    const { wafer, material } = await makeWafer(fab)
    const before = await auditCount('wafer', wafer.id)
    const body = {
      materialId: material.id,
      cutNormal: [0, 0, 1],
      flatDirection: [0, 0, 1],
      diameterMm: 50.8,
      thicknessUm: 100,
      lot: wafer.lot,
      notes: 'should not stick',
    }
    const res = await fab.patch(`/api/wafers/${wafer.id}`).send(body)
    expect(res.status).toBe(400)
    expect(res.body.fields).toHaveProperty('flatDirection')
    const bad = await fab
      .patch(`/api/wafers/${wafer.id}`)
      .send({ ...body, flatDirection: [1, -1, 0], materialId: 999999999 })
    expect(bad.body.fields).toHaveProperty('materialId')
    const [row] = await t.db.select().from(wafers).where(eq(wafers.id, wafer.id))
    expect([row.thicknessUm, row.notes]).toEqual([350, null])
    expect(await auditCount('wafer', wafer.id)).toBe(before)
  })

  it('a wafer update or retire whose audit insert fails leaves the wafer as it was', async () => {
    const { wafer, material } = await makeWafer(fab)
    failOn((e) => e.entity === 'wafer' && e.entityId === wafer.id)
    const up = await fab.patch(`/api/wafers/${wafer.id}`).send({
      materialId: material.id,
      cutNormal: [0, 0, 1],
      flatDirection: [1, -1, 0],
      diameterMm: 50.8,
      thicknessUm: 120,
      lot: wafer.lot,
      notes: 'x',
    })
    expect(up.status).toBe(500)
    expect((await fab.post(`/api/wafers/${wafer.id}/retire`).send({ reason: 'cracked' })).status).toBe(500)
    const [row] = await t.db.select().from(wafers).where(eq(wafers.id, wafer.id))
    expect([row.thicknessUm, row.notes, row.status]).toEqual([350, null, 'in_stock'])
    expect(await auditCount('wafer', wafer.id)).toBe(1)
  })

  it('a material or array create whose audit insert fails leaves no row', async () => {
    const name = `Atomic GaAs ${uid()}`
    failOn((e) => e.entity === 'material')
    expect(
      (await fab.post('/api/materials').send({ name, formula: 'GaAs', pointGroup: '-43m', coefficients: [] })).status,
    ).toBe(500)
    expect(await t.db.select().from(materials).where(eq(materials.name, name))).toEqual([])
    failing.when = null
    const { chip } = await makeChip(fab)
    failOn((e) => e.entity === 'array')
    expect((await fab.post('/api/arrays').send(disk(chip.id, 'C3'))).status).toBe(500)
    expect(await t.db.select().from(arrays).where(eq(arrays.chipId, chip.id))).toEqual([])
  })

  it('a session with one bad array among several writes nothing; nor does one whose audit insert fails', async () => {
    const sample = await makeSample(t.db, { arrays: [{ position: 'B1' }, { position: 'B2' }] })
    const setup = await makeLaserSetup(t.db)
    const detector = `Atomic PMT ${uid()}`
    const count = async () =>
      Number(
        (
          await t.db
            .select({ n: sql<number>`count(*)` })
            .from(measurementSessions)
            .where(like(measurementSessions.detector, detector))
        )[0].n,
      )
    const bad = await optics
      .post('/api/sessions')
      .send(sessionBody(setup.id, [sample.arrays[0].id, 999999999, sample.arrays[1].id], { detector }))
    expect(bad.status).toBe(400)
    expect(bad.body.fields).toHaveProperty(['results.1.arrayId'])
    failOn((e) => e.entity === 'session')
    const res = await optics.post('/api/sessions').send(
      sessionBody(
        setup.id,
        sample.arrays.map((a) => a.id),
        { detector },
      ),
    )
    expect(res.status).toBe(500)
    expect(await count()).toBe(0)
    const results = (await t.db.execute(
      sql`SELECT count(*) AS n FROM session_results WHERE array_id IN (${sample.arrays[0].id}, ${sample.arrays[1].id})`,
    )) as unknown as [{ n: number }[]]
    expect(Number(results[0][0].n)).toBe(0)
    failing.when = null
    expect(
      (
        await optics.post('/api/sessions').send(
          sessionBody(
            setup.id,
            sample.arrays.map((a) => a.id),
            { detector },
          ),
        )
      ).status,
    ).toBe(201)
    expect(await count()).toBe(1)
  })
})
