import { describe, it, expect } from 'vitest'
import { correctionC4, correctionC7, groupingWindow } from '../../../shared/laser-safety'

// Directive 2006/25/EC Annex II Table 2.5 (regulation text).
describe('C4 (C_A)', () => {
  it('is 1 below 700 nm', () => expect(correctionC4(633).value).toBe(1))
  it('is 1.585 at 800 nm (arithmetic of the Table 2.5 formula)', () =>
    expect(correctionC4(800).value).toBeCloseTo(1.585, 3))
  it('is 5 at 1064 nm (arithmetic of the Table 2.5 formula)', () => expect(correctionC4(1064).value).toBe(5))
  it('shows its formula and source', () => {
    const c = correctionC4(800)
    expect(c.formula).toContain('10^(0.002·(λ − 700))')
    expect(c.source).toContain('Directive 2006/25/EC Annex II Table 2.5')
    expect(c.indicative).toBe(true)
  })
})

// Directive Table 2.5 form (regulation text); IEC 2014 1250–1400 nm form seen in two public
// implementations (docs/laser-safety.md §2).
describe('C7 (C_C)', () => {
  it('is 1 up to 1150 nm in both editions', () => {
    expect(correctionC7(1064, 'EU-2006/25/EC').value).toBe(1)
    expect(correctionC7(1064, 'IEC-60825-1:2014').value).toBe(1)
  })
  it('rises as 10^(0.018(λ−1150)) between 1150 and 1200 nm (1200 nm → 10^0.9)', () =>
    expect(correctionC7(1199.999, 'EU-2006/25/EC').value).toBeCloseTo(10 ** 0.9, 3))
  it('is 8 at 1300 nm for the Directive, 8 + 10^2 for IEC 2014', () => {
    expect(correctionC7(1300, 'EU-2006/25/EC').value).toBe(8)
    expect(correctionC7(1300, 'IEC-60825-1:2014').value).toBeCloseTo(108, 9)
  })
  it('records the edition', () => expect(correctionC7(1300, 'IEC-60825-1:2014').edition).toBe('IEC-60825-1:2014'))
})

// T_i (IEC 60825-1:2014, secondary source); T_min (Directive Annex II Table 2.6, regulation text).
describe('pulse-grouping window', () => {
  it.each([
    [800, 'IEC-60825-1:2014', 5e-6],
    [800, 'EU-2006/25/EC', 18e-6],
    [1064, 'IEC-60825-1:2014', 13e-6],
    [1064, 'EU-2006/25/EC', 50e-6],
    [1550, 'IEC-60825-1:2014', 10],
    [1550, 'EU-2006/25/EC', 10],
  ] as const)('%s nm, %s → %s s', (nm, edition, s) => expect(groupingWindow(nm, edition).value).toBe(s))
})
