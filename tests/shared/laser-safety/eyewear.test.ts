import { describe, it, expect } from 'vitest'
import {
  en207Labels,
  en207ModeFor,
  en207ScaleNumbers,
  en208ScaleNumber,
  requiredOpticalDensity,
  circleAreaM2,
  ocularMpeIrradiance,
} from '../../../shared/laser-safety'

describe('EN 207 scale numbers (EN 207:2017 Annex B via public summaries; docs/laser-safety.md §7)', () => {
  // Published cross-check: nanoy42 lasersafety docs, from the UCC Laser Safety Guidelines [V].
  it('UCC cross-check: 800 nm, 4.5 µJ, 200 kHz, 200 fs, 3 mm → D LB5, M LB6', () => {
    const req = en207ScaleNumbers({
      wavelengthNm: 800,
      averagePowerW: 4.5e-6 * 200e3,
      beamDiameterMm: 3,
      pulse: { durationS: 200e-15, repetitionRateHz: 200e3 },
    })
    expect(req.map((r) => [r.mode, r.lb.value])).toEqual([
      ['D', 5],
      ['M', 6],
    ])
    expect(req.map((r) => r.label)).toEqual(['D 800 LB5', 'M 800 LB6'])
  })

  it('mode letters by pulse length: D > 0.25 s, I 1 µs–0.25 s, R 1 ns–1 µs, M < 1 ns', () => {
    expect([1, 1e-3, 1e-6, 10e-9, 1e-9, 100e-15].map(en207ModeFor)).toEqual(['D', 'I', 'I', 'R', 'R', 'M'])
  })

  it('D number for CW: log10(E) − 1, rounded up (an exact limit is allowed)', () => {
    // E = 10⁴ W/m² exactly → log10(E) − 1 = 3 → LB3, not LB4.
    const p = 1e4 * circleAreaM2(2)
    expect(en207ScaleNumbers({ wavelengthNm: 1064, averagePowerW: p, beamDiameterMm: 2 })[0]!.lb.value).toBe(3)
    expect(en207ScaleNumbers({ wavelengthNm: 1064, averagePowerW: p * 1.01, beamDiameterMm: 2 })[0]!.lb.value).toBe(4)
  })

  it('beyond 1400 nm the D number is log10(E) − 3', () => {
    const p = 1e6 * circleAreaM2(2)
    expect(en207ScaleNumbers({ wavelengthNm: 1550, averagePowerW: p, beamDiameterMm: 2 })[0]!.rawScale).toBeCloseTo(
      3,
      9,
    )
  })

  it("ns pulses use I/R: log10(H'/5) + 3 with H' = H·N^(1/4)", () => {
    const req = en207ScaleNumbers({
      wavelengthNm: 532,
      averagePowerW: 1,
      beamDiameterMm: 2,
      pulse: { durationS: 10e-9, repetitionRateHz: 10 },
    })
    const h = 0.1 / circleAreaM2(2)
    expect(req[1]!.mode).toBe('R')
    expect(req[1]!.rawScale).toBeCloseTo(Math.log10((h * 100 ** 0.25) / 5) + 3, 9)
  })

  it('combines modes with equal numbers into one label: 25 W at 800 nm, 80 MHz, 100 fs, 2 mm → DM 800 LB6', () => {
    // D: log10(7.96×10⁶) − 1 = 5.90; M: 5.05; both round up to LB6.
    const req = en207ScaleNumbers({
      wavelengthNm: 800,
      averagePowerW: 25,
      beamDiameterMm: 2,
      pulse: { durationS: 100e-15, repetitionRateHz: 80e6 },
    })
    expect(req.map((r) => r.lb.value)).toEqual([6, 6])
    expect(en207Labels(800, req)).toEqual(['DM 800 LB6'])
  })

  it('beams under 1 mm are evaluated over the 1 mm reference diameter (parameter)', () => {
    const small = en207ScaleNumbers({ wavelengthNm: 1064, averagePowerW: 1, beamDiameterMm: 0.2 })[0]!
    const ref = en207ScaleNumbers({ wavelengthNm: 1064, averagePowerW: 1, beamDiameterMm: 1 })[0]!
    expect(small.rawScale).toBeCloseTo(ref.rawScale, 12)
    const strict = en207ScaleNumbers({
      wavelengthNm: 1064,
      averagePowerW: 1,
      beamDiameterMm: 0.2,
      referenceDiameterMm: 0.2,
    })[0]!
    expect(strict.rawScale).toBeGreaterThan(ref.rawScale)
  })
})

