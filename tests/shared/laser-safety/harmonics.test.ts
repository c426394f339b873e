import { describe, it, expect } from 'vitest'
import { setupWavelengths, SafetyInputError } from '../../../shared/laser-safety'

describe('wavelengths present in a harmonic setup (λ/n)', () => {
  it('1064 nm with SHG and THG: 1064, 532, 354.7 nm, all needing eyewear', () => {
    const w = setupWavelengths(1064, [2, 3])
    expect(w.map((x) => x.order)).toEqual([1, 2, 3])
    expect(w.map((x) => x.wavelength.value)).toEqual([1064, 532, 1064 / 3])
    expect(w.every((x) => x.needsEyewear)).toBe(true)
    expect(w.map((x) => x.isInSafetyTable)).toEqual([true, true, false])
  })
  it('always includes the fundamental and removes duplicates', () =>
    expect(setupWavelengths(1560, [2, 2, 1]).map((x) => x.wavelength.value)).toEqual([1560, 780]))
  it('rejects order 6 and non-integers', () => {
    expect(() => setupWavelengths(800, [6])).toThrow(SafetyInputError)
    expect(() => setupWavelengths(800, [2.5])).toThrow(/harmonicOrders/)
  })
})
