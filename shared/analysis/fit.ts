/**
 * Fit of a polarisation sweep with the bulk-tensor model of the array's material and cut
 * (`patterns.ts`): free parameters are an overall scale s ≥ 0, the in-plane azimuth φ of the
 * crystal axes relative to the chip's reference edge (lab x; counter-clockwise seen from +z), the
 * observable tensor ratios (first observable basis element fixed to 1) and one background per
 * channel. Levenberg–Marquardt from `ml-levenberg-marquardt` with the exact Jacobian, restarted
 * from several azimuths across 360° (the landscape has one minimum per pattern period and more),
 * keeping the lowest residual. Uncertainties: σ = sqrt(diag((JᵀJ)⁻¹)·SSR/(n − p)) at the optimum
 * (standard linearised least-squares errors; they assume independent, equal-variance noise).
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt'
import type { PatternModel } from './patterns'
import { PATTERN_ASSUMPTIONS } from './patterns'
import type { Analyser, PolarSweep } from './sweep'
import type { FitDesign } from './fit-model'
import { amplitudeBasis, evaluatePoint } from './fit-model'
import { chooseObservable, linearStart, patternPeriod } from './fit-support'
import { invert, normalMatrix } from './linalg'
import { findDominantHarmonic } from './symmetry'
import { AnalysisError } from './errors'

/** Options of {@link fitPolarSweep}. */
export interface FitOptions {
  /**
   * Number of starting azimuths spread over 360°; default 24 (15° apart: at least 4 per period of a six-fold pattern).
   */
  azimuthStarts?: number
  /** Iteration cap per start; default 100. */
  maxIterations?: number
}

/** A fitted quantity with its 1σ uncertainty (NaN when the covariance is singular). */
export interface Estimate {
  value: number
  sigma: number
}

/** One independent tensor component of the model. `value` null: not observable in this geometry. */
export interface FittedRatio {
  label: string
  value: number | null
  sigma: number
  role: 'reference' | 'fitted' | 'not-observable'
}

/** One residual point (original intensity units). */
export interface FitResidual {
  angleDeg: number
  column: string
  analyser: Analyser
  observed: number
  model: number
  residual: number
}

/** Symmetry check of one channel: dominant harmonic of the data versus the fitted model. */
export interface SymmetryCheck {
  column: string
  analyser: Analyser
  dataFold: number
  modelFold: number
  isMatch: boolean
}

/** Result of {@link fitPolarSweep}. */
export interface PolarFitResult {
  model: PatternModel
  /** Azimuth of the crystal axes from the reference edge, degrees, reduced to [0, period). */
  azimuth: Estimate
  /** The fitted pattern repeats when the crystal turns by this angle (degrees): φ is known modulo it. */
  azimuthPeriodDeg: number
  isAzimuthDetermined: boolean
  ratios: FittedRatio[]
  scale: Estimate
  backgrounds: (Estimate & { column: string })[]
  rSquared: number
  /** Sum of squared residuals and degrees of freedom n − p. */
  ssr: number
  dof: number
  residuals: FitResidual[]
  symmetry: SymmetryCheck[]
  isSymmetryMatch: boolean
  starts: number
  assumptions: readonly string[]
  notes: string[]
}

/** Fit `sweep` with the model. Throws AnalysisError NOTHING_TO_FIT / TOO_FEW_POINTS / FIT_FAILED. */
export function fitPolarSweep(sweep: PolarSweep, model: PatternModel, options: FitOptions = {}): PolarFitResult {
  const { labels, amplitudes } = amplitudeBasis(model)
  const analysers = sweep.channels.map((c) => c.analyser)
  const fitted = chooseObservable(amplitudes, analysers)
  if (fitted.length === 0)
    throw new AnalysisError({
      code: 'NOTHING_TO_FIT',
      field: 'model',
      value: model,
      message: `the bulk ${model.pointGroup} tensor on this cut gives no in-plane harmonic field at normal incidence (order ${model.order}); there is no pattern to fit`,
      hint: 'the signal, if any, comes from effects outside the model (surface, shape, oblique or high-NA collection)',
    })
  const anglesRad: number[] = []
  const channel: number[] = []
  const y: number[] = []
  sweep.channels.forEach((c, ci) =>
    c.intensity.forEach((v, i) => (anglesRad.push((sweep.anglesDeg[i] * Math.PI) / 180), channel.push(ci), y.push(v))),
  )
  const p = 1 + fitted.length + analysers.length
  if (y.length <= p)
    throw new AnalysisError({
      code: 'TOO_FEW_POINTS',
      field: 'sweep',
      value: y.length,
      message: `${y.length} points cannot fix ${p} parameters`,
      hint: 'measure more angles',
    })
  const yMax = Math.max(...y.map(Math.abs))
  if (!(yMax > 0))
    throw new AnalysisError({ code: 'NOTHING_TO_FIT', field: 'sweep', value: yMax, message: 'every intensity is zero' })
  const yn = y.map((v) => v / yMax)
  const design: FitDesign = { anglesRad, channel, analysers, fitted, amplitudes }
  const best = runStarts(design, yn, options)
  return summarise(design, best, { sweep, model, labels, y, yMax })
}

interface Optimum {
  params: number[]
  ssr: number
  starts: number
}

