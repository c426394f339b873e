/**
 * Full Cartesian tensors of rank r (flat `Float64Array` of 3^r numbers, index i0 i1 … i_{r-1} with
 * i0 most significant, 0 = x, 1 = y, 2 = z) and the parameter spaces that impose permutation
 * symmetry on them. Frame: whatever frame the tensor is expressed in.
 */
import type { Mat3 } from './linalg'
import { BoundedCache } from './bounded-cache'

/** Index permutation symmetry imposed on χ(N) (rank N+1) before the point group is applied.
 * - `intrinsic`: symmetric in the last N indices (degenerate-frequency intrinsic permutation);
 * - `kleinman`: symmetric in all N+1 indices (lossless, far from resonance);
 * - `none`: no permutation symmetry (the general tensor, as counted for χ(3) in Boyd §1.5). */
export type PermutationSymmetry = 'intrinsic' | 'kleinman' | 'none'

const AXES = 'xyz'
const VOIGT_PAIRS = ['00', '11', '22', '12', '02', '01']

/** Digits (0..2) of a flat index of a rank-`rank` tensor. */
export function indexDigits(flat: number, rank: number): number[] {
  const d = new Array<number>(rank)
  for (let a = rank - 1; a >= 0; a--) {
    d[a] = flat % 3
    flat = Math.floor(flat / 3)
  }
  return d
}

/** Axis label (e.g. `xyz`) of a flat index. */
export function indexLabel(flat: number, rank: number): string {
  return indexDigits(flat, rank)
    .map((d) => AXES[d])
    .join('')
}

/** Flat index of an axis label such as `xyz`. */
export function flatIndex(label: string): number {
  let f = 0
  for (const ch of label) f = 3 * f + AXES.indexOf(ch)
  return f
}

/**
 * T' = g ⊗ … ⊗ g · T: apply the 3×3 matrix `m` to every index of the tensor
 * (T'_{ab…} = m_ai m_bj … T_{ij…}). Cost rank·3^rank·3.
 */
export function transformTensor(t: Float64Array, rank: number, m: Mat3): Float64Array {
  const buffers = [new Float64Array(t.length), new Float64Array(t.length)]
  let src = t
  for (let axis = 0; axis < rank; axis++) {
    const dst = buffers[axis % 2]
    const stride = 3 ** (rank - 1 - axis)
    for (let f = 0; f < src.length; f++) {
      const d = Math.floor(f / stride) % 3
      const base = f - d * stride
      dst[f] = m[3 * d] * src[base] + m[3 * d + 1] * src[base + stride] + m[3 * d + 2] * src[base + 2 * stride]
    }
    src = dst
  }
  return src
}

/** A parameter space: each parameter is one orbit of flat indices forced equal by permutation symmetry. */
export interface ParameterSpace {
  rank: number
  symmetry: PermutationSymmetry
  /** Flat indices of each parameter, parameters in canonical order. */
  orbits: readonly (readonly number[])[]
  /** Label of each parameter (its representative index, e.g. `xyz`). */
  labels: readonly string[]
  /** Parameter of each flat index. */
  parameterOf: Int32Array
}

function canonicalKey(digits: number[], symmetry: PermutationSymmetry): string {
  if (symmetry === 'none') return digits.join('')
  if (symmetry === 'kleinman') return [...digits].sort().join('')
  return String(digits[0]) + [...digits.slice(1)].sort().join('')
}

/** Sort key of a parameter: Voigt order (d11…d16, d21…, d31…) for rank 3, lexicographic otherwise. */
function orderKey(digits: number[]): number {
  if (digits.length === 3) {
    const pair = [...digits.slice(1)].sort().join('')
    return digits[0] * 6 + VOIGT_PAIRS.indexOf(pair)
  }
  return digits.reduce((f, d) => 3 * f + d, 0)
}

/**
 * Per (rank, symmetry): a handful of entries (ranks 3–6, three modes). Orbits and labels are frozen; `parameterOf`
 * never leaves the engine uncopied.
 */
const spaceCache = new BoundedCache<string, ParameterSpace>(64)

/** Parameter space of a rank-`rank` tensor under the given permutation symmetry (cached). */
export function parameterSpace(rank: number, symmetry: PermutationSymmetry): ParameterSpace {
  const cacheKey = `${rank}|${symmetry}`
  const hit = spaceCache.get(cacheKey)
  if (hit) return hit
  const groups = new Map<string, number[]>()
  for (let f = 0; f < 3 ** rank; f++) {
    const key = canonicalKey(indexDigits(f, rank), symmetry)
    const g = groups.get(key)
    if (g) g.push(f)
    else groups.set(key, [f])
  }
  const rep = (orbit: number[]) => Math.min(...orbit.map((f) => orderKey(indexDigits(f, rank)) * 1e6 + f))
  const orbits = [...groups.values()].sort((a, b) => rep(a) - rep(b))
  const parameterOf = new Int32Array(3 ** rank)
  orbits.forEach((o, p) => o.forEach((f) => (parameterOf[f] = p)))
  const labels = orbits.map((o) => {
    const best = [...o].sort((a, b) => orderKey(indexDigits(a, rank)) - orderKey(indexDigits(b, rank)) || a - b)[0]
    return indexLabel(best, rank)
  })
  const space: ParameterSpace = Object.freeze({
    rank,
    symmetry,
    orbits: Object.freeze(orbits.map((o) => Object.freeze(o))),
    labels: Object.freeze(labels),
    parameterOf,
  })
  return spaceCache.set(cacheKey, space)
}

/** Full tensor of a parameter vector. */
export function expandParameters(space: ParameterSpace, params: readonly number[]): Float64Array {
  const t = new Float64Array(3 ** space.rank)
  space.orbits.forEach((o, p) => {
    if (params[p] !== 0) for (const f of o) t[f] = params[p]
  })
  return t
}

/** Frobenius norm of a flat tensor. */
export function tensorNorm(t: Float64Array): number {
  let s = 0
  for (let i = 0; i < t.length; i++) s += t[i] * t[i]
  return Math.sqrt(s)
}
