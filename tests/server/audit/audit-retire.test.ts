import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { makeChip, makeMaterial, makeWafer, uid, disk } from '../inventory-helpers'

/** Retiring any record kind needs a reason (400 on `reason`), and the reason lands in its audit row. */
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let safety: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  safety = await signedInAs(t.app, 'safety_officer')
})
afterAll(async () => {
  await t.stop()
})

const KINDS: { entity: string; path: string; make: () => Promise<{ id: number; agent: TestAgent }> }[] = [
  { entity: 'material', path: 'materials', make: async () => ({ id: (await makeMaterial(fab)).id, agent: fab }) },
  {
    entity: 'location',
    path: 'locations',
    make: async () => ({
      id: (await fab.post('/api/locations').send({ kind: 'room', name: `Room ${uid()}` })).body.id,
      agent: fab,
    }),
  },
  { entity: 'wafer', path: 'wafers', make: async () => ({ id: (await makeWafer(fab)).wafer.id, agent: fab }) },
  { entity: 'chip', path: 'chips', make: async () => ({ id: (await makeChip(fab)).chip.id, agent: fab }) },
  {
    entity: 'array',
    path: 'arrays',
    make: async () => ({
      id: (await fab.post('/api/arrays').send(disk((await makeChip(fab)).chip.id))).body.id,
      agent: fab,
    }),
  },
  {
    entity: 'laser_setup',
    path: 'laser-setups',
    make: async () => ({
      id: (
        await safety
          .post('/api/laser-setups')
          .send({ name: `Bench ${uid()}`, room: 'B2.14', sourceType: 'cw', wavelengthsNm: [1064] })
      ).body.id,
      agent: safety,
    }),
  },
]

describe('retire needs a reason, kept in the audit trail', () => {
  for (const k of KINDS) {
    it(`${k.entity}: no / blank reason → 400 fields.reason; with a reason → audit row "retire" with it`, async () => {
      const { id, agent } = await k.make()
      expect(id).toBeGreaterThan(0)
      for (const body of [{}, { reason: '' }, { reason: '   ' }]) {
        const res = await agent.post(`/api/${k.path}/${id}/retire`).send(body)
        expect([res.status, Object.keys(res.body.fields ?? {})]).toEqual([400, ['reason']])
      }
      expect(
        (await agent.get(`/api/audit/records/${k.entity}/${id}`)).body.map((r: { action: string }) => r.action),
      ).not.toContain('retire')
      const why = `retired in test ${uid()}`
      expect((await agent.post(`/api/${k.path}/${id}/retire`).send({ reason: why })).status).toBe(200)
      const [last] = (await agent.get(`/api/audit/records/${k.entity}/${id}`)).body
      expect(last).toMatchObject({ action: 'retire', reason: why })
    })
  }
})
