/**
 * Ocular MPE table (point source, C6 = C_E = 1) for the two editions, as typed constant data.
 * Sources (docs/laser-safety.md §3): Directive 2006/25/EC Annex II Table 2.2 (ICNIRP 1996/2000
 * basis, regulation text); IEC 60825-1:2014 Table A.1 / ANSI Z136.1-2014 (ICNIRP 2013 basis, from
 * public excerpts). The 1400–1800 nm rows are the same in both editions. Durations are in seconds.
 *
 * A row gives either a radiant exposure H = k·factor·t^exponent (J/m²) or an irradiance
 * E = k·factor (W/m², so H = E·t).
 */
import type { MpeEdition } from './computed'

/** Which correction factors multiply a row. */
export type MpeFactor = '1' | 'C4' | 'C7' | 'C4·C7'

/** One duration range of the table. */
export interface MpeRow {
  fromS: number
  toS: number
  quantity: 'H' | 'E'
  k: number
  exponent: number
  factor: MpeFactor
}

/** One wavelength band: closed below; open above unless `includesUpper`. */
export interface MpeBand {
  fromNm: number
  toNm: number
  includesUpper: boolean
  rows: Record<MpeEdition, readonly MpeRow[]>
}

const h = (fromS: number, toS: number, k: number, exponent: number, factor: MpeFactor): MpeRow => ({
  fromS,
  toS,
  quantity: 'H',
  k,
  exponent,
  factor,
})
const e = (fromS: number, toS: number, k: number, factor: MpeFactor): MpeRow => ({
  fromS,
  toS,
  quantity: 'E',
  k,
  exponent: 0,
  factor,
})

/** Longest and shortest durations the table covers (s). */
export const MPE_MIN_DURATION_S = 1e-13
export const MPE_MAX_DURATION_S = 3e4

const visibleOrNearIr = (f: MpeFactor): Record<MpeEdition, readonly MpeRow[]> => ({
  'EU-2006/25/EC': [
    h(1e-13, 1e-11, 1.5e-4, 0, f),
    h(1e-11, 1e-9, 2.7e4, 0.75, f),
    h(1e-9, 1.8e-5, 5e-3, 0, f),
    h(1.8e-5, 10, 18, 0.75, f),
    e(10, MPE_MAX_DURATION_S, 10, f),
  ],
  'IEC-60825-1:2014': [
    // IEC 60825-1:2014 Table A.1: the sub-10 ps row has no C4 in IEC 2014 (1.0×10⁻³ J/m² for 400–1050 nm).
    h(1e-13, 1e-11, 1e-3, 0, '1'),
    h(1e-11, 5e-6, 2e-3, 0, f),
    h(5e-6, 10, 18, 0.75, f),
    e(10, MPE_MAX_DURATION_S, 10, f),
  ],
})

/** The bands of the table, in wavelength order. */
export const MPE_BANDS: readonly MpeBand[] = [
  { fromNm: 400, toNm: 700, includesUpper: false, rows: visibleOrNearIr('1') },
  { fromNm: 700, toNm: 1050, includesUpper: false, rows: visibleOrNearIr('C4') },
  {
    fromNm: 1050,
    toNm: 1400,
    includesUpper: true,
    rows: {
      'EU-2006/25/EC': [
        h(1e-13, 1e-11, 1.5e-3, 0, 'C7'),
        h(1e-11, 1e-9, 2.7e5, 0.75, 'C7'),
        h(1e-9, 5e-5, 5e-2, 0, 'C7'),
        h(5e-5, 10, 90, 0.75, 'C7'),
        e(10, MPE_MAX_DURATION_S, 10, 'C4·C7'),
      ],
      'IEC-60825-1:2014': [
        h(1e-13, 1e-11, 1e-3, 0, 'C7'),
        h(1e-11, 13e-6, 2e-2, 0, 'C7'),
        h(13e-6, 10, 90, 0.75, 'C7'),
        e(10, MPE_MAX_DURATION_S, 10, 'C4·C7'),
      ],
    },
  },
  {
    fromNm: 1400,
    toNm: 1500,
    includesUpper: false,
    rows: sameInBoth([e(1e-13, 1e-9, 1e12, '1'), h(1e-9, 1e-3, 1e3, 0, '1'), h(1e-3, 10, 5.6e3, 0.25, '1')]),
  },
  {
    fromNm: 1500,
    toNm: 1800,
    includesUpper: true,
    rows: sameInBoth([e(1e-13, 1e-9, 1e13, '1'), h(1e-9, 10, 1e4, 0, '1'), e(10, MPE_MAX_DURATION_S, 1000, '1')]),
  },
]

function sameInBoth(rows: readonly MpeRow[]): Record<MpeEdition, readonly MpeRow[]> {
  return { 'EU-2006/25/EC': rows, 'IEC-60825-1:2014': rows }
}
