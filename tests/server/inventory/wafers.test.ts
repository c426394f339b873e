import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { makeBox, makeMaterial, makeWafer, uid } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
})
afterAll(async () => {
  await t.stop()
})

describe('wafers', () => {
  it('registers a wafer with code W-NNNN and a Miller cut label for cubic classes', async () => {
    const { wafer } = await makeWafer(fab)
    expect(wafer.code).toMatch(/^W-\d{4}$/)
    expect(wafer.cutLabel).toBe('(001)')
    const { wafer: w111 } = await makeWafer(fab, { cutNormal: [1, 1, 1], flatDirection: [1, -1, 0] })
    expect(w111.cutLabel).toBe('(111)')
    expect(Number(w111.code.slice(2))).toBeGreaterThan(Number(wafer.code.slice(2)))
  })

  it('labels non-cubic cuts Z-cut / X-cut, else by the normal', async () => {
    const ln = { pointGroup: '3m', name: `LN ${uid()}`, coefficients: [] }
    expect((await makeWafer(fab, { cutNormal: [0, 0, 1], flatDirection: [1, 0, 0] }, ln)).wafer.cutLabel).toBe('Z-cut')
    expect(
      (await makeWafer(fab, { cutNormal: [1, 0, 0], flatDirection: [0, 0, 1] }, { ...ln, name: `LN ${uid()}` })).wafer
        .cutLabel,
    ).toBe('X-cut')
    expect(
      (await makeWafer(fab, { cutNormal: [1, 0, 1], flatDirection: [0, 1, 0] }, { ...ln, name: `LN ${uid()}` })).wafer
        .cutLabel,
    ).toBe('[101]')
  })

  it('field-level 400s: flat not in the surface, unknown material, bad location; 404', async () => {
    const m = await makeMaterial(fab)
    const base = {
      materialId: m.id,
      cutNormal: [0, 0, 1],
      flatDirection: [1, -1, 0],
      diameterMm: 50.8,
      thicknessUm: 350,
      lot: 'X',
    }
    expect((await fab.post('/api/wafers').send({ ...base, flatDirection: [0, 0, 1] })).body.fields).toHaveProperty(
      'flatDirection',
    )
    expect((await fab.post('/api/wafers').send({ ...base, materialId: 999999 })).body.fields).toHaveProperty(
      'materialId',
    )
    expect((await fab.post('/api/wafers').send({ ...base, locationId: 999999 })).body.fields).toHaveProperty(
      'locationId',
    )
    expect((await fab.get('/api/wafers/999999')).status).toBe(404)
  })

  it('lists with filter, search and paging; detail has chips; update and retire with reason', async () => {
    const { box } = await makeBox(fab)
    const lot = `LOT-${uid()}`
    const { wafer, material } = await makeWafer(fab, { lot, locationId: box.id })
    expect(wafer.location.path).toMatch(/ › Cabinet 1 › Box 1$/)
    await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 2, widthMm: 5, heightMm: 5 })
    const list = await fab.get(`/api/wafers?q=${lot}&materialId=${material.id}&sort=lot&dir=desc&pageSize=5`)
    expect(list.body).toMatchObject({ total: 1, page: 1, pageSize: 5 })
    expect(list.body.rows[0].chipCount).toBe(2)
    const detail = await fab.get(`/api/wafers/${wafer.id}`)
    expect(detail.body.chips.map((c: { code: string }) => c.code)).toEqual([
      `C-${wafer.code.slice(2)}-01`,
      `C-${wafer.code.slice(2)}-02`,
    ])
    const up = await fab.patch(`/api/wafers/${wafer.id}`).send({ ...base(wafer), thicknessUm: 340 })
    expect(up.status).toBe(200)
    expect(up.body.thicknessUm).toBe(340)
    expect((await fab.post(`/api/wafers/${wafer.id}/retire`).send({ reason: '' })).body.fields).toHaveProperty('reason')
    expect((await fab.post(`/api/wafers/${wafer.id}/retire`).send({ reason: 'broke in half' })).body.status).toBe(
      'retired',
    )
    expect((await fab.get(`/api/wafers?q=${lot}`)).body.total).toBe(0)
    expect((await fab.get(`/api/wafers?q=${lot}&status=retired`)).body.total).toBe(1)
  })
})

function base(w: {
  material: { id: number }
  cutNormal: number[]
  flatDirection: number[]
  diameterMm: number
  thicknessUm: number
  lot: string
  location: { id: number } | null
}) {
  return {
    materialId: w.material.id,
    cutNormal: w.cutNormal,
    flatDirection: w.flatDirection,
    diameterMm: w.diameterMm,
    thicknessUm: w.thicknessUm,
    lot: w.lot,
    locationId: w.location?.id ?? null,
  }
}
