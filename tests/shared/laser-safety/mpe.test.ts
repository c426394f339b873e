import { describe, it, expect } from 'vitest'
import {
  circleAreaM2,
  limitingApertureMm,
  ocularMpe,
  ocularMpeIrradiance,
  aelCw,
  SafetyInputError,
} from '../../../shared/laser-safety'

const IEC = 'IEC-60825-1:2014' as const
const EU = 'EU-2006/25/EC' as const
const A7 = circleAreaM2(7)

describe('ocular MPE table values (Directive 2006/25/EC Annex II Table 2.2; IEC 60825-1:2014 Table A.1)', () => {
  it('7 mm aperture area is 3.8485×10⁻⁵ m² (π·(3.5 mm)², arithmetic)', () => expect(A7).toBeCloseTo(3.8485e-5, 9))

  // Directive Table 2.2 [V] H versus IEC 2014 Table A.1 [S] M–H: 100 fs, 800 nm.
  it('100 fs at 800 nm: IEC 1.0×10⁻³ J/m² (no C4); Directive 1.5×10⁻⁴·C_A = 2.38×10⁻⁴ J/m²', () => {
    expect(ocularMpe({ edition: IEC, wavelengthNm: 800, durationS: 100e-15 }).value).toBeCloseTo(1e-3, 12)
    expect(ocularMpe({ edition: EU, wavelengthNm: 800, durationS: 100e-15 }).value).toBeCloseTo(2.38e-4, 6)
  })

  it('ns pulses, visible: Directive 5×10⁻³ J/m², IEC 2×10⁻³ J/m² (Directive Table 2.2; IEC Table A.1)', () => {
    expect(ocularMpe({ edition: EU, wavelengthNm: 532, durationS: 10e-9 }).value).toBeCloseTo(5e-3, 12)
    expect(ocularMpe({ edition: IEC, wavelengthNm: 532, durationS: 10e-9 }).value).toBeCloseTo(2e-3, 12)
  })

  it('1064 nm ns pulse: Directive 5×10⁻²·C_C, IEC 2×10⁻²·C7 (Directive Table 2.2; IEC Table A.1)', () => {
    expect(ocularMpe({ edition: EU, wavelengthNm: 1064, durationS: 10e-9 }).value).toBeCloseTo(5e-2, 12)
    expect(ocularMpe({ edition: IEC, wavelengthNm: 1064, durationS: 10e-9 }).value).toBeCloseTo(2e-2, 12)
  })

  it('t ≥ 10 s at 800 nm: E = 10·C4 = 15.85 W/m² (IEC Table A.1, secondary source)', () =>
    expect(ocularMpeIrradiance({ edition: IEC, wavelengthNm: 800, durationS: 100 }).value).toBeCloseTo(15.85, 2))

  it('1500–1800 nm, 1 ns–10 s: H = 10⁴ J/m²; t ≥ 10 s: 1000 W/m² (Directive Table 2.2, same in both editions)', () => {
    for (const edition of [IEC, EU]) {
      expect(ocularMpe({ edition, wavelengthNm: 1550, durationS: 1e-6 }).value).toBe(1e4)
      expect(ocularMpeIrradiance({ edition, wavelengthNm: 1550, durationS: 100 }).value).toBeCloseTo(1000, 9)
    }
  })

  it('at an exact row boundary the lower (more protective) row is used: 10 s at 800 nm gives 15.85, not 16.04 W/m²', () => {
    // The t < 10 s row gives 16.04 W/m² at T = 10 s and the t ≥ 10 s row 15.85; the library takes the
    // minimum (docs/laser-safety.md §3).
    expect(ocularMpeIrradiance({ edition: IEC, wavelengthNm: 800, durationS: 9.999 }).value).toBeCloseTo(16.04, 1)
    expect(ocularMpeIrradiance({ edition: IEC, wavelengthNm: 800, durationS: 10 }).value).toBeCloseTo(15.85, 2)
  })

  it('records the edition and the formula in every result', () => {
    const r = ocularMpe({ edition: EU, wavelengthNm: 800, durationS: 1 })
    expect(r.edition).toBe(EU)
    expect(r.formula).toContain('18·C4·t^0.75')
    expect(r.source).toContain('Directive')
  })
})

describe('consistency checks built into the standard (IEC 60825-1:2014: Class AEL = MPE × 7 mm aperture)', () => {
  it('MPE(0.25 s, visible) × 7 mm aperture ≈ 0.98 mW ≈ the 1 mW Class 2 AEL', () => {
    const watts = ocularMpeIrradiance({ edition: IEC, wavelengthNm: 633, durationS: 0.25 }).value * A7
    expect(watts).toBeCloseTo(0.98e-3, 5)
    expect(Math.abs(watts - aelCw('2', 633).value!) / 1e-3).toBeLessThan(0.03)
  })

  it('Class 1 CW AEL = MPE(100 s) × aperture area, within 2 % (800 nm, 1064 nm, 633 nm, 1550 nm)', () => {
    for (const nm of [633, 800, 1064]) {
      const fromMpe = ocularMpeIrradiance({ edition: IEC, wavelengthNm: nm, durationS: 100 }).value * A7
      expect(Math.abs(fromMpe / aelCw('1', nm).value! - 1)).toBeLessThan(0.02)
    }
    // 1500–1800 nm: 1000 W/m² over the 3.5 mm aperture ≈ 9.6 mW vs the 10 mW Class 1 AEL.
    const at1550 =
      ocularMpeIrradiance({ edition: IEC, wavelengthNm: 1550, durationS: 100 }).value *
      circleAreaM2(limitingApertureMm(1550, 100).value)
    expect(Math.abs(at1550 / aelCw('1', 1550).value! - 1)).toBeLessThan(0.05)
  })

  it('Class 1 AEL at 800 nm is 0.618 mW (IEC 60825-1:2014 Tables 3–8, secondary source)', () =>
    expect(aelCw('1', 800).value).toBeCloseTo(0.618e-3, 5))
  it('Class 3R AEL at 800 nm is 3.17 mW (IEC 60825-1:2014 Tables 3–8, secondary source)', () =>
    expect(aelCw('3R', 800).value).toBeCloseTo(3.17e-3, 5))
})

describe('limiting aperture (IEC 60825-1:2014 Annex A via public excerpts)', () => {
  it.each([
    [800, 1, 7],
    [1550, 0.1, 1],
    [1550, 10, 3.5],
    [1550, 100, 3.5],
  ])('%s nm, %s s → %s mm', (nm, t, d) => expect(limitingApertureMm(nm, t).value).toBe(d))
  it('1.5·t^0.375 mm between 0.3 and 10 s', () => expect(limitingApertureMm(1550, 1).value).toBe(1.5))
})

describe('outside the table', () => {
  it.each([
    [350, 1],
    [1900, 1],
    [800, 1e-14],
    [800, 1e5],
    [450, 100],
    [1450, 100],
  ])('%s nm, %s s → OUTSIDE_TABLE, ask the LSO', (nm, t) => {
    try {
      ocularMpe({ edition: IEC, wavelengthNm: nm, durationS: t })
      expect.unreachable()
    } catch (e) {
      expect(e).toBeInstanceOf(SafetyInputError)
      expect((e as SafetyInputError).code).toBe('OUTSIDE_TABLE')
      expect((e as SafetyInputError).message).toContain('ask the LSO')
    }
  })
})
