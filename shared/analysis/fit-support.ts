/**
 * Helpers of the sweep fit: which basis elements are observable, linear starting values for the
 * scale and backgrounds, and the period of the fitted pattern under crystal rotation.
 */
import type { Analyser } from './sweep'
import type { AmplitudeBasis, FitDesign } from './fit-model'
import { evalTrig, evaluatePoint } from './fit-model'
import { leastSquares } from './linalg'

const PROBE = Array.from({ length: 72 }, (_, i) => (i * Math.PI) / 36)

/**
 * Basis elements whose analysed amplitudes (for the analysers present) are linearly independent,
 * chosen greedily in the engine's canonical order (Gram–Schmidt); the others cannot be separated
 * from them (or vanish) at normal incidence.
 */
export function chooseObservable(amplitudes: readonly AmplitudeBasis[], analysers: readonly Analyser[]): number[] {
  const comps = new Set<keyof AmplitudeBasis>()
  for (const a of analysers) {
    if (a !== 'perpendicular') comps.add('parallel')
    if (a !== 'parallel') comps.add('perpendicular')
  }
  const vectors = amplitudes.map((b) => [...comps].flatMap((c) => PROBE.map((u) => evalTrig(b[c], u)[0])))
  const scale = Math.max(1e-300, ...vectors.map(norm))
  const kept: number[] = []
  const ortho: number[][] = []
  vectors.forEach((v, k) => {
    const w = [...v]
    for (const q of ortho) {
      const d = dot(w, q)
      for (let i = 0; i < w.length; i++) w[i] -= d * q[i]
    }
    const n = norm(w)
    if (n > 1e-8 * scale) {
      kept.push(k)
      ortho.push(w.map((x) => x / n))
    }
  })
  return kept
}

/** Starting parameters at azimuth `phi` (rad) and ratios `r`: scale and backgrounds by linear least squares. */
export function linearStart(
  design: FitDesign,
  yn: readonly number[],
  phi: number,
  r: readonly number[],
): number[] | undefined {
  const C = design.analysers.length
  const base = [1, phi, ...r, ...new Array<number>(C).fill(0)]
  const f = yn.map((_, i) => evaluatePoint(design, base, i).value)
  const rows = f.map((v, i) => [v, ...Array.from({ length: C }, (_, c) => (design.channel[i] === c ? 1 : 0))])
  const coef = leastSquares(rows, [...yn])
  if (!coef) return undefined
  return [Math.max(coef[0], 1e-3), phi, ...r, ...coef.slice(1)]
}

/**
 * Smallest crystal rotation 360°/k (k ≤ 2(N+1), N from the trigonometric degree) that leaves the
 * fitted pattern of every channel unchanged: the azimuth is only defined modulo it. A flat pattern
 * leaves the azimuth undetermined.
 */
export function patternPeriod(
  design: FitDesign,
  params: readonly number[],
): { periodDeg: number; isDetermined: boolean; notes: string[] } {
  const C = design.analysers.length
  const degree = design.amplitudes[0].parallel.cos.length - 1
  const probe: FitDesign = { ...design, anglesRad: [], channel: [] }
  for (let c = 0; c < C; c++) {
    for (const u of PROBE) {
      probe.anglesRad.push(u)
      probe.channel.push(c)
    }
  }
  const pattern = (phi: number) =>
    probe.anglesRad.map((_, i) => evaluatePoint(probe, [1, phi, ...params.slice(2)], i).value)
  const ref = pattern(params[1])
  const span = Math.max(...ref) - Math.min(...ref)
  if (!(span > 1e-9 * Math.max(...ref.map(Math.abs))))
    return {
      periodDeg: 360,
      isDetermined: false,
      notes: [
        'the model pattern does not change with the pump angle for these analysers: the azimuth cannot be determined',
      ],
    }
  for (let k = 2 * degree; k >= 2; k--) {
    const shifted = pattern(params[1] + (2 * Math.PI) / k)
    if (shifted.every((v, i) => Math.abs(v - ref[i]) < 1e-7 * span))
      return {
        periodDeg: 360 / k,
        isDetermined: true,
        notes: [
          `the pattern repeats every ${(360 / k).toFixed(2)}°: the azimuth is given modulo ${(360 / k).toFixed(2)}°`,
        ],
      }
  }
  return { periodDeg: 360, isDetermined: true, notes: [] }
}

function dot(a: readonly number[], b: readonly number[]): number {
  return a.reduce((s, v, i) => s + v * b[i], 0)
}

function norm(a: readonly number[]): number {
  return Math.sqrt(dot(a, a))
}
