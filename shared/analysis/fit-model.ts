/**
 * The fit model of a polarisation sweep, written for speed and an exact Jacobian: each basis
 * element's analysed amplitude (parallel / perpendicular) is a trigonometric polynomial of degree
 * N+1 in the pump angle, stored by its Fourier coefficients (sampled from the same contraction as
 * `patterns.ts`), so a crystal rotation φ is a shift u = θ − φ.
 * Parameters: [s, φ (rad), r_1 … r_{m−1}, b_1 … b_C]: I = s·f(θ − φ; r) + b_channel, r_0 = 1.
 */
import type { Analyser } from './sweep'
import type { PatternModel } from './patterns'
import { describePatternBasis, inducedPolarization } from './patterns'

/** a(u) = Σ_m cos_m·cos(m u) + sin_m·sin(m u), u in radians. */
export interface TrigPoly {
  cos: number[]
  sin: number[]
}

/** Fourier coefficients of a trigonometric polynomial of at most `degree`, from 4(degree+1) samples. */
export function toTrigPoly(f: (u: number) => number, degree: number): TrigPoly {
  const M = 4 * (degree + 1)
  const values = Array.from({ length: M }, (_, j) => f((2 * Math.PI * j) / M))
  const coef = (m: number, g: (x: number) => number) =>
    ((m === 0 ? 1 : 2) / M) * values.reduce((s, v, j) => s + v * g((2 * Math.PI * m * j) / M), 0)
  const ms = Array.from({ length: degree + 1 }, (_, m) => m)
  return { cos: ms.map((m) => coef(m, Math.cos)), sin: ms.map((m) => (m === 0 ? 0 : coef(m, Math.sin))) }
}

/** Value and derivative (per radian) of a trigonometric polynomial at u. */
export function evalTrig(p: TrigPoly, u: number): [number, number] {
  let v = 0
  let d = 0
  for (let m = 0; m < p.cos.length; m++) {
    const [c, s] = [Math.cos(m * u), Math.sin(m * u)]
    v += p.cos[m] * c + p.sin[m] * s
    d += m * (p.sin[m] * c - p.cos[m] * s)
  }
  return [v, d]
}

/** Analysed amplitudes of one basis element versus pump angle (azimuth 0). */
export interface AmplitudeBasis {
  parallel: TrigPoly
  perpendicular: TrigPoly
}

/** Amplitude polynomials of every basis element of the model. */
export function amplitudeBasis(model: PatternModel): { labels: string[]; amplitudes: AmplitudeBasis[] } {
  const { labels, tensors } = describePatternBasis(model)
  const amplitudes = tensors.map((t) => {
    const comp = (which: 0 | 1) => (u: number) => {
      const p = inducedPolarization(t, model.order, (u * 180) / Math.PI)
      return which === 0 ? p[0] * Math.cos(u) + p[1] * Math.sin(u) : -p[0] * Math.sin(u) + p[1] * Math.cos(u)
    }
    return { parallel: toTrigPoly(comp(0), model.order + 1), perpendicular: toTrigPoly(comp(1), model.order + 1) }
  })
  return { labels, amplitudes }
}

/** The data layout the model is evaluated on: point i has angle (rad) and channel index. */
export interface FitDesign {
  anglesRad: number[]
  channel: number[]
  analysers: Analyser[]
  /** Basis indices whose weights are fitted (the first one has weight 1). */
  fitted: number[]
  amplitudes: AmplitudeBasis[]
}

/** Model value and gradient (same order as the parameters) at data point i. */
export function evaluatePoint(
  design: FitDesign,
  params: readonly number[],
  i: number,
): { value: number; grad: number[] } {
  const { fitted, amplitudes } = design
  const [s, phi] = params
  const u = design.anglesRad[i] - phi
  const analyser = design.analysers[design.channel[i]]
  const comps: (keyof AmplitudeBasis)[] =
    analyser === 'parallel'
      ? ['parallel']
      : analyser === 'perpendicular'
        ? ['perpendicular']
        : ['parallel', 'perpendicular']
  const nr = fitted.length - 1
  const grad = new Array<number>(params.length).fill(0)
  let f = 0
  for (const comp of comps) {
    const vals = fitted.map((k) => evalTrig(amplitudes[k][comp], u))
    let a = 0
    let da = 0
    vals.forEach(([v, d], j) => {
      const w = j === 0 ? 1 : params[1 + j]
      a += w * v
      da += w * d
    })
    f += a * a
    grad[1] += -s * 2 * a * da
    for (let j = 1; j <= nr; j++) grad[1 + j] += s * 2 * a * vals[j][0]
  }
  grad[0] = f
  grad[2 + nr + design.channel[i]] = 1
  return { value: s * f + params[2 + nr + design.channel[i]], grad }
}