function runStarts(design: FitDesign, yn: number[], options: FitOptions): Optimum {
  const nStarts = options.azimuthStarts ?? 24
  const nr = design.fitted.length - 1
  const ratioStarts = nr === 0 ? [[]] : [0, 0.5, -0.5].map((r) => new Array<number>(nr).fill(r))
  const x = yn.map((_, i) => i)
  const fn = (params: number[]) => (i: number) => evaluatePoint(design, params, i).value
  const jac = (params: number[]) => (i: number) => evaluatePoint(design, params, i).grad
  const minValues = [0, -Infinity, ...new Array<number>(nr + design.analysers.length).fill(-Infinity)]
  const maxValues = minValues.map(() => Infinity)
  let best: Optimum | undefined
  let starts = 0
  for (let k = 0; k < nStarts; k++)
    for (const r of ratioStarts) {
      const init = linearStart(design, yn, (2 * Math.PI * k) / nStarts, r)
      if (!init) continue
      starts++
      const out = levenbergMarquardt({ x, y: yn }, fn, {
        initialValues: init,
        jacobianFunction: jac,
        minValues,
        maxValues,
        maxIterations: options.maxIterations ?? 100,
        errorTolerance: 1e-14 * yn.length,
        damping: 1e-3,
      })
      if (Number.isFinite(out.parameterError) && (!best || out.parameterError < best.ssr))
        best = { params: out.parameterValues, ssr: out.parameterError, starts: 0 }
    }
  if (!best)
    throw new AnalysisError({
      code: 'FIT_FAILED',
      field: 'sweep',
      value: null,
      message: 'the fit did not converge from any start',
      hint: 'check that the intensity columns hold the harmonic signal',
    })
  return { ...best, starts }
}

interface Context {
  sweep: PolarSweep
  model: PatternModel
  labels: string[]
  y: number[]
  yMax: number
}

function summarise(design: FitDesign, best: Optimum, ctx: Context): PolarFitResult {
  const { params } = best
  const n = ctx.y.length
  const p = params.length
  const evals = ctx.y.map((_, i) => evaluatePoint(design, params, i))
  const ssrN = evals.reduce((s, e, i) => s + (e.value - ctx.y[i] / ctx.yMax) ** 2, 0)
  const cov = invert(normalMatrix(evals.map((e) => e.grad)))
  const sigma = (j: number) => (cov && n > p ? Math.sqrt(Math.max(0, cov[j][j]) * (ssrN / (n - p))) : Number.NaN)
  const nr = design.fitted.length - 1
  const period = patternPeriod(design, params)
  const phiDeg = (params[1] * 180) / Math.PI
  const periodDeg = period.periodDeg
  const residuals = evals.map((e, i) => {
    const c = ctx.sweep.channels[design.channel[i]]
    const model = e.value * ctx.yMax
    return {
      angleDeg: (design.anglesRad[i] * 180) / Math.PI,
      column: c.column,
      analyser: c.analyser,
      observed: ctx.y[i],
      model,
      residual: ctx.y[i] - model,
    }
  })
  const ratios: FittedRatio[] = ctx.labels.map((label, k) => {
    const j = design.fitted.indexOf(k)
    if (j === 0) return { label, value: 1, sigma: 0, role: 'reference' }
    if (j > 0) return { label, value: params[1 + j], sigma: sigma(1 + j), role: 'fitted' }
    return { label, value: null, sigma: Number.NaN, role: 'not-observable' }
  })
  const symmetry = ctx.sweep.channels.map((c, ci) => {
    const pts = residuals.filter((_, i) => design.channel[i] === ci)
    const dataFold = findDominantHarmonic(
      pts.map((r) => r.angleDeg),
      pts.map((r) => r.observed),
    ).fold
    const modelFold = findDominantHarmonic(
      pts.map((r) => r.angleDeg),
      pts.map((r) => r.model),
    ).fold
    return { column: c.column, analyser: c.analyser, dataFold, modelFold, isMatch: dataFold === modelFold }
  })
  const notes = [...period.notes]
  if (!cov) notes.push('the parameters are not all independent at the optimum: uncertainties are not available')
  if (ratios.some((r) => r.role === 'not-observable'))
    notes.push(
      `not observable with these analysers at normal incidence: ${ratios
        .filter((r) => r.role === 'not-observable')
        .map((r) => r.label)
        .join(', ')}`,
    )
  return {
    model: ctx.model,
    azimuth: { value: ((phiDeg % periodDeg) + periodDeg) % periodDeg, sigma: (sigma(1) * 180) / Math.PI },
    azimuthPeriodDeg: periodDeg,
    isAzimuthDetermined: period.isDetermined,
    ratios,
    scale: { value: params[0] * ctx.yMax, sigma: sigma(0) * ctx.yMax },
    backgrounds: ctx.sweep.channels.map((c, ci) => ({
      column: c.column,
      value: params[2 + nr + ci] * ctx.yMax,
      sigma: sigma(2 + nr + ci) * ctx.yMax,
    })),
    rSquared: rSquared(
      ctx.y,
      design.channel,
      residuals.map((r) => r.residual),
    ),
    ssr: ssrN * ctx.yMax ** 2,
    dof: n - p,
    residuals,
    symmetry,
    isSymmetryMatch: symmetry.every((s) => s.isMatch),
    starts: best.starts,
    assumptions: PATTERN_ASSUMPTIONS,
    notes,
  }
}

/** R² = 1 − SSR/SST with SST taken about each channel's own mean. */
function rSquared(y: readonly number[], channel: readonly number[], residuals: readonly number[]): number {
  const means = new Map<number, { s: number; n: number }>()
  y.forEach((v, i) => {
    const m = means.get(channel[i]) ?? { s: 0, n: 0 }
    means.set(channel[i], { s: m.s + v, n: m.n + 1 })
  })
  let sst = 0
  y.forEach((v, i) => {
    const m = means.get(channel[i])!
    sst += (v - m.s / m.n) ** 2
  })
  const ssr = residuals.reduce((s, r) => s + r * r, 0)
  return sst > 0 ? 1 - ssr / sst : Number.NaN
}
