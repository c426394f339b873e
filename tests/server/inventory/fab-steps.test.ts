import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { fabSteps } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makeChip } from '../inventory-helpers'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let chipId: number
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  chipId = (await makeChip(fab)).chip.id
})
afterAll(async () => {
  await t.stop()
})

const when = '2025-06-01T10:00:00Z'
const step = (kind: string, params: object) =>
  fab.post(`/api/chips/${chipId}/fab-steps`).send({ kind, params, performedAt: when })
const stepCount = async () => (await fab.get(`/api/chips/${chipId}/fab-steps`)).body.length as number

describe('fab step parameters: per kind, with units, in physical range', () => {
  it('stores the parameters of each kind, numbers as numbers', async () => {
    const resist = await step('resist', {
      resist: 'positive e-beam resist',
      spinRpm: '4000',
      spinTimeS: 60,
      thicknessNm: 300,
      bakeTempC: 180,
      bakeTimeS: 120,
    })
    expect(resist.status, JSON.stringify(resist.body)).toBe(201)
    // A plain decimal string is the number it spells.
    expect(resist.body.params).toMatchObject({ spinRpm: 4000, bakeTempC: 180 })
    const exposure = await step('exposure', {
      tool: 'EBL 100 kV',
      accelerationKv: 100,
      doseUcPerCm2: 220,
      beamCurrentNa: 2,
      stepNm: 2,
    })
    expect(exposure.status, JSON.stringify(exposure.body)).toBe(201)
    const etch = await step('etch', {
      process: 'ICP',
      gas: 'Cl2/Ar',
      rfPowerW: 100,
      icpPowerW: 400,
      pressureMtorr: 5,
      timeS: 95,
      depthNm: 300,
    })
    expect(etch.status, JSON.stringify(etch.body)).toBe(201)
    const other = await step('other', { 'plasma clean': 'O2 30 s', cycles: 3 })
    expect(other.status, JSON.stringify(other.body)).toBe(201)
  })

  it('a parameter without a name is a 400 on that parameter, never dropped', async () => {
    const before = await stepCount()
    const nameless = await step('resist', { '': 4000, spinTimeS: 60 })
    expect(nameless.status).toBe(400)
    expect(nameless.body.fields['params.']).toEqual([expect.stringMatching(/no name/)])
    const blank = await step('other', { '  ': 'O2 plasma' })
    expect(blank.status).toBe(400)
    expect(blank.body.fields['params.  ']).toEqual([expect.stringMatching(/no name/)])
    expect(await stepCount()).toBe(before)
  })

  it("a parameter the kind does not have is a 400 that lists the kind's parameters", async () => {
    const res = await step('etch', { spinRpm: 4000, timeS: 60 })
    expect(res.status).toBe(400)
    expect(res.body.fields['params.spinRpm'][0]).toMatch(/not a parameter of an etch step/i)
    expect(res.body.fields['params.spinRpm'][0]).toMatch(/RF power/)
    expect(res.body.fields).not.toHaveProperty(['params.timeS'])
  })

  it('a value out of physical range is a 400 with the unit', async () => {
    // Spin coaters turn at up to about 10 000 rpm; hot-plate resist bakes are 90–250 °C
    // (M. J. Madou, Fundamentals of Microfabrication and Nanotechnology, 3rd ed., CRC 2011, vol. II, ch. 1, spin
    // coating and soft bake).
    const res = await step('resist', { spinRpm: 400000, bakeTempC: 1800, bakeTimeS: -5 })
    expect(res.status).toBe(400)
    expect(res.body.fields['params.spinRpm']).toEqual(['At most 12\u00a0000 rpm'])
    expect(res.body.fields['params.bakeTempC']).toEqual(['At most 400 °C'])
    expect(res.body.fields['params.bakeTimeS']).toEqual(['At least 1 s'])
    // Electron-beam resist doses: ~1–10 000 µC/cm² (PMMA ~100–1000, HSQ up to several thousand; Madou vol. II, ch. 2,
    // e-beam lithography).
    const dose = await step('exposure', { doseUcPerCm2: 0 })
    expect(dose.body.fields['params.doseUcPerCm2'][0]).toMatch(/At least .* µC\/cm²/)
    const notNumber = await step('etch', { rfPowerW: '100 W' })
    expect(notNumber.body.fields['params.rfPowerW']).toEqual(['Enter a number in W'])
    const emptyText = await step('etch', { gas: '' })
    expect(emptyText.body.fields['params.gas'][0]).toMatch(/Enter the gas/)
    const textAsNumber = await step('etch', { gas: 42 })
    expect(textAsNumber.body.fields).toHaveProperty(['params.gas'])
  })

  it('old rows with free-form parameters still list as they were stored', async () => {
    const [{ id }] = await t.db
      .insert(fabSteps)
      .values({
        chipId,
        kind: 'resist',
        params: { 'spin rpm': '4000 rpm', oddName: 3 },
        operatorId: 1,
        performedAt: new Date(when),
      })
      .$returningId()
    const listed = (await fab.get(`/api/chips/${chipId}/fab-steps`)).body.find((s: { id: number }) => s.id === id)
    expect(listed.params).toEqual({ 'spin rpm': '4000 rpm', oddName: 3 })
  })
})
