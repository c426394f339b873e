/**
 * The χ(N) tensor of one sample in the lab frame, with its cylindrical content and mirror parities,
 * cached per (point group, cut, azimuth, order, surface, permutation symmetry) in one bounded
 * cache. Inside the engine the cached record is shared (frozen, its typed arrays only read); the
 * public {@link prepareSampleTensor} answers a copy. Bulk: the solved
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
import { cachedTensorForm } from './tensor-forms'
import { labFrame, rotateToSample } from './cut-rotation'
import { computeCylindricalContent } from './cylindrical-content'
import { computeMirrorParity } from './mirror-parity'
import { normalizeMirror } from './structure'
import { explainSample, formatSymmetricSet } from './explain'
import { BoundedCache } from './bounded-cache'

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
  readonly key: string
  readonly group: PointGroup
  /** The solved form used (crystal form, or the ∞m form when `isSurface`). */
  readonly form: TensorForm
  readonly isSurface: boolean
  readonly frame: Mat3
  readonly rank: number
  /** Lab-frame basis tensors of the allowed subspace. */
  readonly tensors: readonly Float64Array[]
  readonly content: Readonly<CylindricalContent>
}

/**
 * A cached sample with what the channel path derives from it alone: Q as text, the sample's
 * derivation steps (made on first use) and its parities per mirror line (at most
 * {@link MAX_PARITIES}). Never handed out of the engine.
 */
export interface SampleEntry {
  readonly sample: SampleTensor
  /** Q as `q.join(',')`, part of cache keys of the channel path. */
  readonly qKey: string
  readonly qText: string
  notes?: readonly string[]
  readonly parities: BoundedCache<number, Parity>
}

const MAX_SAMPLES = 10_000
const MAX_PARITIES = 256
const samples = new BoundedCache<string, SampleEntry>(MAX_SAMPLES)

/** Cache key of a sample tensor. */
export function sampleTensorKey(input: SampleTensorInput): string {
  return `${input.pointGroup}|${vectorKey(input.normal)}|${vectorKey(input.reference)}|${input.azimuthDeg ?? 0}|${input.order}|${input.surface ? 1 : 0}|${input.symmetry ?? 'intrinsic'}`
}

/** `v.join(',')`, formed without the array call for the usual three numbers. */
function vectorKey(v: Vec3): string {
  return v.length === 3 && typeof v[0] === 'number' && typeof v[1] === 'number' && typeof v[2] === 'number'
    ? `${v[0]},${v[1]},${v[2]}`
    : v.join(',')
}

/** The cached entry of a sample (engine-internal). Throws EngineError for bad group, order or vectors. */
export function sampleEntry(input: SampleTensorInput): SampleEntry {
  const key = sampleTensorKey(input)
  return samples.get(key) ?? samples.set(key, makeEntry(key, input))
}

function makeEntry(key: string, input: SampleTensorInput): SampleEntry {
  const group = getPointGroup(input.pointGroup, 'crystal.pointGroup')
  const frame = labFrame({ normal: input.normal, reference: input.reference, azimuthDeg: input.azimuthDeg })
  const symmetry = input.symmetry ?? 'intrinsic'
  const isSurface = input.surface === true
  const form = cachedTensorForm(isSurface ? '∞m' : group.symbol, input.order, { symmetry })
  const tensors = isSurface ? form.tensors : Object.freeze(form.tensors.map((t) => rotateToSample(t, form.rank, frame)))
  const c = computeCylindricalContent(tensors, form.rank)
  const content = Object.freeze({
    q: Object.freeze(c.q),
    weights: Object.freeze(c.weights.map((w) => Object.freeze(w))),
  }) as Readonly<CylindricalContent>
  const sample: SampleTensor = Object.freeze({
    key,
    group,
    form,
    isSurface,
    frame: Object.freeze(frame.slice()),
    rank: form.rank,
    tensors,
    content,
  })
  return {
    sample,
    qKey: content.q.join(','),
    qText: content.q.length ? formatSymmetricSet(content.q) : '',
    parities: new BoundedCache(MAX_PARITIES),
  }
}

/** The lab-frame χ(N) of a sample, the caller's own copy. Throws EngineError for bad group, order or vectors. */
export function prepareSampleTensor(input: SampleTensorInput): SampleTensor {
  const s = sampleEntry(input).sample
  return {
    ...s,
    form: {
      ...s.form,
      space: { ...s.form.space, parameterOf: s.form.space.parameterOf.slice() },
      tensors: s.form.tensors.map((t) => t.slice()),
    },
    tensors: s.tensors.map((t) => t.slice()),
  }
}

/** The derivation steps that depend only on the sample, made once per cached sample. */
export function sampleNotes(
  entry: SampleEntry,
  cut: { normal: Vec3; reference: Vec3; azimuthDeg: number },
): readonly string[] {
  return (entry.notes ??= Object.freeze(explainSample(entry.sample, cut)))
}

/** Parity of the sample tensor under the vertical mirror at ψ degrees (lab frame). */
export function sampleParity(sample: SampleTensor, psiDeg: number): Parity {
  return computeMirrorParity(sample.tensors, sample.rank, normalizeMirror(psiDeg))
}

/** {@link sampleParity} of a cached sample for an azimuth already reduced by `normalizeMirror`, kept with the entry. */
export function entryParity(entry: SampleEntry, psi: number): Parity {
  const hit = entry.parities.get(psi)
  return hit !== undefined
    ? hit
    : entry.parities.set(psi, computeMirrorParity(entry.sample.tensors, entry.sample.rank, psi))
}

/** Empty the sample-tensor cache (benchmarks measure cold evaluations with it). */
export function clearSampleTensorCache(): void {
  samples.clear()
}
