/**
 * The χ(N) tensor of one sample in the lab frame, with its cylindrical content and mirror parities,
 * cached per (point group, cut, azimuth, order, surface, permutation symmetry). Bulk: the solved
 * crystal form rotated by the cut. Surface: the isotropic-interface (∞m) form, already in the lab
 * frame (z = normal), which replaces the bulk tensor.
 */
import type { Mat3, Vec3 } from './linalg'
import type { PointGroup } from './point-groups'
import type { TensorForm } from './tensor-forms'
import type { PermutationSymmetry } from './tensor-space'
import type { CylindricalContent } from './cylindrical-content'
import type { Parity } from './mirror-parity'
import { getPointGroup } from './point-groups'
import { solveTensorForm } from './tensor-forms'
import { labFrame, rotateToSample } from './cut-rotation'
import { computeCylindricalContent } from './cylindrical-content'
import { computeMirrorParity } from './mirror-parity'
import { normalizeMirror } from './structure'

/** What identifies a sample tensor. Vectors in the crystal Cartesian frame, azimuth in degrees. */
export interface SampleTensorInput {
  pointGroup: string
  normal: Vec3
  reference: Vec3
  azimuthDeg?: number
  order: number
  surface?: boolean
  symmetry?: PermutationSymmetry
}

/** A lab-frame tensor subspace with its derived content (see module doc). */
export interface SampleTensor {
  key: string
  group: PointGroup
  /** The solved form used (crystal form, or the ∞m form when `isSurface`). */
  form: TensorForm
  isSurface: boolean
  frame: Mat3
  rank: number
  /** Lab-frame basis tensors of the allowed subspace. */
  tensors: readonly Float64Array[]
  content: CylindricalContent
  /** Memo of parities per normalised mirror azimuth. */
  parities: Map<number, Parity>
  /** Memo for derivation text that depends only on the sample. */
  notes: string[]
}

const cache = new Map<string, SampleTensor>()
const MAX_CACHE = 10_000

/** Cache key of a sample tensor. */
export function sampleTensorKey(input: SampleTensorInput): string {
  return [input.pointGroup, input.normal.join(','), input.reference.join(','), input.azimuthDeg ?? 0, input.order, input.surface ? 1 : 0, input.symmetry ?? 'intrinsic'].join('|')
}

/** The lab-frame χ(N) of a sample (cached). Throws EngineError for bad group, order or vectors. */
export function prepareSampleTensor(input: SampleTensorInput): SampleTensor {
  const key = sampleTensorKey(input)
  const hit = cache.get(key)
  if (hit) return hit
  const group = getPointGroup(input.pointGroup, 'crystal.pointGroup')
  const frame = labFrame({ normal: input.normal, reference: input.reference, azimuthDeg: input.azimuthDeg })
  const symmetry = input.symmetry ?? 'intrinsic'
  const isSurface = input.surface === true
  const form = solveTensorForm(isSurface ? '∞m' : group.symbol, input.order, { symmetry })
  const tensors = isSurface ? form.tensors : form.tensors.map((t) => rotateToSample(t, form.rank, frame))
  const sample: SampleTensor = {
    key, group, form, isSurface, frame, rank: form.rank, tensors,
    content: computeCylindricalContent(tensors, form.rank), parities: new Map(), notes: [],
  }
  if (cache.size >= MAX_CACHE) cache.clear()
  cache.set(key, sample)
  return sample
}

/** Parity of the sample tensor under the vertical mirror at ψ degrees (lab frame), memoised. */
export function sampleParity(sample: SampleTensor, psiDeg: number): Parity {
  const psi = normalizeMirror(psiDeg)
  let p = sample.parities.get(psi)
  if (p === undefined) {
    p = computeMirrorParity(sample.tensors, sample.rank, psi)
    sample.parities.set(psi, p)
  }
  return p
}

/** Empty the sample-tensor cache (benchmarks measure cold evaluations with it). */
export function clearSampleTensorCache(): void {
  cache.clear()
}
