import { describe, it, expect } from 'vitest'
import { maxChipsOnWafer } from '../../shared/wafer-fit'

/**
 * Reference: the dies-per-wafer estimate DPW ≈ π(d/2)²/A − π·d/√(2A), as given in Hennessy &
 * Patterson, "Computer Architecture: A Quantitative Approach" (chapter 1, cost of an integrated
 * circuit); formula from memory. It estimates the whole dies on a round wafer; an exact grid count
 * lies within a few per cent of it.
 */
const dpw = (d: number, a: number) => (Math.PI * (d / 2) ** 2) / a - (Math.PI * d) / Math.sqrt(2 * a)

describe('chips on a round wafer', () => {
  it.each([
    [300, 10, 10],
    [200, 7, 7],
    [100, 5, 5],
    [50.8, 5, 5],
  ])('%d mm wafer, %d × %d mm chips: within 8 %% of the textbook estimate', (d, w, h) => {
    const n = maxChipsOnWafer(d, w, h, 0)
    expect(Math.abs(n - dpw(d, w * h)) / dpw(d, w * h)).toBeLessThan(0.08)
  })

  it('never more chips than the wafer area holds; kerf and larger chips mean fewer', () => {
    const n = maxChipsOnWafer(50.8, 5, 5)
    expect(n).toBeLessThan((Math.PI * 25.4 ** 2) / 25)
    expect(maxChipsOnWafer(50.8, 5, 5, 0.5)).toBeLessThan(maxChipsOnWafer(50.8, 5, 5, 0))
    expect(maxChipsOnWafer(50.8, 10, 10)).toBeLessThan(n)
    expect(maxChipsOnWafer(50.8, 40, 40)).toBe(0)
  })
})
