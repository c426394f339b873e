/**
 * Wavelength correction factors and pulse-grouping windows for the retinal hazard region and the
 * near-IR bands covered by the MPE table. Names follow IEC 60825-1:2014 (C4, C7, T_i); the
 * Directive/ICNIRP names (C_A, C_C, T_min) are given beside them. Sources: Directive 2006/25/EC Annex II
 * Table 2.5, IEC 60825-1:2014 Table A.1 (docs/laser-safety.md §2).
 */
import { computed, fmt, si, type Computed, type MpeEdition } from './computed'
import { outsideTable, requirePositive } from './errors'

const SOURCE_C4 = 'IEC 60825-1:2014 Table A.1 (C4); Directive 2006/25/EC Annex II Table 2.5 (C_A)'

/**
 * C4 (= C_A), dimensionless, same in both editions: 1 below 700 nm, 10^(0.002(λ−700)) for
 * 700–1050 nm, 5 for 1050–1400 nm. Defined for 400–1400 nm only.
 */
export function correctionC4(wavelengthNm: number): Computed {
  requirePositive('wavelengthNm', wavelengthNm)
  if (wavelengthNm < 400 || wavelengthNm > 1400)
    outsideTable('wavelengthNm', wavelengthNm, 'C4 is defined for 400–1400 nm')
  if (wavelengthNm < 700) return computed(1, '1', 'C4 = 1 (λ < 700 nm)', SOURCE_C4)
  if (wavelengthNm < 1050) {
    const value = 10 ** (0.002 * (wavelengthNm - 700))
    return computed(value, '1', `C4 = 10^(0.002·(λ − 700)) = 10^(0.002·(${fmt(wavelengthNm)} − 700))`, SOURCE_C4)
  }
  return computed(5, '1', 'C4 = 5 (1050–1400 nm)', SOURCE_C4)
}

/**
 * C7 (= C_C), dimensionless. 1 for 700–1150 nm; 10^(0.018(λ−1150)) for 1150–1200 nm; 8 above.
 * For IEC 2014 the 1250–1400 nm range uses 8 + 10^(0.04(λ−1250)) (seen in two public
 * implementations, not yet in the standard). Below 700 nm C7 is taken as 1 (it is only applied from 700 nm on).
 */
export function correctionC7(wavelengthNm: number, edition: MpeEdition): Computed {
  requirePositive('wavelengthNm', wavelengthNm)
  if (wavelengthNm < 400 || wavelengthNm > 1400)
    outsideTable('wavelengthNm', wavelengthNm, 'C7 is defined for 400–1400 nm')
  const opts = { edition }
  const src =
    edition === 'EU-2006/25/EC' ? 'Directive 2006/25/EC Annex II Table 2.5 (C_C)' : 'IEC 60825-1:2014 Table A.1 (C7)'
  if (wavelengthNm < 1150) return computed(1, '1', 'C7 = 1 (λ < 1150 nm)', src, opts)
  if (wavelengthNm < 1200) {
    const value = 10 ** (0.018 * (wavelengthNm - 1150))
    return computed(value, '1', `C7 = 10^(0.018·(λ − 1150)) = 10^(0.018·(${fmt(wavelengthNm)} − 1150))`, src, opts)
  }
  if (edition === 'IEC-60825-1:2014' && wavelengthNm >= 1250) {
    const value = 8 + 10 ** (0.04 * (wavelengthNm - 1250))
    return computed(
      value,
      '1',
      `C7 = 8 + 10^(0.04·(λ − 1250)) = 8 + 10^(0.04·(${fmt(wavelengthNm)} − 1250))`,
      src,
      opts,
    )
  }
  return computed(8, '1', 'C7 = 8 (1200–1400 nm)', src, opts)
}

/** Grouping windows in seconds by band: [from nm, to nm, IEC T_i, Directive T_min]. */
const GROUPING_WINDOWS: readonly (readonly [number, number, number, number])[] = [
  [400, 1050, 5e-6, 18e-6],
  [1050, 1400, 13e-6, 50e-6],
  [1400, 1500, 1e-3, 1e-3],
  [1500, 1800, 10, 10],
  [1800, 2600, 1e-3, 1e-3],
]

/**
 * Pulse-grouping window in seconds: pulses closer together than this count as one pulse in the
 * repetitive-pulse rule. T_i for IEC 2014 (secondary source, docs/laser-safety.md §2), T_min for the Directive
 * (Annex II Table 2.6). Bands are closed below and open above, except that 1400 nm belongs to the
 * 1050–1400 nm band (as in the MPE table).
 */
export function groupingWindow(wavelengthNm: number, edition: MpeEdition): Computed {
  requirePositive('wavelengthNm', wavelengthNm)
  const iec = edition === 'IEC-60825-1:2014'
  const row = GROUPING_WINDOWS.find(
    ([lo, hi]) => wavelengthNm >= lo && (wavelengthNm < hi || (hi === 1400 && wavelengthNm === 1400)),
  )
  if (!row) return outsideTable('wavelengthNm', wavelengthNm, 'grouping window tabulated for 400–2600 nm only')
  const [lo, hi, ti, tmin] = row
  const name = iec ? 'T_i' : 'T_min'
  return computed(
    iec ? ti : tmin,
    's',
    `${name} = ${si(iec ? ti : tmin, 's')} (${lo}–${hi} nm)`,
    iec ? 'IEC 60825-1:2014 Table 2 (T_i)' : 'Directive 2006/25/EC Annex II Table 2.6 (T_min)',
    { edition },
  )
}
