/**
 * Harmonic peak in a spectrum: x is a wavelength in nm, or a detector pixel converted with a
 * polynomial calibration λ(p) = c0 + c1·p + c2·p² + … (nm). The peak nearest λ_pump/N inside a
 * search window is located, a straight-line background is fitted to two flanking windows and
 * subtracted, and the remainder is integrated with the trapezoid rule over the integration window.
 * SNR = peak height above the background / standard deviation of the flank residuals.
 */
import type { ParsedTable, SkippedRow } from './csv'
import { parseTable } from './csv'
import { AnalysisError } from './errors'
import { leastSquares } from './linalg'

/** A spectrum sorted by wavelength. */
export interface Spectrum {
  wavelengthsNm: number[]
  intensity: number[]
  skipped: SkippedRow[]
  notes: string[]
}

/** Options of {@link readSpectrum}. */
export interface ReadSpectrumOptions {
  xColumn?: number
  yColumn?: number
  /** Pixel calibration, nm: λ = Σ c_k·pixel^k. When given, x is read as pixels. */
  calibration?: readonly number[]
}

/** Read a spectrum table (x in nm, or pixels with `calibration`). */
export function readSpectrum(table: ParsedTable, options: ReadSpectrumOptions = {}): Spectrum {
  if (table.columns.length < 2)
    throw new AnalysisError({
      code: 'TOO_FEW_COLUMNS',
      field: 'file',
      value: table.columns,
      message: 'a spectrum needs two columns: wavelength (or pixel) and intensity',
    })
  const [xc, yc] = [options.xColumn ?? 0, options.yColumn ?? 1]
  const isPixel = options.calibration !== undefined
  if (!isPixel && table.hasHeader && /pix/i.test(table.columns[xc]))
    throw new AnalysisError({
      code: 'INVALID_OPTION',
      field: 'calibration',
      value: table.columns[xc],
      message: `column "${table.columns[xc]}" holds pixels; a wavelength calibration is needed`,
      hint: 'give the calibration coefficients λ = c0 + c1·p (+ c2·p² …) in nm',
    })
  const skipped = [...table.skipped]
  const points: [number, number][] = []
  table.rows.forEach((row, r) => {
    if (Number.isFinite(row[xc]) && Number.isFinite(row[yc]))
      points.push([isPixel ? polynomial(options.calibration!, row[xc]) : row[xc], row[yc]])
    else skipped.push({ line: table.lines[r], reason: 'wavelength or intensity is not a finite number' })
  })
  if (points.length < 5)
    throw new AnalysisError({
      code: 'TOO_FEW_POINTS',
      field: 'file',
      value: points.length,
      message: `only ${points.length} readable points; a spectrum needs at least 5`,
    })
  points.sort((a, b) => a[0] - b[0])
  const notes = isPixel
    ? [
        `x converted from pixels with λ = ${options.calibration!.map((c, k) => (k === 0 ? `${c}` : `${c}·p${k > 1 ? `^${k}` : ''}`)).join(' + ')} nm`,
      ]
    : []
  return { wavelengthsNm: points.map((p) => p[0]), intensity: points.map((p) => p[1]), skipped, notes }
}

/** Parse and read a spectrum file. */
export function readSpectrumText(text: string, options: ReadSpectrumOptions = {}): Spectrum {
  return readSpectrum(parseTable(text), options)
}

function polynomial(c: readonly number[], x: number): number {
  return c.reduceRight((s, ck) => s * x + ck, 0)
}

/** Options of {@link findHarmonicPeak}. Widths in nm. */
export interface HarmonicPeakOptions {
  pumpWavelengthNm: number
  order: number
  /** Half-width of the search window around λ_pump/N; default max(5 nm, 2 % of λ_pump/N). */
  searchHalfWidthNm?: number
  /** Half-width of the integration window around the peak; default 2 × FWHM. */
  integrationHalfWidthNm?: number
  /** Width of each flanking background window; default the integration half-width. */
  backgroundWidthNm?: number
  /** SNR at or above which the peak counts as detected; default 3. */
  minSnr?: number
}

/** The harmonic peak with the windows used (nm; intensity units × nm for the integral). */
export interface HarmonicPeak {
  expectedWavelengthNm: number
  peakWavelengthNm: number
  offsetNm: number
  fwhmNm: number
  height: number
  integral: number
  snr: number
  isDetected: boolean
  searchWindowNm: [number, number]
  integrationWindowNm: [number, number]
  backgroundWindowsNm: [[number, number], [number, number]]
  background: { intercept: number; slopePerNm: number }
}

