import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { startTestApp, signedInAs } from './helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await t.stop()
})

const zincBlende001 = {
  crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
  surface: false,
  structure: { rotationOrder: 0, mirrors: [0, 90] },
  order: 2,
  lmax: 4,
  window: 8,
}

describe('POST /api/channels', () => {
  it('computes the (001) zinc-blende disk under circular pump (common practice: SH m ∈ {0, 4}, nothing along the normal)', async () => {
    const agent = await signedInAs(t.app, 'optics_staff')
    const res = await agent.post('/api/channels').send({ ...zincBlende001, pump: { type: 'circular', m: 1 } })
    expect(res.status).toBe(200)
    expect(res.body.q).toEqual([-2, 2])
    expect(res.body.m).toEqual([0, 4])
    expect(res.body.normalEmission).toMatchObject({ allowed: false, m: [] })
    expect(res.body.explain.length).toBeGreaterThan(0)
  })

  it('answers bad input with a field-level 400', async () => {
    const agent = await signedInAs(t.app, 'fab_technician')
    const res = await agent
      .post('/api/channels')
      .send({ ...zincBlende001, pump: { type: 'linear', angle: 'sideways' } })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields)[0]).toMatch(/^pump/)
    const res2 = await agent.post('/api/channels').send({
      ...zincBlende001,
      crystal: { ...zincBlende001.crystal, pointGroup: '7/m' },
      pump: { type: 'circular', m: 1 },
    })
    expect(res2.status).toBe(400)
    expect(Object.keys(res2.body.fields)[0]).toBe('crystal.pointGroup')
  })
})
