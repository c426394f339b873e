import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { disk, makeChip, makeWafer } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
})
afterAll(async () => {
  await t.stop()
})

describe('chips and fab steps', () => {
  it('dices several chips in one go; numbering continues after existing chips', async () => {
    const { wafer } = await makeWafer(fab)
    const n = wafer.code.slice(2)
    const a = await fab
      .post(`/api/wafers/${wafer.id}/dice`)
      .send({ count: 3, widthMm: 5, heightMm: 5, rotationDeg: 45 })
    expect(a.status).toBe(201)
    expect(a.body.chips.map((c: { code: string }) => c.code)).toEqual([`C-${n}-01`, `C-${n}-02`, `C-${n}-03`])
    expect(a.body.chips[0].rotationDeg).toBe(45)
    const b = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 2, widthMm: 5, heightMm: 5 })
    expect(b.body.chips.map((c: { index: number }) => c.index)).toEqual([4, 5])
  })

  it('dicing is all-or-nothing: index overflow or a bad location writes nothing', async () => {
    const { wafer } = await makeWafer(fab)
    await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 95, widthMm: 1, heightMm: 1 })
    const over = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 5, widthMm: 1, heightMm: 1 })
    expect(over.status).toBe(400)
    expect(over.body.fields.count[0]).toMatch(/at most 4 more/)
    const badLoc = await fab
      .post(`/api/wafers/${wafer.id}/dice`)
      .send({ count: 2, widthMm: 1, heightMm: 1, locationId: 999999 })
    expect(badLoc.body.fields).toHaveProperty('locationId')
    expect((await fab.get(`/api/wafers/${wafer.id}`)).body.chipCount).toBe(95)
    expect(
      (await fab.post('/api/wafers/999999/dice').send({ count: 1, widthMm: 1, heightMm: 1 })).body.fields,
    ).toHaveProperty('waferId')
  })

  it('update is audited; rotating a chip with arrays needs a reason; retire needs a reason', async () => {
    const { chip } = await makeChip(fab)
    expect((await fab.patch(`/api/chips/${chip.id}`).send({ notes: 'edge chipped' })).body.notes).toBe('edge chipped')
    expect((await fab.patch(`/api/chips/${chip.id}`).send({ status: 'in_process' })).body.notes).toBe('edge chipped')
    expect((await fab.patch(`/api/chips/${chip.id}`).send({ widthMm: 0 })).body.fields).toHaveProperty('widthMm')
    await fab.post('/api/arrays').send(disk(chip.id))
    const noReason = await fab.patch(`/api/chips/${chip.id}`).send({ rotationDeg: 90 })
    expect(noReason.status).toBe(400)
    expect(noReason.body.fields).toHaveProperty('reason')
    expect(
      (await fab.patch(`/api/chips/${chip.id}`).send({ rotationDeg: 90, reason: 'remeasured against the flat' })).body
        .rotationDeg,
    ).toBe(90)
    expect((await fab.post(`/api/chips/${chip.id}/retire`).send({})).body.fields).toHaveProperty('reason')
    expect((await fab.post(`/api/chips/${chip.id}/retire`).send({ reason: 'lost' })).body.status).toBe('retired')
    expect((await fab.get('/api/chips/999999')).status).toBe(404)
  })

  it('records fab steps with the signed-in operator; detail includes arrays and steps', async () => {
    const { chip, wafer } = await makeChip(fab)
    const s = await fab.post(`/api/chips/${chip.id}/fab-steps`).send({
      kind: 'exposure',
      params: { doseUcPerCm2: 220, tool: 'EBL 100 kV' },
      performedAt: '2025-06-01T10:00:00Z',
    })
    expect(s.status).toBe(201)
    expect(s.body.operator.name).toBe('Tomasz Lindqvist')
    expect(
      (await fab.post(`/api/chips/${chip.id}/fab-steps`).send({ kind: 'bake', performedAt: 'x' })).body.fields,
    ).toHaveProperty('kind')
    expect(
      (await fab.post(`/api/chips/${chip.id}/fab-steps`).send({ kind: 'etch', performedAt: '2999-01-01T00:00:00Z' }))
        .body.fields,
    ).toHaveProperty('performedAt')
    expect((await fab.get('/api/chips/999999/fab-steps')).status).toBe(404)
    await fab.post('/api/arrays').send(disk(chip.id))
    const d = await fab.get(`/api/chips/${chip.id}`)
    expect(d.body.fabSteps).toHaveLength(1)
    expect(d.body.arrays[0].code).toBe(`A-${chip.code.slice(2)}-A1`)
    expect(d.body.wafer.code).toBe(wafer.code)
    const list = await fab.get(`/api/chips?parentId=${wafer.id}`)
    expect(list.body.total).toBe(1)
  })
})

describe('dicing within the wafer', () => {
  it('more chips than a wafer holds, or a chip larger than it, is refused on the field; nothing is cut', async () => {
    const { wafer } = await makeChip(fab)
    const big = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 1, widthMm: 60, heightMm: 60 })
    expect(big.status).toBe(400)
    expect(big.body.fields.widthMm[0]).toMatch(/does not fit a 50.8 mm wafer/)
    const many = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 90, widthMm: 5, heightMm: 5 })
    expect(many.status).toBe(400)
    expect(many.body.fields.count[0]).toMatch(/holds at most \d+ chips of 5 × 5 mm .*with the 1 already cut/)
    const chipsNow = (await fab.get(`/api/wafers/${wafer.id}`)).body.chips
    expect(chipsNow).toHaveLength(1)
  })
})
