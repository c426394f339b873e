/**
 * Predicted polarisation-resolved harmonic patterns at normal incidence (bulk-tensor model).
 *
 * Model (state it in the UI, see {@link PATTERN_ASSUMPTIONS}): a linearly polarised pump at angle θ
 * from lab x (the chip's reference edge), E = (cos θ, sin θ, 0), drives P_i = χ_{i j…}E_j…E_k
 * (order N = 2 or 3, χ(N) from the engine's solved form); only the in-plane components P_x, P_y
 * radiate along the normal. Analyser parallel: (P·e_θ)²; perpendicular: (P·e_θ+90°)²; none:
 * P_x² + P_y². `normal` (P_z²) is reported but is not detected at normal incidence.
 *
 * Frames: crystal vectors in the engine's crystal Cartesian frame (IEEE Std 176 settings). The
 * crystal sits with `reference` along lab x when `azimuthDeg` = 0; `azimuthDeg` rotates the
 * crystal counter-clockwise seen from +z (the outward normal), so I(θ; φ) = I(θ − φ; 0).
 * Units: arbitrary (square of the tensor's units; the first basis element has unit weight).
 */
import type { Vec3 } from '../engine'
import { EngineError, predictPolarPattern, prepareSampleTensor, transformTensor, voigtName } from '../engine'

/** Assumptions behind every predicted or fitted pattern; the UI must show them beside the plot. */
export const PATTERN_ASSUMPTIONS: readonly string[] = [
  'normal incidence: the pump propagates along the sample normal and only harmonic light emitted along the normal is detected',
  'bulk χ(N) of the crystal class only: no surface, interface, defect or shape (nanostructure) contributions',
  'no local-field, Fresnel, absorption or resonance effects; the tensor ratios are effective, real and dispersion-free',
  'no depolarisation by a high-NA objective: the pump field is purely in-plane and off-normal emission is not collected',
]

/** The material and cut of a pattern. Vectors in the crystal Cartesian frame. */
export interface PatternModel {
  pointGroup: string
  normal: Vec3
  reference: Vec3
  /** Harmonic order N: 2 (SHG) or 3 (THG). */
  order: number
}

/** One predicted point: intensities for each analyser, arbitrary units. */
export interface PatternPoint {
  angleDeg: number
  parallel: number
  perpendicular: number
  none: number
  /** P_z²: generated but not radiated along the normal (shown only as a diagnostic). */
  normal: number
}

/** The independent components (canonical basis of the engine's solved form) of a model. */
export interface PatternBasis {
  /** Name of each basis element: Voigt d_il for χ(2) (standard setting), index label otherwise. */
  labels: string[]
  /** Lab-frame basis tensors at azimuth 0. */
  tensors: readonly Float64Array[]
}

/** The engine's basis of χ(N) for the model, rotated into the lab frame at azimuth 0. */
export function describePatternBasis(model: PatternModel): PatternBasis {
  if (model.order !== 2 && model.order !== 3)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'order',
      value: model.order,
      allowed: [2, 3],
      message: `polar patterns are modelled for orders 2 and 3, got ${JSON.stringify(model.order)}`,
    })
  const sample = prepareSampleTensor({
    pointGroup: model.pointGroup,
    normal: model.normal,
    reference: model.reference,
    order: model.order,
  })
  const labels = sample.form.pivots.map((p) => basisLabel(sample.form.space.labels[p]))
  return { labels, tensors: sample.tensors }
}

const PAIRS = ['xx', 'yy', 'zz', 'yz', 'xz', 'xy']

function basisLabel(label: string): string {
  if (label.length !== 3) return `χ${label}`
  const pair = [...label.slice(1)].sort().join('')
  return voigtName('xyz'.indexOf(label[0]), PAIRS.indexOf(pair))
}

/** Rotation of a lab-frame tensor by φ degrees about z (active, counter-clockwise seen from +z). */
export function rotateAboutNormal(t: Float64Array, rank: number, azimuthDeg: number): Float64Array {
  const a = (azimuthDeg * Math.PI) / 180
  const [c, s] = [Math.cos(a), Math.sin(a)]
  return transformTensor(t, rank, [c, -s, 0, s, c, 0, 0, 0, 1])
}

/**
 * Lab-frame χ(N) = R_z(φ)·Σ ratios_k·basis_k. `ratios` has one weight per basis element
 * (default: 1 for the first, 0 for the others). Throws EngineError for a wrong-length list.
 */
export function buildLabTensor(model: PatternModel, ratios?: readonly number[], azimuthDeg = 0): Float64Array {
  const basis = describePatternBasis(model)
  const w = ratios ?? basis.tensors.map((_, k) => (k === 0 ? 1 : 0))
  if (w.length !== basis.tensors.length || !w.every(Number.isFinite))
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'ratios',
      value: w,
      allowed: basis.labels,
      message: `give ${basis.tensors.length} finite ratios, one per independent component (${basis.labels.join(', ')})`,
    })
  const t = new Float64Array(3 ** (model.order + 1))
  basis.tensors.forEach((b, k) => b.forEach((v, f) => (t[f] += w[k] * v)))
  return azimuthDeg === 0 ? t : rotateAboutNormal(t, model.order + 1, azimuthDeg)
}

/** Induced polarisation (P_x, P_y, P_z) of a lab-frame χ(N) for a pump at θ degrees (in-plane, unit field). */
export function inducedPolarization(tensor: Float64Array, order: number, angleDeg: number): Vec3 {
  const a = (angleDeg * Math.PI) / 180
  const e = [Math.cos(a), Math.sin(a), 0]
  const p = [0, 0, 0]
  const per = 3 ** order
  for (let f = 0; f < tensor.length; f++) {
    if (tensor[f] === 0) continue
    let prod = tensor[f]
    for (let rest = f % per, d = 0; d < order; d++, rest = Math.floor(rest / 3)) prod *= e[rest % 3]
    p[Math.floor(f / per)] += prod
  }
  return [p[0], p[1], p[2]]
}

/** Predicted pattern of the model with the given ratios and crystal azimuth, at `anglesDeg`. */
export function predictPattern(
  model: PatternModel,
  ratios: readonly number[] | undefined,
  azimuthDeg: number,
  anglesDeg: readonly number[],
): PatternPoint[] {
  const t = buildLabTensor(model, ratios, azimuthDeg)
  const engine = model.order === 2 ? predictPolarPattern(t, anglesDeg) : undefined
  return anglesDeg.map((angleDeg, i) => {
    const p = inducedPolarization(t, model.order, angleDeg)
    const a = (angleDeg * Math.PI) / 180
    const par = p[0] * Math.cos(a) + p[1] * Math.sin(a)
    const perp = -p[0] * Math.sin(a) + p[1] * Math.cos(a)
    const parallel = engine ? engine[i].parallel : par * par
    const perpendicular = engine ? engine[i].perpendicular : perp * perp
    return { angleDeg, parallel, perpendicular, none: p[0] * p[0] + p[1] * p[1], normal: p[2] * p[2] }
  })
}
