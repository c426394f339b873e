/**
 * Tensor forms of χ(N), N = 2…5 (rank N+1), SOLVED as the invariant subspace of a point group:
 * the null space of (g·T − T) over the generators g, within the parameter space fixed by the
 * permutation symmetry. Nothing is typed in by hand. Frame: crystal Cartesian frame, standard
 * setting of `data/generators.ts`. Units: the basis is dimensionless (one unit per independent
 * parameter); for χ(2) the parameters are read as d-coefficients (d = χ(2)/2).
 */
import type { Mat3 } from './linalg'
import { nullSpace, rref } from './linalg'
import type { ParameterSpace, PermutationSymmetry } from './tensor-space'
import { expandParameters, parameterSpace, transformTensor } from './tensor-space'
import { getPointGroup } from './point-groups'
import { EngineError } from './errors'
import { BoundedCache } from './bounded-cache'

/** Lowest supported nonlinear order N (χ(2), rank 3). */
export const MIN_ORDER = 2
/** Highest supported nonlinear order N (χ(5), rank 6). */
export const MAX_ORDER = 5

/** The solved form of χ(N) for one point group. */
export interface TensorForm {
  pointGroup: string
  order: number
  rank: number
  symmetry: PermutationSymmetry
  space: ParameterSpace
  /** Canonical basis (reduced row echelon form) in parameter coordinates: one row per independent parameter. */
  basis: readonly (readonly number[])[]
  /** The same basis as full Cartesian tensors. */
  tensors: readonly Float64Array[]
  /** Parameter index of the leading (pivot) entry of each basis vector; it names the independent parameter. */
  pivots: readonly number[]
  /** Number of independent parameters (dimension of the invariant subspace). */
  independentCount: number
  /** Number of non-zero elements of the full tensor (all 3^(N+1) index combinations) for a generic member. */
  nonZeroCount: number
}

/** Options of {@link solveTensorForm}. */
export interface TensorFormOptions {
  /** Permutation symmetry imposed before the point group; default `intrinsic`. */
  symmetry?: PermutationSymmetry
}

/** Throws OUT_OF_RANGE unless `order` is an integer in 2…5. */
export function assertOrder(order: unknown, field = 'order'): asserts order is number {
  if (typeof order !== 'number' || !Number.isInteger(order) || order < MIN_ORDER || order > MAX_ORDER)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field,
      value: order,
      allowed: [2, 3, 4, 5],
      message: `order must be an integer from ${MIN_ORDER} to ${MAX_ORDER} (χ(N), N = 2 for SHG), got ${JSON.stringify(order)}`,
    })
}

/**
 * Solve the invariant subspace of a rank-`rank` tensor for arbitrary generator matrices.
 * Constraint rows: for each generator g and each parameter p, (g·E_p − E_p) restricted to one
 * representative index per orbit (the difference keeps the permutation symmetry).
 */
export function solveInvariantSubspace(
  generators: readonly Mat3[],
  rank: number,
  symmetry: PermutationSymmetry,
): Omit<TensorForm, 'pointGroup' | 'order'> {
  const space = parameterSpace(rank, symmetry)
  const P = space.orbits.length
  const reps = space.orbits.map((o) => o[0])
  const rows: number[][] = []
  for (const g of generators) {
    const columns = space.orbits.map((_, p) => {
      const unit = new Array<number>(P).fill(0)
      unit[p] = 1
      const e = expandParameters(space, unit)
      const ge = transformTensor(e, rank, g)
      return reps.map((f) => ge[f] - e[f])
    })
    for (let r = 0; r < P; r++) rows.push(columns.map((c) => c[r]))
  }
  const raw = nullSpace(rows, P)
  const { rows: basis, pivots } = rref(raw, P)
  const clean = basis.map((v) => v.map(snap))
  const tensors = clean.map((v) => expandParameters(space, v))
  let nonZeroCount = 0
  space.orbits.forEach((o, p) => {
    if (clean.some((v) => v[p] !== 0)) nonZeroCount += o.length
  })
  return {
    rank,
    symmetry,
    space: copySpace(space),
    basis: clean,
    tensors,
    pivots,
    independentCount: clean.length,
    nonZeroCount,
  }
}

/** A caller's own copy of a parameter space (its index table is a typed array, which cannot be frozen). */
function copySpace(space: ParameterSpace): ParameterSpace {
  return { ...space, parameterOf: space.parameterOf.slice() }
}

/** Snap round-off: values within 1e-10 of an integer or of ±1/2 multiples become exact. */
function snap(v: number): number {
  if (Math.abs(v) < 1e-10) return 0
  const twice = Math.round(2 * v)
  return Math.abs(2 * v - twice) < 1e-10 ? twice / 2 : v
}

/** Solved forms per (group, order, symmetry): at most 34 groups × 4 orders × 3 modes are ever asked for. */
const formCache = new BoundedCache<string, TensorForm>(512)

/**
 * The χ(N) form of a point group (32 classes in standard settings, or the limiting groups `∞m`,
 * `∞∞m`), solved from the generators; cached per (group, order, symmetry). Each call answers the
 * caller's own copy.
 * @param pointGroup Hermann–Mauguin symbol (crystal frame, IEEE Std 176 settings).
 * @param order N = 2…5.
 */
export function solveTensorForm(pointGroup: string, order: number, options: TensorFormOptions = {}): TensorForm {
  const form = cachedTensorForm(pointGroup, order, options)
  return { ...form, space: copySpace(form.space), tensors: form.tensors.map((t) => t.slice()) }
}

/**
 * {@link solveTensorForm} as kept in the cache, shared by every caller inside the engine: frozen,
 * except the typed arrays (`tensors`, `space.parameterOf`), which engine code only reads.
 */
export function cachedTensorForm(pointGroup: string, order: number, options: TensorFormOptions = {}): TensorForm {
  assertOrder(order)
  const symmetry = options.symmetry ?? 'intrinsic'
  const group = getPointGroup(pointGroup)
  return formCache.getOrSet(`${group.symbol}|${order}|${symmetry}`, () => {
    const solved = solveInvariantSubspace(group.generators, order + 1, symmetry)
    return Object.freeze({
      pointGroup: group.symbol,
      order,
      ...solved,
      space: Object.freeze(solved.space),
      basis: Object.freeze(solved.basis.map((row) => Object.freeze(row))),
      tensors: Object.freeze(solved.tensors),
      pivots: Object.freeze(solved.pivots),
    })
  })
}

/** Empty the tensor-form cache (benchmarks measure cold solves with it). */
export function clearTensorFormCache(): void {
  formCache.clear()
}
