/**
 * Rules 4–7 of the physics contract (docs/physics.md §3): allowed projections m of the N-th
 * harmonic, their mirror parity, emission along the normal and allowed multipoles. Lab frame;
 * m is the projection on +z; mirror azimuths in degrees.
 */
import type { Parity } from './mirror-parity'

/** All sums m_1 + … + m_N with every m_i from `projections` (ascending, distinct). */
export function sumProjections(projections: readonly number[], order: number): number[] {
  let sums = new Set<number>([0])
  for (let i = 0; i < order; i++) {
    const next = new Set<number>()
    for (const s of sums) for (const m of projections) next.add(s + m)
    sums = next
  }
  return [...sums].sort((a, b) => a - b)
}

/** Inputs of rule 4. */
export interface AllowedMInput {
  pumpProjections: readonly number[]
  order: number
  /** Cylindrical content Q of the lab-frame tensor. */
  q: readonly number[]
  /** n of the structure; 0 = ∞ (no k·n term). */
  rotationOrder: number
  /** Only |m| ≤ window is listed. */
  window: number
}

/**
 * Rule 4: m = m_1 + … + m_N + q + k·n (k ∈ Z; no k term for n = ∞), limited to |m| ≤ window,
 * ascending.
 */
export function findAllowedHarmonics(input: AllowedMInput): number[] {
  return allowedFromSums(sumProjections(input.pumpProjections, input.order), input.q, input.rotationOrder, input.window)
}

/** Largest window handled with a flag table; wider (or non-integer) inputs take the general path. */
const TABLE_WINDOW = 4096

/**
 * Rule 4 from the pump sums already formed (see {@link findAllowedHarmonics}): ascending, distinct.
 * Integer inputs (every validated request) mark m on a flag table over [−window, window]; any other
 * input takes the general set-and-sort path, which gives the same list.
 */
export function allowedFromSums(sums: readonly number[], q: readonly number[], n: number, window: number): number[] {
  if (!(
    Number.isInteger(window) &&
    window >= 0 &&
    window <= TABLE_WINDOW &&
    Number.isInteger(n) &&
    n >= 0 &&
    allIntegers(sums) &&
    allIntegers(q)
  ))
    return allowedBySet(sums, q, n, window)
  const out: number[] = []
  if (q.length === 0 || sums.length === 0) return out
  const flags = FLAGS
  let count = 0
  for (let i = 0; i < sums.length; i++)
    for (let j = 0; j < q.length; j++) {
      const base = sums[i] + q[j]
      if (n === 0) {
        if (Math.abs(base) <= window && flags[base + window] === 0) {
          flags[base + window] = 1
          count++
        }
        continue
      }
      const start = base - n * Math.floor((base + window) / n)
      for (let m = start; m <= window; m += n)
        if (m >= -window && flags[m + window] === 0) {
          flags[m + window] = 1
          count++
        }
    }
  for (let k = 0, end = 2 * window; k <= end && out.length < count; k++)
    if (flags[k] === 1) {
      flags[k] = 0
      out.push(k - window)
    }
  return out
}

/** Scratch flags of {@link allowedFromSums}; every flag it sets is cleared again before it returns. */
const FLAGS = new Uint8Array(2 * TABLE_WINDOW + 1)

function allIntegers(values: readonly number[]): boolean {
  for (let i = 0; i < values.length; i++) if (!Number.isInteger(values[i])) return false
  return true
}

function allowedBySet(sums: readonly number[], q: readonly number[], n: number, window: number): number[] {
  const allowed = new Set<number>()
  for (const s of sums)
    for (const dq of q) {
      const base = s + dq
      if (n === 0) {
        if (Math.abs(base) <= window) allowed.add(base)
        continue
      }
      const start = base - n * Math.floor((base + window) / n)
      for (let m = start; m <= window; m += n) if (m >= -window) allowed.add(m)
    }
  return [...allowed].sort((a, b) => a - b)
}

/** Rule 5: parity of the harmonic = tensor parity × (pump parity)^N, 0 unless both are defined. */
export function harmonicParity(tensorParity: Parity, pumpParity: Parity, order: number): Parity {
  if (tensorParity === 0 || pumpParity === 0) return 0
  return (tensorParity * pumpParity ** order) as Parity
}

/** Zeroth-order emission along the normal (rule 6). */
export interface NormalEmission {
  allowed: boolean
  /** The allowed projections among {−1, +1}. */
  m: number[]
  /** For a circular pump: 'co-rotating' (same sign as the pump m) or 'counter-rotating', per entry of m. */
  handedness?: ('co-rotating' | 'counter-rotating')[]
}

/** Rule 6: normal emission iff ±1 is allowed; with a circular pump of projection `pumpM`, name the relation. */
export function findNormalEmission(allowedM: readonly number[], pumpM?: 1 | -1): NormalEmission {
  const m: number[] = []
  if (allowedM.includes(-1)) m.push(-1)
  if (allowedM.includes(1)) m.push(1)
  const out: NormalEmission = { allowed: m.length > 0, m }
  if (pumpM !== undefined && m.length > 0)
    out.handedness = m.map((x) => (x === pumpM ? 'co-rotating' : 'counter-rotating'))
  return out
}

/** A radiating multipole: electric (E) or magnetic (M), order l ≥ 1, projection m. */
export interface Multipole {
  type: 'E' | 'M'
  l: number
  m: number
}

/**
 * Rule 7: (type, l, m) is allowed iff |m| ≤ l and m is allowed. At m = 0 an electric multipole
 * is even and a magnetic one odd under every vertical mirror, so each parity sign that applies
 * keeps only the matching type (conflicting signs forbid m = 0). For m ≠ 0 each type has one even
 * and one odd combination, so both remain.
 * @param paritySigns signs of the parity rules that apply (rule 5), one per mirror.
 */
export function findAllowedMultipoles(
  allowedM: readonly number[],
  paritySigns: readonly (1 | -1)[],
  lmax: number,
): Multipole[] {
  const hasEven = paritySigns.includes(1)
  const hasOdd = paritySigns.includes(-1)
  const out: Multipole[] = []
  for (let l = 1; l <= lmax; l++)
    for (const m of allowedM) {
      if (Math.abs(m) > l) continue
      if (m !== 0 || !hasOdd) out.push({ type: 'E', l, m })
      if (m !== 0 || !hasEven) out.push({ type: 'M', l, m })
    }
  return out
}
