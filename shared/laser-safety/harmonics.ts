/**
 * Wavelengths present in a setup that generates harmonics: the fundamental λ and λ/n for each
 * harmonic order n (2–5). Every one of them needs eyewear cover; `isInSafetyTable` says whether
 * this library's MPE table covers it (400–1800 nm) or the LSO must be asked.
 */
import { computed, fmt, type Computed } from './computed'
import { requirePositive, SafetyInputError } from './errors'

/** Highest harmonic order handled. */
export const MAX_HARMONIC_ORDER = 5

/** One wavelength present in the setup. */
export interface SetupWavelength {
  order: number
  wavelength: Computed
  needsEyewear: true
  isInSafetyTable: boolean
}

/**
 * Wavelengths λ/n for the fundamental (n = 1) and the given harmonic orders, sorted by order with
 * duplicates removed. Orders must be integers 1–5.
 */
export function setupWavelengths(fundamentalNm: number, harmonicOrders: readonly number[]): SetupWavelength[] {
  requirePositive('fundamentalNm', fundamentalNm)
  for (const n of harmonicOrders)
    if (!Number.isInteger(n) || n < 1 || n > MAX_HARMONIC_ORDER)
      throw new SafetyInputError({ code: 'OUT_OF_RANGE', field: 'harmonicOrders', value: n, message: `orders must be integers 1–${MAX_HARMONIC_ORDER}, got ${String(n)}` })
  const orders = [...new Set([1, ...harmonicOrders])].sort((a, b) => a - b)
  return orders.map((n) => {
    const nm = fundamentalNm / n
    return {
      order: n,
      wavelength: computed(nm, 'nm', n === 1 ? `λ = ${fmt(fundamentalNm)} nm` : `λ/${n} = ${fmt(fundamentalNm)} nm / ${n}`, 'derived (harmonic order n gives λ/n)'),
      needsEyewear: true,
      isInSafetyTable: nm >= 400 && nm <= 1800,
    }
  })
}
