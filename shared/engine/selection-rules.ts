/**
 * Rules 4–7 of the physics contract (shared/ENGINE.md): allowed projections m of the N-th
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
  const { order, q, rotationOrder: n, window } = input
  const allowed = new Set<number>()
  for (const s of sumProjections(input.pumpProjections, order))
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
  const m = [-1, 1].filter((x) => allowedM.includes(x))
  const out: NormalEmission = { allowed: m.length > 0, m }
  if (pumpM !== undefined && m.length > 0) out.handedness = m.map((x) => (x === pumpM ? 'co-rotating' : 'counter-rotating'))
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
export function findAllowedMultipoles(allowedM: readonly number[], paritySigns: readonly (1 | -1)[], lmax: number): Multipole[] {
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
