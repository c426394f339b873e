import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { LASER_CAUTION } from '../../../shared/safety'

let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

const unique = (s: string) => `${s} ${Date.now()}-${Math.floor(Math.random() * 1e6)}`
const create = async (over: Record<string, unknown>) => {
  const res = await optics
    .post('/api/laser-setups')
    .send({ name: unique('Figures bench'), room: 'B2.14', sourceType: 'cw', wavelengthsNm: [532], ...over })
  expect(res.status).toBe(201)
  return res.body.id as number
}
type Line = {
  wavelengthNm: number
  exposureDurationS: number
  mpe: { value: number } | null
  en208: unknown
  od: { value: number } | null
  classHint: { value: string } | null
  limitingRule: string
}
const lineOf = (body: { computed: { wavelengths: Line[] } }, nm: number) =>
  body.computed.wavelengths.find((w) => Math.round(w.wavelengthNm) === nm)!

describe('GET /api/laser-setups/:id figures', () => {
  // Health Physics Society list, "RE: Laser calculations" (June 2000): visible beam, t = 0.25 s,
  // ANSI Z136.1 Table 5: MPE = 1.8·t^0.75 mJ/cm² / t = 2.5 mW/cm² (25.46 W/m²).
  it('exposureS=0.25 recomputes the visible line and is echoed; the 1064 nm line stays at 10 s with a message', async () => {
    const id = await create({ wavelengthsNm: [532, 1064], maxAvgPowerMw: 50, beamDiameterMm: 2 })
    const res = await optics.get(`/api/laser-setups/${id}?exposureS=0.25`)
    expect(res.status).toBe(200)
    expect(res.body.caution).toBe(LASER_CAUTION)
    expect(res.body.computed.exposureDurationS).toBe(0.25)
    expect(lineOf(res.body, 532)).toMatchObject({ exposureDurationS: 0.25 })
    expect(lineOf(res.body, 532).mpe!.value).toBeCloseTo(25.46, 1)
    expect(lineOf(res.body, 1064).exposureDurationS).toBe(10)
    expect(res.body.computed.exposureNotes.join(' ')).toMatch(/1064 nm is not visible/)
    const def = await optics.get(`/api/laser-setups/${id}`)
    expect(def.body.computed.exposureDurationS).toBe(10)
    // IEC 60825-1:2014 Table A.1, 400–700 nm: 18·t^0.75 J/m² up to 10 s (10.1 W/m² at 10 s), 10 W/m²
    // from 10 s; at the 10 s boundary the lower (more protective) 10 W/m² is taken.
    expect(lineOf(def.body, 532).mpe!.value).toBeCloseTo(10, 6)
  })

  it('exposureS out of range or not a number → 400 with a field message', async () => {
    const id = await create({ maxAvgPowerMw: 1 })
    for (const bad of ['40000', 'abc', '0']) {
      const res = await optics.get(`/api/laser-setups/${id}?exposureS=${bad}`)
      expect(res.status).toBe(400)
      expect(res.body.fields.exposureS?.[0]).toBeTruthy()
    }
  })

  // EN 208:2009 Table B.1 (laserveiligheid.com/EN208.php): CW RBn up to 10^(n−3) W through 7 mm; 50 mW → RB2.
  it('EN 208 for visible lines as en208 { labels, scale }, like en207; none for 1064 nm', async () => {
    const id = await create({ wavelengthsNm: [532, 1064], maxAvgPowerMw: 50, beamDiameterMm: 2 })
    const res = await optics.get(`/api/laser-setups/${id}`)
    expect(lineOf(res.body, 532).en208).toMatchObject({
      labels: ['RB2'],
      scale: [{ value: 2, unit: 'RB', source: 'EN 208:2009 Annex B (Table B.1)' }],
    })
    expect(lineOf(res.body, 1064).en208).toBeNull()
    expect(res.body.computed.wavelengths[0].en207).toMatchObject({
      labels: expect.any(Array),
      scale: expect.any(Array),
    })
  })

  // IEC 60825-1:2014 4.3 f requirement 1: a single pulse is judged by the single-pulse limits.
  // 532 nm, 10 ns, 1 mJ: MPE 2×10⁻³ J/m² (IEC 60825-1:2014 Table A.1); H = 1 mJ / A(7 mm) = 26 J/m² → OD 4.1.
  it('a single-pulse source (no repetition rate) gets MPE, OD and class hint', async () => {
    const id = await create({ sourceType: 'pulsed', pulseDurationFs: 10e6, pulseEnergyUj: 1000, beamDiameterMm: 2 })
    const res = await optics.get(`/api/laser-setups/${id}`)
    expect(res.body.computed.missing).toEqual([])
    expect(res.body.computed.isSinglePulse).toBe(true)
    const w = lineOf(res.body, 532)
    expect(w.limitingRule).toBe('singlePulse')
    expect(w.mpe!.value).toBeCloseTo(2e-3, 9)
    expect(w.od!.value).toBeCloseTo(4.11, 2)
    expect(w.classHint!.value).toBe('3B') // 1 mJ < 30 mJ, the Class 3B single-pulse AEL (IEC 60825-1:2014 Table 8)
    expect(res.body.computed.classHint).toBe('3B')
  })
})
