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
      throw new SafetyInputError({
        code: 'OUT_OF_RANGE',
        field: 'harmonicOrders',
        value: n,
        message: `orders must be integers 1–${MAX_HARMONIC_ORDER}, got ${String(n)}`,
      })
  const orders = [...new Set([1, ...harmonicOrders])].sort((a, b) => a - b)
  return orders.map((n) => {
    const nm = fundamentalNm / n
    return {
      order: n,
      wavelength: computed(
        nm,
        'nm',
        n === 1 ? `λ = ${fmt(fundamentalNm)} nm` : `λ/${n} = ${fmt(fundamentalNm)} nm / ${n}`,
        'harmonic order n of λ gives λ/n',
      ),
      needsEyewear: true,
      isInSafetyTable: nm >= 400 && nm <= 1800,
    }
  })
}

/** One line of a setup: a listed fundamental, a listed wavelength recognised as a harmonic, or a generated harmonic. */
export interface SetupLine {
  wavelengthNm: number
  /** 1 for a fundamental; n for λ_f/n. */
  order: number
  /** The fundamental this line comes from (itself for a fundamental). */
  fundamentalNm: number
  /** The wavelength is in the setup's list (else it was generated from a harmonic order). */
  isListed: boolean
}

/** A listed λ is taken as the n-th harmonic of a longer listed λ_f when |λ − λ_f/n| ≤ max(1.5 nm, 0.5 % of λ_f/n). */
function harmonicOrderOf(nm: number, fundamentalNm: number): number | null {
  for (let n = 2; n <= MAX_HARMONIC_ORDER; n++) {
    const target = fundamentalNm / n
    if (Math.abs(nm - target) <= Math.max(1.5, 0.005 * target)) return n
  }
  return null
}

/**
 * The lines present in a setup. Listed wavelengths are fundamentals unless one is a harmonic
 * (λ_f/2 … λ_f/5) of a longer listed fundamental: then it is recognised as that harmonic. Each
 * fundamental generates the setup's harmonic orders; a harmonic never generates further lines
 * (no harmonic of a harmonic is invented). A generated line that is already listed is not doubled.
 */
export function setupLines(wavelengthsNm: readonly number[], harmonicOrders: readonly number[]): SetupLine[] {
  for (const w of wavelengthsNm) requirePositive('wavelengthsNm', w)
  for (const n of harmonicOrders)
    if (!Number.isInteger(n) || n < 1 || n > MAX_HARMONIC_ORDER)
      throw new SafetyInputError({
        code: 'OUT_OF_RANGE',
        field: 'harmonicOrders',
        value: n,
        message: `orders must be integers 1–${MAX_HARMONIC_ORDER}, got ${String(n)}`,
      })
  const listed = [...new Set(wavelengthsNm)].sort((a, b) => b - a)
  const fundamentals: number[] = []
  const lines: SetupLine[] = []
  for (const nm of listed) {
    const parent = fundamentals.map((f) => ({ f, n: harmonicOrderOf(nm, f) })).find((x) => x.n !== null)
    if (parent) lines.push({ wavelengthNm: nm, order: parent.n!, fundamentalNm: parent.f, isListed: true })
    else {
      fundamentals.push(nm)
      lines.push({ wavelengthNm: nm, order: 1, fundamentalNm: nm, isListed: true })
    }
  }
  const orders = [...new Set(harmonicOrders)].filter((n) => n > 1).sort((a, b) => a - b)
  for (const f of fundamentals)
    for (const n of orders)
      if (!lines.some((l) => l.fundamentalNm === f && l.order === n))
        lines.push({ wavelengthNm: f / n, order: n, fundamentalNm: f, isListed: false })
  // Fundamentals in the order they were listed, each followed by its harmonics in order.
  const firstIndex = (f: number) => wavelengthsNm.indexOf(f)
  return lines.sort((a, b) => firstIndex(a.fundamentalNm) - firstIndex(b.fundamentalNm) || a.order - b.order)
}
