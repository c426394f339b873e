import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { disk, makeBox, makeChip } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent, safety: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  safety = await signedInAs(t.app, 'safety_officer')
})
afterAll(async () => {
  await t.stop()
})

describe('resolve', () => {
  it('resolves wafer, chip, array and location codes in any case, for any signed-in person', async () => {
    const { chip, wafer } = await makeChip(fab)
    const arr = (await fab.post('/api/arrays').send(disk(chip.id))).body
    const { box } = await makeBox(fab)
    expect((await safety.get(`/api/resolve/${wafer.code.toLowerCase()}`)).body).toMatchObject({
      kind: 'wafer',
      id: wafer.id,
      code: wafer.code,
      to: `/wafers/${wafer.id}`,
    })
    expect((await safety.get(`/api/resolve/${chip.code}`)).body).toMatchObject({
      kind: 'chip',
      to: `/chips/${chip.id}`,
    })
    expect((await safety.get(`/api/resolve/${arr.code.toLowerCase()}`)).body).toMatchObject({
      kind: 'array',
      to: `/arrays/${arr.id}`,
    })
    const loc = (await safety.get(`/api/resolve/${box.code}`)).body
    expect(loc).toMatchObject({ kind: 'location', to: `/locations/${box.id}` })
    expect(loc.label).toContain('Box 1')
  })

  it('404 with a clear message; 401 when signed out', async () => {
    const res = await fab.get('/api/resolve/W-99999')
    expect(res.status).toBe(404)
    expect(res.body.message).toMatch(/No record has the code W-99999/)
    expect((await request(t.app).get('/api/resolve/W-0001')).status).toBe(401)
  })
})
