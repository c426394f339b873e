/**
 * Ocular maximum permissible exposure (MPE) for a point source, 400–1800 nm, in either edition.
 * Sources in `mpe-table.ts` (docs/laser-safety.md §3). Every result records the edition.
 */
import { computed, fmt, si, type Computed, type MpeEdition } from './computed'
import { correctionC4, correctionC7 } from './correction-factors'
import { outsideTable, requirePositive, SafetyInputError } from './errors'
import { MPE_BANDS, MPE_MAX_DURATION_S, MPE_MIN_DURATION_S, type MpeBand, type MpeRow } from './mpe-table'

/** Input of {@link ocularMpe}. */
export interface MpeInput {
  edition: MpeEdition
  wavelengthNm: number
  /** Exposure duration t in seconds (pulse duration, group duration or viewing time). */
  durationS: number
}

const SOURCE = {
  'EU-2006/25/EC': 'Directive 2006/25/EC Annex II Table 2.2',
  'IEC-60825-1:2014': 'IEC 60825-1:2014 Table A.1',
} as const

/** Throws unless `edition` is one of the two supported editions. */
export function requireEdition(edition: MpeEdition): MpeEdition {
  if (edition !== 'EU-2006/25/EC' && edition !== 'IEC-60825-1:2014')
    throw new SafetyInputError({
      code: 'OUT_OF_RANGE',
      field: 'edition',
      value: edition,
      message: "must be 'EU-2006/25/EC' or 'IEC-60825-1:2014'",
    })
  return edition
}

function findBand(wavelengthNm: number): MpeBand {
  const band = MPE_BANDS.find(
    (b) => wavelengthNm >= b.fromNm && (wavelengthNm < b.toNm || (b.includesUpper && wavelengthNm === b.toNm)),
  )
  return band ?? outsideTable('wavelengthNm', wavelengthNm, 'the MPE table covers 400–1800 nm')
}

function evaluateRow(row: MpeRow, input: MpeInput): { value: number; formula: string } {
  const { wavelengthNm: nm, durationS: t, edition } = input
  const c4 = row.factor.includes('C4') ? correctionC4(nm).value : 1
  const c7 = row.factor.includes('C7') ? correctionC7(nm, edition).value : 1
  const factorText = row.factor === '1' ? '' : `·${row.factor}`
  const factors = row.factor === '1' ? '' : ` with C4 = ${fmt(c4)}, C7 = ${fmt(c7)}`
  if (row.quantity === 'E') {
    const irradiance = row.k * c4 * c7
    return {
      value: irradiance * t,
      formula: `H = E·t, E = ${fmt(row.k)}${factorText} W/m² = ${si(irradiance, 'W/m²')}${factors}`,
    }
  }
  const value = row.k * c4 * c7 * t ** row.exponent
  const tText = row.exponent === 0 ? '' : `·t^${row.exponent}`
  return { value, formula: `H = ${fmt(row.k)}${factorText}${tText} J/m²${factors}, t = ${si(t, 's')}` }
}

/**
 * Ocular MPE as a radiant exposure H (J/m²) over the limiting aperture, for exposure duration
 * `durationS`. At an exact row boundary both adjacent rows are evaluated and the lower (more
 * protective) value is returned. 400–600 nm beyond 10 s is refused: the photochemical limits
 * that govern there are not in the table.
 */
export function ocularMpe(input: MpeInput): Computed {
  const edition = requireEdition(input.edition)
  requirePositive('wavelengthNm', input.wavelengthNm)
  const t = requirePositive('durationS', input.durationS)
  if (t < MPE_MIN_DURATION_S || t > MPE_MAX_DURATION_S)
    outsideTable('durationS', t, `the MPE table covers ${MPE_MIN_DURATION_S}–${MPE_MAX_DURATION_S} s`)
  const band = findBand(input.wavelengthNm)
  if (input.wavelengthNm < 600 && t > 10)
    outsideTable('durationS', t, 'photochemical limits govern 400–600 nm beyond 10 s and are not tabulated')
  const rows = band.rows[edition].filter((r) => t >= r.fromS && t <= r.toS)
  if (rows.length === 0) outsideTable('durationS', t, `no MPE row for ${band.fromNm}–${band.toNm} nm at this duration`)
  const best = rows.map((r) => evaluateRow(r, input)).reduce((a, b) => (b.value < a.value ? b : a))
  return computed(best.value, 'J/m²', best.formula, SOURCE[edition], {
    edition,
    notes: ['point source (C6 = 1); exposure averaged over the limiting aperture (IEC 60825-1:2014 Annex A)'],
  })
}

/** Ocular MPE as a mean irradiance E = H/t (W/m²) over `durationS`. */
export function ocularMpeIrradiance(input: MpeInput): Computed {
  const h = ocularMpe(input)
  return computed(h.value / input.durationS, 'W/m²', `E = H/t; ${h.formula}`, h.source, {
    edition: h.edition,
    notes: h.notes,
  })
}

/**
 * Limiting aperture diameter (mm) over which exposure is averaged: 7 mm for 400–1400 nm; beyond
 * 1400 nm 1 mm for t ≤ 0.3 s, 1.5·t^0.375 mm for 0.3–10 s, 3.5 mm from 10 s (IEC 60825-1:2014 Annex A,
 * as reproduced in public excerpts).
 */
export function limitingApertureMm(wavelengthNm: number, durationS: number): Computed {
  requirePositive('wavelengthNm', wavelengthNm)
  requirePositive('durationS', durationS)
  const src = 'IEC 60825-1:2014 Annex A (limiting apertures); ANSI Z136.1-2014 Table 8'
  if (wavelengthNm < 400) outsideTable('wavelengthNm', wavelengthNm, 'apertures tabulated from 400 nm')
  if (wavelengthNm <= 1400) return computed(7, 'mm', 'D = 7 mm (400–1400 nm)', src)
  if (durationS <= 0.3) return computed(1, 'mm', 'D = 1 mm (λ > 1400 nm, t ≤ 0.3 s)', src)
  if (durationS < 10)
    return computed(1.5 * durationS ** 0.375, 'mm', `D = 1.5·t^0.375 mm, t = ${si(durationS, 's')}`, src)
  return computed(3.5, 'mm', 'D = 3.5 mm (λ > 1400 nm, t ≥ 10 s)', src)
}
