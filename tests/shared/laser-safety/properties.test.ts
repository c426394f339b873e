import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import {
  en207ScaleNumbers,
  en208ScaleNumber,
  ocularMpe,
  requiredOpticalDensity,
  MPE_EDITIONS,
  classHint,
} from '../../../shared/laser-safety'

const SEED = 20250605
const opts = { seed: SEED, numRuns: 200 }
const edition = fc.constantFrom(...MPE_EDITIONS)
const nm = fc.double({ min: 400, max: 1400, noNaN: true })
const power = fc.double({ min: 1e-6, max: 100, noNaN: true })
const pulse = fc.record({
  durationS: fc.double({ min: 1e-13, max: 1e-3, noNaN: true }),
  repetitionRateHz: fc.double({ min: 1, max: 1e8, noNaN: true }),
})

describe('invariants (fast-check, seeded)', () => {
  it('required OD is non-decreasing in average power', () => {
    fc.assert(
      fc.property(
        edition,
        nm,
        power,
        fc.double({ min: 1, max: 100, noNaN: true }),
        fc.double({ min: 0.5, max: 20, noNaN: true }),
        pulse,
        (ed, wavelengthNm, p, k, beamDiameterMm, pl) => {
          const a = requiredOpticalDensity({ edition: ed, wavelengthNm, averagePowerW: p, beamDiameterMm, pulse: pl })
            .od.value
          const b = requiredOpticalDensity({
            edition: ed,
            wavelengthNm,
            averagePowerW: p * k,
            beamDiameterMm,
            pulse: pl,
          }).od.value
          expect(b).toBeGreaterThanOrEqual(a - 1e-12)
          expect(a).toBeGreaterThanOrEqual(0)
        },
      ),
      opts,
    )
  })

  it('EN 207 LB numbers are integers ≥ 0 (0 only when the scale value is ≤ 0: none needed) and non-decreasing in power', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 315.1, max: 1800, noNaN: true }),
        power,
        fc.double({ min: 1, max: 1000, noNaN: true }),
        pulse,
        (wavelengthNm, p, k, pl) => {
          const a = en207ScaleNumbers({ wavelengthNm, averagePowerW: p, beamDiameterMm: 2, pulse: pl })
          const b = en207ScaleNumbers({ wavelengthNm, averagePowerW: p * k, beamDiameterMm: 2, pulse: pl })
          a.forEach((r, i) => {
            expect(Number.isInteger(r.lb.value)).toBe(true)
            expect(r.lb.value).toBeGreaterThanOrEqual(r.rawScale > 1e-9 ? 1 : 0)
            expect(r.isNeeded).toBe(r.lb.value > 0)
            expect(r.lb.value).toBeGreaterThanOrEqual(Math.ceil(r.rawScale - 1e-9))
            expect(b[i]!.lb.value).toBeGreaterThanOrEqual(r.lb.value)
          })
        },
      ),
      opts,
    )
  })

  it('EN 207 pulsed numbers are non-decreasing in the counting interval', () => {
    fc.assert(
      fc.property(power, pulse, fc.double({ min: 0.1, max: 100, noNaN: true }), (p, pl, interval) => {
        const a = en207ScaleNumbers({
          wavelengthNm: 800,
          averagePowerW: p,
          beamDiameterMm: 2,
          pulse: pl,
          countingIntervalS: interval,
        })
        const b = en207ScaleNumbers({
          wavelengthNm: 800,
          averagePowerW: p,
          beamDiameterMm: 2,
          pulse: pl,
          countingIntervalS: interval * 2,
        })
        expect(b.at(-1)!.lb.value).toBeGreaterThanOrEqual(a.at(-1)!.lb.value)
      }),
      opts,
    )
  })

  it('EN 208 RB numbers are integers and non-decreasing in power', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 400, max: 700, noNaN: true }),
        power,
        fc.double({ min: 1, max: 100, noNaN: true }),
        (wavelengthNm, p, k) => {
          const a = en208ScaleNumber({ wavelengthNm, averagePowerW: p, beamDiameterMm: 2 }).rb.value
          const b = en208ScaleNumber({ wavelengthNm, averagePowerW: p * k, beamDiameterMm: 2 }).rb.value
          expect(Number.isInteger(a)).toBe(true)
          expect(b).toBeGreaterThanOrEqual(a)
        },
      ),
      opts,
    )
  })

  // The tables step down by about 1 % at two row boundaries (10 s: 18·C4·t^0.75 → 10·C4·t; 13 µs at
  // 1050–1400 nm IEC: 2×10⁻²·C7 → 90·C7·t^0.75), so monotonicity is checked to within 2 %.
  it('MPE radiant exposure is positive and non-decreasing in duration to within the 1 % row steps', () => {
    fc.assert(
      fc.property(
        edition,
        fc.double({ min: 600, max: 1400, noNaN: true }),
        fc.double({ min: -13, max: 4, noNaN: true }),
        fc.double({ min: 0, max: 2, noNaN: true }),
        (ed, wavelengthNm, logT, dLog) => {
          const a = ocularMpe({ edition: ed, wavelengthNm, durationS: 10 ** logT }).value
          const b = ocularMpe({ edition: ed, wavelengthNm, durationS: 10 ** Math.min(4, logT + dLog) }).value
          expect(a).toBeGreaterThan(0)
          expect(b).toBeGreaterThanOrEqual(a * 0.98)
        },
      ),
      opts,
    )
  })

  it('the class hint never goes down when power goes up (CW, 400–1400 nm)', () => {
    const rank = ['1', '1M?', '2', '2M?', '3R', '3B', '4']
    fc.assert(
      fc.property(nm, power, fc.double({ min: 1, max: 100, noNaN: true }), (wavelengthNm, p, k) => {
        const a = rank.indexOf(classHint({ wavelengthNm, averagePowerW: p }).hint.value)
        const b = rank.indexOf(classHint({ wavelengthNm, averagePowerW: p * k }).hint.value)
        expect(b).toBeGreaterThanOrEqual(a)
      }),
      opts,
    )
  })
})
