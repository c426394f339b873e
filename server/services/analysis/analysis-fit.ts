import {
  describePatternBasis,
  fitPolarSweep,
  predictPattern,
  readSweepText,
  type FitOptions,
  type PolarFitResult,
  type PolarSweep,
  type ReadSweepOptions,
} from '../../../shared/analysis'
import type { FitRequest } from '../../../shared/schemas/analysis'
import { asFieldError, formatDirection, type CrystalModel } from './analysis-model'

/**
 * A polar fit of a sweep file with the crystal model of an array (pure: no database).
 * Time guard (a request must stay under ~3 s on a 2-core machine): at most MAX_FIT_POINTS points
 * are fitted (every k-th angle of a denser sweep), 7 starting azimuths (a prime count, so no start
 * falls on a stationary point of a 2-, 3-, 4- or 6-fold pattern) and fewer iterations per start
 * when the model has many free tensor ratios. The library's defaults (24 × 100) are for offline use.
 */
export const MAX_FIT_POINTS = 360
export function fitOptions(basisCount: number): FitOptions {
  return basisCount <= 2
    ? { azimuthStarts: 7, maxIterations: 40 }
    : basisCount <= 4
      ? { azimuthStarts: 5, maxIterations: 25 }
      : { azimuthStarts: 5, maxIterations: 15 }
}

/** Keep every k-th angle so that at most MAX_FIT_POINTS intensities are fitted. */
function thinSweep(sweep: PolarSweep): { sweep: PolarSweep; every: number } {
  const total = sweep.anglesDeg.length * sweep.channels.length
  const every = Math.max(1, Math.ceil(total / MAX_FIT_POINTS))
  if (every === 1) return { sweep, every }
  const keep = (_: unknown, i: number) => i % every === 0
  return {
    sweep: {
      ...sweep,
      anglesDeg: sweep.anglesDeg.filter(keep),
      channels: sweep.channels.map((c) => ({ ...c, intensity: c.intensity.filter(keep) })),
    },
    every,
  }
}

/** Which input a library error concerns, as a request field (`file` for everything about the table). */
const fitField = (f: string) =>
  ['file', 'sweep', 'spectrum'].includes(f)
    ? 'file'
    : f === 'model'
      ? 'arrayId'
      : f === 'angleColumn'
        ? 'columns.angle'
        : f === 'intensityColumns'
          ? 'columns.intensities'
          : f

export interface FitAnswer {
  kind: 'polar_fit'
  order: number
  model: PolarFitResult['model']
  referenceDirection: string
  azimuth: { value: number; sigma: number; periodDeg: number; isDetermined: boolean }
  /** Where the records (chip rotation on the wafer flat) put the same direction, reduced to [0, period). */
  expectedAzimuthDeg: number
  /** Fitted − expected, wrapped to (−period/2, period/2]. */
  deviationDeg: number
  sentence: string
  ratios: PolarFitResult['ratios']
  scale: PolarFitResult['scale']
  backgrounds: PolarFitResult['backgrounds']
  rSquared: number
  dof: number
  residuals: PolarFitResult['residuals']
  symmetry: PolarFitResult['symmetry']
  isSymmetryMatch: boolean
  /** Fitted curves every 2° for each channel (scale × pattern + background). */
  curves: { column: string; analyser: string; points: [number, number][] }[]
  sweep: {
    angleColumn: string
    angleUnit: 'deg' | 'rad'
    angleUnitReason: string
    channels: { column: string; analyser: string }[]
    skipped: { line: number; reason: string }[]
    notes: string[]
  }
  notes: string[]
  assumptions: readonly string[]
}

const mod = (x: number, p: number) => ((x % p) + p) % p
const fmt = (x: number, digits = 1) => (Number.isFinite(x) ? x.toFixed(digits) : '?')

export function runFit(
  text: string,
  crystal: CrystalModel,
  input: Pick<FitRequest, 'angleUnit' | 'columns'>,
): FitAnswer {
  const options: ReadSweepOptions = { angleUnit: input.angleUnit }
  if (input.columns?.angle !== undefined) options.angleColumn = input.columns.angle
  if (input.columns?.intensities) options.intensityColumns = input.columns.intensities
  let fit: PolarFitResult
  let sweep: PolarSweep
  let every: number
  try {
    const read = thinSweep(readSweepText(text, options))
    sweep = read.sweep
    every = read.every
    fit = fitPolarSweep(sweep, crystal.model, fitOptions(describePatternBasis(crystal.model).labels.length))
  } catch (err) {
    return asFieldError(err, fitField)
  }
  const period = fit.azimuthPeriodDeg
  const expected = mod(-crystal.chip.rotationDeg, period)
  const deviation = mod(fit.azimuth.value - expected + period / 2, period) - period / 2
  const dir = formatDirection(crystal.model.reference)
  const sigma = fit.azimuth.sigma
  const sentence = fit.isAzimuthDetermined
    ? `The crystal's ${dir} direction (the wafer flat) points ${fmt(fit.azimuth.value)}° ± ${fmt(sigma, sigma < 0.1 ? 2 : 1)}° counter-clockwise from the chip's reference edge` +
      (period < 360
        ? ` (the pattern repeats every ${fmt(period, 0)}°, so the angle is known modulo ${fmt(period, 0)}°).`
        : '.')
    : `The fit cannot fix the direction of the crystal axes: the predicted pattern does not change when the crystal turns (isotropic in the plane).`
  const ratios = fit.ratios.map((r) => (r.role === 'not-observable' ? 0 : (r.value ?? 0)))
  const angles = Array.from({ length: 181 }, (_, i) => i * 2)
  const unit = predictPattern(crystal.model, ratios, fit.azimuth.value, angles)
  const curves = sweep.channels.map((c, ci) => ({
    column: c.column,
    analyser: c.analyser,
    points: unit.map(
      (p) => [p.angleDeg, fit.scale.value * p[c.analyser] + fit.backgrounds[ci].value] as [number, number],
    ),
  }))
  return {
    kind: 'polar_fit',
    order: crystal.model.order,
    model: fit.model,
    referenceDirection: dir,
    azimuth: { value: fit.azimuth.value, sigma, periodDeg: period, isDetermined: fit.isAzimuthDetermined },
    expectedAzimuthDeg: expected,
    deviationDeg: deviation,
    sentence,
    ratios: fit.ratios,
    scale: fit.scale,
    backgrounds: fit.backgrounds,
    rSquared: fit.rSquared,
    dof: fit.dof,
    residuals: fit.residuals,
    symmetry: fit.symmetry,
    isSymmetryMatch: fit.isSymmetryMatch,
    curves,
    sweep: {
      angleColumn: sweep.angleColumn,
      angleUnit: sweep.angleUnit,
      angleUnitReason: sweep.angleUnitReason,
      channels: sweep.channels.map((c) => ({ column: c.column, analyser: c.analyser })),
      skipped: sweep.skipped.slice(0, 200),
      notes: sweep.notes,
    },
    notes:
      every > 1
        ? [
            `the sweep was thinned to every ${every}th angle for the fit (at most ${MAX_FIT_POINTS} points) to keep the answer quick`,
            ...fit.notes,
          ]
        : fit.notes,
    assumptions: fit.assumptions,
  }
}
