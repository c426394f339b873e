import { formatNumber, formatSi } from '../format'

/**
 * The one result shape of the library: a value with its unit, the formula that produced it and
 * where that formula comes from, so screens can show the working (issue 5).
 */

/** Exposure-limit edition used for MPE-based results (docs/laser-safety.md §1). */
export type MpeEdition = 'EU-2006/25/EC' | 'IEC-60825-1:2014'

/** All editions the library knows, in display order. */
export const MPE_EDITIONS: readonly MpeEdition[] = ['EU-2006/25/EC', 'IEC-60825-1:2014']

/** A computed quantity, always indicative (an LSO must check it against the purchased standard). */
export interface Computed<V = number> {
  value: V
  /** Unit of `value` in SI-style text (`W/m²`, `J`, `m`, `1` for dimensionless). */
  unit: string
  /** The formula in plain text, with the numbers substituted where that helps. */
  formula: string
  /** The published clause or table (or textbook) the formula comes from; shown to users. */
  source: string
  /** Present on every result that depends on an exposure-limit table. */
  edition?: MpeEdition
  indicative: true
  /** Assumptions and caveats worth showing next to the value. */
  notes?: string[]
}

/** Builds a {@link Computed}; keeps the literal `indicative: true` in one place. */
export function computed<V>(
  value: V,
  unit: string,
  formula: string,
  source: string,
  extra: { edition?: MpeEdition; notes?: string[] } = {},
): Computed<V> {
  const result: Computed<V> = { value, unit, formula, source, indicative: true }
  if (extra.edition) result.edition = extra.edition
  if (extra.notes && extra.notes.length > 0) result.notes = extra.notes
  return result
}

/** Short number format for formula text (4 significant digits), the app's one formatter. */
export function fmt(x: number): string {
  return formatNumber(x, 4)
}

/** A quantity with an SI prefix (12.5 nJ, 25.98 kW/m²), the app's one formatter. */
export const si = formatSi
