import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
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
  order: 2,
  incidence: { angleDeg: 45, detect: 'reflection' },
  stepDeg: 15,
  fresnel: false,
}

describe('POST /api/polar', () => {
  it('computes the (001) zinc-blende p-in/p-out pattern at 45° (∝ sin²2φ: Stehlin et al., Opt. Lett. 13, 389 (1988))', async () => {
    const agent = await signedInAs(t.app, 'optics_staff')
    const res = await agent.post('/api/polar').send({ ...zincBlende001, pump: 'p', analyser: 'p' })
    expect(res.status).toBe(200)
    expect(res.body.harmonics).toEqual([0, 4])
    expect(res.body.points).toHaveLength(24)
    expect(res.body.points[3]).toEqual({ azimuthDeg: 45, intensity: 1 })
    expect(res.body.points[0].intensity).toBe(0)
    expect(res.body.coefficients).toEqual({ bulk: { xyz: 1 } })
  })

  it('answers a surface-only sample (no crystal)', async () => {
    const agent = await signedInAs(t.app, 'fab_technician')
    const res = await agent.post('/api/polar').send({
      surface: true,
      crystal: null,
      order: 2,
      incidence: { angleDeg: 60 },
      pump: 'p',
      analyser: 'p',
      stepDeg: 90,
    })
    expect(res.status).toBe(200)
    expect(res.body.harmonics).toEqual([0])
  })

  it('answers bad input with a field-level 400', async () => {
    const agent = await signedInAs(t.app, 'fab_technician')
    const res = await agent.post('/api/polar').send({ ...zincBlende001, pump: 'x' })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields)).toEqual(['pump'])
    const res2 = await agent.post('/api/polar').send({ ...zincBlende001, fresnel: { n: [3.9, -1] } })
    expect(res2.status).toBe(400)
    expect(Object.keys(res2.body.fields)).toEqual(['fresnel.n'])
    const res3 = await agent.post('/api/polar').send({ ...zincBlende001, crystal: undefined })
    expect(res3.status).toBe(400)
    expect(res3.body.fields.crystal[0]).toMatch(/unless surface is true/)
  })

  it('needs a signed-in user', async () => {
    const res = await request(t.app)
      .post('/api/polar')
      .send({ ...zincBlende001, pump: 'p', analyser: 'p' })
    expect(res.status).toBe(401)
  })
})
