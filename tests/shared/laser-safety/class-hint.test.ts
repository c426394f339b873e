import { describe, it, expect } from 'vitest'
import { classHint } from '../../../shared/laser-safety'

const hint = (wavelengthNm: number, averagePowerW: number, extra: object = {}) =>
  classHint({ wavelengthNm, averagePowerW, ...extra }).hint.value

// IEC 60825-1:2014 Tables 3–8 (AEL): visible rows from public excerpts, near-IR rows from public
// implementations (docs/laser-safety.md §6).
describe('CW class hints (IEC 60825-1:2014 Tables 3–8)', () => {
  it('633 nm: 0.3 mW → 1 (< 0.39 mW); 0.8 mW → 2 (< 1 mW); 3 mW → 3R (< 5 mW); 100 mW → 3B; 1 W → 4', () =>
    expect([0.3e-3, 0.8e-3, 3e-3, 0.1, 1].map((p) => hint(633, p))).toEqual(['1', '2', '3R', '3B', '4']))
  it('800 nm: Class 1 up to 0.618 mW, 3R up to 3.17 mW', () =>
    expect([0.6e-3, 0.65e-3, 3.1e-3, 3.3e-3].map((p) => hint(800, p))).toEqual(['1', '3R', '3R', '3B']))
  it('1064 nm: Class 1 AEL 3.9×10⁻⁴·5 ≈ 1.95 mW (IEC 60825-1:2014 Tables 3–8, secondary source)', () =>
    expect([1.9e-3, 2.0e-3].map((p) => hint(1064, p))).toEqual(['1', '3R']))
  it('1550 nm: 10 mW Class 1, 50 mW 3R, 0.5 W 3B', () =>
    expect([9e-3, 40e-3, 0.4, 0.6].map((p) => hint(1550, p))).toEqual(['1', '3R', '3B', '4']))
  it('450 nm below 1 mW: Class 1 CW AEL not tabulated (photochemical), so the hint stays at 2', () =>
    expect(hint(450, 0.1e-3)).toBe('2'))
})

describe('repetitively pulsed class hints (IEC 60825-1:2014 4.3 f)', () => {
  it('worked example A (1 W Ti:sapphire) is Class 4 (check case A, docs/laser-safety.md §9)', () =>
    expect(hint(800, 1, { pulse: { durationS: 100e-15, repetitionRateHz: 80e6 } })).toBe('4'))
  it('a 50 mJ, 10 Hz, 10 ns 532 nm laser (0.5 W average) fails 3B on its single pulse (0.03 J) → 4', () =>
    expect(hint(532, 0.5, { pulse: { durationS: 10e-9, repetitionRateHz: 10 } })).toBe('4'))
  it('a 1 mJ, 10 Hz, 10 ns 532 nm laser is 3B', () =>
    expect(hint(532, 0.01, { pulse: { durationS: 10e-9, repetitionRateHz: 10 } })).toBe('3B'))
  it('shows the failed requirements with their AEL formulas', () => {
    const r = classHint({ wavelengthNm: 532, averagePowerW: 0.5, pulse: { durationS: 10e-9, repetitionRateHz: 10 } })
    expect(r.checks.some((c) => c.cls === '3B' && c.rule === 'single pulse' && !c.passes)).toBe(true)
    expect(r.hint.notes!.join(' ')).toContain('AEL(3B) = 0.03 J')
    expect(r.hint.edition).toBe('IEC-60825-1:2014')
  })
})

describe('1M?/2M? and outside the table', () => {
  it('a 3 mW, 20 mm wide visible beam: only 2 through 7 mm → 2M?', () =>
    expect(hint(633, 3e-3, { beamDiameterMm: 20 })).toBe('2M?'))
  it('a 2 mW, 20 mm wide 800 nm beam: Class 1 through 7 mm → 1M?', () =>
    expect(hint(800, 2e-3, { beamDiameterMm: 20 })).toBe('1M?'))
  it.each([355, 1450, 2000, 10600])('%s nm → outside the table, ask the LSO', (nm) => {
    const r = classHint({ wavelengthNm: nm, averagePowerW: 1e-3 })
    expect(r.hint.value).toBe('outside-table')
    expect(r.hint.formula).toContain('outside the table, ask the LSO')
  })
})
