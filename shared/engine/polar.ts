/**
 * The polar-pattern request (the `polar` CLI's and `POST /api/polar`'s input), its validation and
 * its answer: the rotational-anisotropy pattern I(φ) of a bare sample at oblique incidence in the
 * geometry of oblique-pattern.ts (docs/physics.md §6).
 *
 * The sample's χ(N) is the bulk form of `crystal` in the lab frame (as for the channels request),
 * plus, with `surface: true`, the isotropic-interface form (class ∞m, lab frame, z = normal). Each
 * independent element of a form is weighted by `coefficients` / `surfaceCoefficients`, keyed by
 * the element's label (`xyz` for −43m, `zzz`, `zxx`, `xxz` for the interface χ(2)); an element not
 * given weighs 1, and the answer states the weights used. `crystal` may be omitted (or null) when
 * `surface` is true: a surface-only sample (amorphous or centrosymmetric).
 *
 * Defaults: `surface` false, `kleinman` false, `incidence.detect` 'reflection', `stepDeg` 1,
 * `fresnel` false, `pump` and `analyser` 'p'. Required: `order`, `incidence.angleDeg`, and
 * `crystal` unless `surface` is true.
 */
import type { Vec3 } from './linalg'
import type { Complex, Detection, ObliqueGeometry } from './oblique-pattern'
import type { TensorForm } from './tensor-forms'
import type { PermutationSymmetry } from './tensor-space'
import { EngineError, formatValue } from './errors'
import { getPointGroup } from './point-groups'
import { parseDirection } from './directions'
import { checkCut } from './cut-rotation'
import { assertOrder, cachedTensorForm } from './tensor-forms'
import { sampleEntry } from './sample-tensor'
import { readBoolean, readNumber, readObject, readString } from './validate'
import {
  FOURIER_SAMPLES,
  fourierAmplitudes,
  obliqueFields,
  predictObliquePattern,
  significantOrders,
  tensorScale,
} from './oblique-pattern'
import { ENGINE_VERSION } from './version'

/** A validated polar request with defaults applied. Angles in degrees; vectors in the crystal frame. */
export interface PolarRequest {
  crystal: { pointGroup: string; normal: Vec3; reference: Vec3; azimuthDeg: number } | null
  surface: boolean
  kleinman: boolean
  order: number
  geometry: ObliqueGeometry
  stepDeg: number
  coefficients: Record<string, number>
  surfaceCoefficients: Record<string, number>
}

/** One point of the pattern. */
export interface PolarPatternPoint {
  azimuthDeg: number
  intensity: number
}

/** The answer: `harmonics` and `points` are the CLI contract; the rest are extras. */
export interface PolarResponse {
  /** Fourier orders k ≥ 0 of I(φ) with amplitude above 1e-9 of the largest, ascending. */
  harmonics: number[]
  /**
   * One point per `stepDeg` from 0 up to below 360, scaled so that the largest is 1 (all 0 when nothing is detected).
   */
  points: PolarPatternPoint[]
  /** Present when nothing is detected in this geometry. */
  note?: string
  /** The weights used per independent element (bulk: crystal frame; surface: lab frame). */
  coefficients: { bulk?: Record<string, number>; surface?: Record<string, number> }
  engineVersion: string
}

/** Default values of the optional request fields. */
export const POLAR_DEFAULTS = {
  surface: false,
  kleinman: false,
  detect: 'reflection',
  stepDeg: 1,
  polarization: 'p',
} as const

/** Smallest accepted `stepDeg` (at most 3600 points). */
export const MIN_STEP_DEG = 0.1
/** Largest |coefficient| accepted (keeps every squared intensity finite). */
export const MAX_COEFFICIENT = 1e6

/** A detected intensity below this fraction of the largest possible one (|χ|²|E|^{2N}|f|²) is zero. */
const ZERO_INTENSITY = 1e-20

function readPolarization(value: unknown, field: string): number {
  if (value === undefined || value === 'p') return 0
  if (value === 's') return 90
  if (typeof value === 'object' && value !== null && !Array.isArray(value))
    return readNumber((value as Record<string, unknown>).angleDeg, `${field}.angleDeg`)
  throw new EngineError({
    code: 'INVALID_TYPE',
    field,
    value,
    allowed: ['p', 's', '{ "angleDeg": α }'],
    message: `must be "p", "s" or { "angleDeg": α } (degrees from p toward s), got ${formatValue(value)}`,
  })
}