/** Find, background-correct and integrate the N-th harmonic peak. */
export function findHarmonicPeak(spectrum: Spectrum, options: HarmonicPeakOptions): HarmonicPeak {
  const { wavelengthsNm: x, intensity: y } = spectrum
  if (!(options.pumpWavelengthNm > 0) || !Number.isInteger(options.order) || options.order < 2)
    throw new AnalysisError({
      code: 'INVALID_OPTION',
      field: 'pumpWavelengthNm',
      value: options,
      message: 'give a positive pump wavelength (nm) and an integer order ≥ 2',
    })
  const target = options.pumpWavelengthNm / options.order
  const half = options.searchHalfWidthNm ?? Math.max(5, 0.02 * target)
  const inSearch = indices(x, target - half, target + half)
  if (inSearch.length === 0)
    throw new AnalysisError({
      code: 'NO_DATA_IN_WINDOW',
      field: 'spectrum',
      value: [x[0], x[x.length - 1]],
      message: `the spectrum (${x[0].toFixed(1)}–${x[x.length - 1].toFixed(1)} nm) has no point near λ/N = ${target.toFixed(1)} nm`,
    })
  const top = inSearch.reduce((b, i) => (y[i] > y[b] ? i : b))
  const floor = Math.min(...inSearch.map((i) => y[i]))
  const fwhm = halfWidth(x, y, top, floor)
  const w = options.integrationHalfWidthNm ?? 2 * fwhm
  const bw = options.backgroundWidthNm ?? w
  const lo = x[top] - w
  const hi = x[top] + w
  const flank = [...indices(x, lo - bw, lo, true), ...indices(x, hi, hi + bw, true)]
  if (flank.length < 3)
    throw new AnalysisError({
      code: 'NO_DATA_IN_WINDOW',
      field: 'spectrum',
      value: [lo - bw, hi + bw],
      message: `fewer than 3 points in the background windows beside the peak at ${x[top].toFixed(1)} nm`,
      hint: 'record a wider spectrum around the harmonic',
    })
  const [intercept, slope] = leastSquares(
    flank.map((i) => [1, x[i]]),
    flank.map((i) => y[i]),
  ) ?? [mean(flank.map((i) => y[i])), 0]
  const bg = (v: number) => intercept + slope * v
  const noise = Math.sqrt(flank.reduce((s, i) => s + (y[i] - bg(x[i])) ** 2, 0) / Math.max(1, flank.length - 2))
  const inPeak = indices(x, lo, hi)
  let integral = 0
  for (let k = 1; k < inPeak.length; k++) {
    const [a, b] = [inPeak[k - 1], inPeak[k]]
    integral += 0.5 * (x[b] - x[a]) * (y[a] - bg(x[a]) + y[b] - bg(x[b]))
  }
  const height = y[top] - bg(x[top])
  const snr = noise > 0 ? height / noise : height > 0 ? Infinity : 0
  return {
    expectedWavelengthNm: target,
    peakWavelengthNm: x[top],
    offsetNm: x[top] - target,
    fwhmNm: fwhm,
    height,
    integral,
    snr,
    isDetected: snr >= (options.minSnr ?? 3),
    searchWindowNm: [target - half, target + half],
    integrationWindowNm: [lo, hi],
    backgroundWindowsNm: [
      [lo - bw, lo],
      [hi, hi + bw],
    ],
    background: { intercept, slopePerNm: slope },
  }
}

function indices(x: readonly number[], from: number, to: number, isOpenAtPeak = false): number[] {
  const out: number[] = []
  x.forEach((v, i) => {
    if (v >= from && v <= to && !(isOpenAtPeak && (v === from || v === to))) out.push(i)
  })
  return out
}

/** Full width at half maximum above `floor`, linearly interpolated (at least one sample spacing). */
function halfWidth(x: readonly number[], y: readonly number[], top: number, floor: number): number {
  const level = floor + (y[top] - floor) / 2
  const edge = (dir: 1 | -1) => {
    let i = top
    while (i + dir >= 0 && i + dir < x.length && y[i + dir] > level) i += dir
    const j = i + dir
    if (j < 0 || j >= x.length) return x[i]
    return x[i] + ((x[j] - x[i]) * (y[i] - level)) / (y[i] - y[j])
  }
  const spacing = Math.abs(x[Math.min(top + 1, x.length - 1)] - x[Math.max(top - 1, 0)]) / 2
  return Math.max(edge(1) - edge(-1), spacing)
}

function mean(v: readonly number[]): number {
  return v.reduce((s, a) => s + a, 0) / v.length
}
