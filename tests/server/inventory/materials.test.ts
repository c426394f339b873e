import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { makeMaterial, uid } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent, optics: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

const coef = (component: string, valuePmV: number, wavelengthNm = 1064) => ({
  component,
  order: 2,
  valuePmV,
  wavelengthNm,
  source: 'test',
  isTypical: true,
})

describe('materials', () => {
  it('creates a material and shows the engine d-matrix form beside the numbers', async () => {
    const m = await makeMaterial(fab, {
      pointGroup: '3m',
      name: `LN ${uid()}`,
      coefficients: [coef('d33', 25.2), coef('d31', 4.6), coef('d22', 2.1)],
    })
    expect(m.code).toBeUndefined()
    const res = await optics.get(`/api/materials/${m.id}`)
    expect(res.status).toBe(200)
    // Class 3m in the IEEE Std 176 setting (mirror ⟂ x): d16 = d21 = −d22 (Nye; Boyd, Nonlinear Optics, Table 1.5.2)
    expect(res.body.dMatrix.rows[1]).toEqual(['d16', '−d16', '0', 'd15', '0', '0'])
    expect(res.body.dMatrix.equalities).toContain('d16 = d21 = −d22')
    expect(res.body.dMatrix.independent).toBe(4)
    expect(res.body.dMatrix.setting).toBe('IEEE Std 176 standard setting: 3m mirror ⟂ x')
    expect(res.body.coefficients).toHaveLength(3)
    expect(res.body.waferCount).toBe(0)
  })

  it('-43m has one element d14 = d25 = d36', async () => {
    const m = await makeMaterial(fab)
    const res = await fab.get(`/api/materials/${m.id}`)
    expect(res.body.dMatrix.equalities).toEqual(['d14 = d25 = d36'])
    expect(res.body.dMatrix.rows[0]).toEqual(['0', '0', '0', 'd14', '0', '0'])
  })

  it('rejects a χ(2) component the point group forbids, naming the group and the allowed ones', async () => {
    const res = await fab.post('/api/materials').send({
      name: `Bad ${uid()}`,
      formula: 'GaAs',
      pointGroup: '-43m',
      coefficients: [coef('d14', 100), coef('d33', 5)],
    })
    expect(res.status).toBe(400)
    expect(res.body.fields['coefficients.1.component'][0]).toMatch(
      /-43m.*forbids d33.*allowed components: d14, d25, d36/,
    )
  })

  it('rejects any χ(2) for a centrosymmetric class', async () => {
    const res = await fab
      .post('/api/materials')
      .send({ name: `Si ${uid()}`, formula: 'Si', pointGroup: 'm-3m', coefficients: [coef('d14', 1)] })
    expect(res.status).toBe(400)
    expect(res.body.fields['coefficients.0.component'][0]).toMatch(/centrosymmetric/)
  })

  it('rejects tied components with different values at the same wavelength (but not at different wavelengths)', async () => {
    const bad = await fab.post('/api/materials').send({
      name: `Tie ${uid()}`,
      formula: 'GaAs',
      pointGroup: '-43m',
      coefficients: [coef('d14', 100), coef('d36', 90)],
    })
    expect(bad.status).toBe(400)
    expect(bad.body.fields['coefficients.1.valuePmV'][0]).toMatch(/d14 = d25 = d36/)
    const ok = await fab.post('/api/materials').send({
      name: `Tie ${uid()}`,
      formula: 'GaAs',
      pointGroup: '-43m',
      coefficients: [coef('d14', 100), coef('d36', 90, 1550)],
    })
    expect(ok.status).toBe(201)
  })

  it('field-level 400s, 404, duplicate name, update with audit, retire needs a reason', async () => {
    expect((await fab.post('/api/materials').send({ name: '', pointGroup: 'x' })).body.fields).toHaveProperty(
      'pointGroup',
    )
    expect((await fab.get('/api/materials/999999')).status).toBe(404)
    const m = await makeMaterial(fab)
    expect((await fab.post('/api/materials').send({ ...m, id: undefined })).status).toBe(409)
    const up = await fab.patch(`/api/materials/${m.id}`).send({ ...m, bandGapEv: 1.43 })
    expect(up.status).toBe(200)
    expect(up.body.bandGapEv).toBe(1.43)
    expect((await fab.post(`/api/materials/${m.id}/retire`).send({})).body.fields).toHaveProperty('reason')
    const r = await fab.post(`/api/materials/${m.id}/retire`).send({ reason: 'duplicate entry' })
    expect(r.body.retiredAt).not.toBeNull()
    const list = await fab.get(`/api/materials?q=${encodeURIComponent(m.name)}`)
    expect(list.body.total).toBe(0)
    const all = await fab.get(`/api/materials?q=${encodeURIComponent(m.name)}&includeRetired=true`)
    expect(all.body.total).toBe(1)
  })
})