function readComplex(value: unknown, field: string): Complex {
  if (!Array.isArray(value) || value.length !== 2)
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be a complex index [re, im], got ${formatValue(value)}`,
    })
  const re = readNumber(value[0], `${field}.0`)
  const im = readNumber(value[1], `${field}.1`)
  if (!(re > 0) || im < 0 || re > 100 || im > 100)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field,
      value,
      allowed: '0 < re ≤ 100, 0 ≤ im ≤ 100',
      message: `the refractive index needs 0 < Re n ≤ 100 and 0 ≤ Im n ≤ 100 (Im > 0 absorbing), got ${formatValue(value)}`,
    })
  return [re, im]
}

function readCoefficients(value: unknown, field: string): Record<string, number> {
  if (value === undefined) return {}
  const o = readObject(value, field)
  const out: Record<string, number> = {}
  for (const [k, v] of Object.entries(o)) {
    const w = readNumber(v, `${field}.${k}`)
    if (Math.abs(w) > MAX_COEFFICIENT)
      throw new EngineError({
        code: 'OUT_OF_RANGE',
        field: `${field}.${k}`,
        value: v,
        allowed: `|w| ≤ ${MAX_COEFFICIENT}`,
        message: `a coefficient must be at most ${MAX_COEFFICIENT} in size (only ratios matter), got ${formatValue(v)}`,
      })
    out[k] = w
  }
  return out
}

/** Validate an untrusted polar request; throws EngineError whose `field` is the dot path of the bad input. */
export function parsePolarRequest(input: unknown): PolarRequest {
  const r = readObject(input, '')
  const surface = readBoolean(r.surface, 'surface', POLAR_DEFAULTS.surface)
  let crystal: PolarRequest['crystal'] = null
  if (r.crystal === undefined || r.crystal === null) {
    if (!surface)
      throw new EngineError({
        code: 'MISSING_FIELD',
        field: 'crystal',
        value: r.crystal,
        message: 'a crystal is required unless surface is true (a surface-only sample)',
      })
  } else {
    const c = readObject(r.crystal, 'crystal')
    const group = getPointGroup(readString(c.pointGroup, 'crystal.pointGroup'), 'crystal.pointGroup')
    const normal = parseDirection(c.normal, 'crystal.normal', group.isCubic)
    const reference = parseDirection(c.reference, 'crystal.reference', group.isCubic)
    const azimuthDeg = readNumber(c.azimuth, 'crystal.azimuth', 0)
    checkCut({ normal, reference, azimuthDeg })
    crystal = { pointGroup: group.symbol, normal, reference, azimuthDeg }
  }
  readNumber(r.order, 'order')
  assertOrder(r.order, 'order')
  const inc = readObject(r.incidence, 'incidence')
  const angleDeg = readNumber(inc.angleDeg, 'incidence.angleDeg')
  if (angleDeg < 0 || angleDeg >= 90)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'incidence.angleDeg',
      value: angleDeg,
      allowed: '0 ≤ θ < 90',
      message: `the angle of incidence must be from 0 up to below 90 degrees, got ${angleDeg}`,
    })
  const detect = inc.detect === undefined ? POLAR_DEFAULTS.detect : readString(inc.detect, 'incidence.detect')
  if (detect !== 'reflection' && detect !== 'transmission')
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'incidence.detect',
      value: detect,
      allowed: ['reflection', 'transmission'],
      message: `must be "reflection" or "transmission", got ${formatValue(detect)}`,
    })
  const stepDeg = readNumber(r.stepDeg, 'stepDeg', POLAR_DEFAULTS.stepDeg)
  if (stepDeg < MIN_STEP_DEG || stepDeg > 360)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'stepDeg',
      value: stepDeg,
      allowed: `${MIN_STEP_DEG} to 360`,
      message: `the step must be from ${MIN_STEP_DEG} to 360 degrees, got ${stepDeg}`,
    })
  let fresnel: ObliqueGeometry['fresnel']
  if (r.fresnel !== undefined && r.fresnel !== false) {
    const f = readObject(r.fresnel, 'fresnel')
    const n = readComplex(f.n, 'fresnel.n')
    fresnel = { n, n2: f.n2 === undefined ? n : readComplex(f.n2, 'fresnel.n2') }
  }
  const kleinman = readBoolean(r.kleinman, 'kleinman', POLAR_DEFAULTS.kleinman)
  const coefficients = readCoefficients(r.coefficients, 'coefficients')
  const surfaceCoefficients = readCoefficients(r.surfaceCoefficients, 'surfaceCoefficients')
  const request: PolarRequest = {
    crystal,
    surface,
    kleinman,
    order: r.order,
    stepDeg,
    coefficients,
    surfaceCoefficients,
    geometry: {
      angleDeg,
      detect: detect as Detection,
      fresnel,
      pumpDeg: readPolarization(r.pump, 'pump'),
      analyserDeg: readPolarization(r.analyser, 'analyser'),
    },
  }
  // Unknown coefficient labels are refused here, so a typo never silently weighs 1.
  const symmetry: PermutationSymmetry = kleinman ? 'kleinman' : 'intrinsic'
  if (crystal) weights(cachedTensorForm(crystal.pointGroup, request.order, { symmetry }), coefficients, 'coefficients')
  else if (Object.keys(coefficients).length)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'coefficients',
      value: coefficients,
      message: 'bulk coefficients need a crystal',
    })
  if (surface) weights(cachedTensorForm('∞m', request.order, { symmetry }), surfaceCoefficients, 'surfaceCoefficients')
  else if (Object.keys(surfaceCoefficients).length)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'surfaceCoefficients',
      value: surfaceCoefficients,
      message: 'surface coefficients need surface: true',
    })
  return request
}

/** The weight of each independent element of `form` (label → weight, 1 when not given). */
function weights(form: TensorForm, given: Record<string, number>, field: string): Record<string, number> {
  const labels = form.pivots.map((p) => form.space.labels[p])
  for (const k of Object.keys(given))
    if (!labels.includes(k))
      throw new EngineError({
        code: 'OUT_OF_RANGE',
        field: `${field}.${k}`,
        value: k,
        allowed: labels,
        message: labels.length
          ? `${JSON.stringify(k)} is not an independent element of this χ(${form.order}); expected one of ${labels.join(', ')}`
          : `this χ(${form.order}) has no independent element (it vanishes)`,
      })
  return Object.fromEntries(labels.map((l) => [l, given[l] ?? 1]))
}

function addWeighted(into: Float64Array, tensors: readonly Float64Array[], w: readonly number[]): void {
  tensors.forEach((t, i) => {
    if (w[i] !== 0) for (let f = 0; f < t.length; f++) into[f] += w[i] * t[f]
  })
}

/** The sample's lab-frame χ(N) (bulk plus optional interface term) and the weights used. */
export function polarSampleTensor(req: PolarRequest): {
  tensor: Float64Array
  coefficients: PolarResponse['coefficients']
} {
  const symmetry: PermutationSymmetry = req.kleinman ? 'kleinman' : 'intrinsic'
  const tensor = new Float64Array(3 ** (req.order + 1))
  const coefficients: PolarResponse['coefficients'] = {}
  if (req.crystal) {
    const entry = sampleEntry({ ...req.crystal, order: req.order, symmetry })
    const w = weights(entry.sample.form, req.coefficients, 'coefficients')
    coefficients.bulk = w
    addWeighted(tensor, entry.sample.tensors, Object.values(w))
  }
  if (req.surface) {
    const form = cachedTensorForm('∞m', req.order, { symmetry })
    const w = weights(form, req.surfaceCoefficients, 'surfaceCoefficients')
    coefficients.surface = w
    addWeighted(tensor, form.tensors, Object.values(w))
  }
  return { tensor, coefficients }
}

/** The azimuths of the returned points: 0, step, 2·step … below 360 (rounded to 1e-9 degree). */
export function polarAzimuths(stepDeg: number): number[] {
  const out: number[] = []
  for (let i = 0; i * stepDeg < 360 - 1e-9; i++) out.push(Math.round(i * stepDeg * 1e9) / 1e9)
  return out
}

/** Validate `request` (throws EngineError with `field`) and compute its polar pattern. */
export function computePolar(request: unknown): PolarResponse {
  return evaluatePolar(parsePolarRequest(request))
}

/** The polar pattern of a validated request. */
export function evaluatePolar(req: PolarRequest): PolarResponse {
  const { tensor, coefficients } = polarSampleTensor(req)
  const g = req.geometry
  const grid = Array.from({ length: FOURIER_SAMPLES }, (_, j) => (360 * j) / FOURIER_SAMPLES)
  const sampled = predictObliquePattern(tensor, g, grid)
  const azimuths = polarAzimuths(req.stepDeg)
  const raw = predictObliquePattern(tensor, g, azimuths)
  const { pump, detector } = obliqueFields(g)
  const sq = (v: readonly Complex[]) => v.reduce((s, c) => s + c[0] * c[0] + c[1] * c[1], 0)
  const bound = tensorScale(tensor) * sq(pump) ** req.order * sq(detector)
  const peak = Math.max(...sampled, ...raw)
  if (!(peak > ZERO_INTENSITY * bound)) {
    return {
      harmonics: [],
      points: azimuths.map((azimuthDeg) => ({ azimuthDeg, intensity: 0 })),
      note: 'nothing is detected in this geometry: the tensor gives no field along the analyser at any azimuth',
      coefficients,
      engineVersion: ENGINE_VERSION,
    }
  }
  const floor = ZERO_INTENSITY * bound
  const rawMax = Math.max(...raw)
  return {
    harmonics: significantOrders(fourierAmplitudes(sampled)),
    points: azimuths.map((azimuthDeg, i) => ({
      azimuthDeg,
      intensity: rawMax > floor && raw[i] > floor ? raw[i] / rawMax : 0,
    })),
    coefficients,
    engineVersion: ENGINE_VERSION,
  }
}