describe('EN 208 alignment eyewear (EN 208:2009 Annex B via a public summary; docs/laser-safety.md §7)', () => {
  it('CW: RBn allows 10^(n−3) W; 5 mW → RB1, 10 mW → RB1, 11 mW → RB2, 100 W → RB5', () => {
    const rb = (w: number) => en208ScaleNumber({ wavelengthNm: 633, averagePowerW: w, beamDiameterMm: 1 }).rb.value
    expect([rb(5e-3), rb(0.01), rb(0.011), rb(100)]).toEqual([1, 1, 2, 5])
  })
  it('label form `RB2` (the wavelength is the line it belongs to)', () =>
    expect(en208ScaleNumber({ wavelengthNm: 633, averagePowerW: 0.05, beamDiameterMm: 1 }).label).toBe('RB2'))
  it('pulses of 1 ns–0.2 ms: RBn allows 2×10^(n−7) J with E·N^(1/4), N in 10 s', () => {
    // 1 Hz: N = 10; E = 2 µJ / 10^(1/4) exactly meets RB1.
    const e = 2e-6 / 10 ** 0.25
    const r = en208ScaleNumber({
      wavelengthNm: 532,
      averagePowerW: e,
      beamDiameterMm: 1,
      pulse: { durationS: 10e-9, repetitionRateHz: 1 },
    })
    expect(r.rb.value).toBe(1)
    expect(r.rb.formula).toContain('E₇·N^(1/4)')
  })
  it('only the power through 7 mm counts: a wide beam needs a lower RB', () => {
    const narrow = en208ScaleNumber({ wavelengthNm: 633, averagePowerW: 0.5, beamDiameterMm: 2 }).rb.value
    const wide = en208ScaleNumber({ wavelengthNm: 633, averagePowerW: 0.5, beamDiameterMm: 40 }).rb.value
    expect(wide).toBeLessThan(narrow)
  })
  it('outside 400–700 nm → OUTSIDE_TABLE', () =>
    expect(() => en208ScaleNumber({ wavelengthNm: 800, averagePowerW: 1e-3, beamDiameterMm: 1 })).toThrow(
      /wavelengthNm: .*ask the LSO/,
    ))
})

describe('required OD (common practice: OD = log10(exposure/MPE))', () => {
  it('CW beam smaller than 7 mm: OD = log10(Φ / (MPE·A_aperture))', () => {
    const r = requiredOpticalDensity({
      edition: 'IEC-60825-1:2014',
      wavelengthNm: 1064,
      averagePowerW: 5,
      beamDiameterMm: 3,
    })
    const mpe = ocularMpeIrradiance({ edition: 'IEC-60825-1:2014', wavelengthNm: 1064, durationS: 10 }).value
    expect(r.od.value).toBeCloseTo(Math.log10(5 / (mpe * circleAreaM2(7))), 12)
    expect(r.byRule.singlePulse).toBeUndefined()
  })
  it('amplified kHz system (docs/laser-safety.md §5: pulse limits matter there): the pulse-train rule governs, C5 = 5·(10⁴)^−0.25 = 0.5; OD is the maximum', () => {
    const r = requiredOpticalDensity({
      edition: 'IEC-60825-1:2014',
      wavelengthNm: 800,
      averagePowerW: 4,
      beamDiameterMm: 8,
      pulse: { durationS: 100e-15, repetitionRateHz: 1e3 },
    })
    const rules = [r.byRule.average!, r.byRule.singlePulse!, r.byRule.pulseTrain!]
    expect(r.od.value).toBeCloseTo(Math.max(...rules), 12)
    expect(r.check.limits!.trainFactor.value).toBeCloseTo(0.5, 12)
    expect(r.check.governing).toBe('pulseTrain')
    expect(r.byRule.average).toBeLessThan(r.byRule.singlePulse!)
  })
  it('never negative: a 1 µW beam needs OD 0', () =>
    expect(
      requiredOpticalDensity({ edition: 'EU-2006/25/EC', wavelengthNm: 633, averagePowerW: 1e-6, beamDiameterMm: 1 }).od
        .value,
    ).toBe(0))
})
