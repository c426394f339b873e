/**
 * Rotational-anisotropy SHG at normal incidence: a linearly polarised pump at angle θ (degrees,
 * lab frame, from lab x) drives P_i = Σ χ_ijk E_j E_k with E = (cos θ, sin θ, 0); the analyser
 * parallel or perpendicular to the pump gives I_par = (P·e_θ)² and I_perp = (P·e_θ+90)².
 * Units: arbitrary (square of the tensor's units); only in-plane components of P are detected.
 */
import { EngineError } from './errors'

/** One point of a polar pattern. */
export interface PolarPoint {
  angleDeg: number
  parallel: number
  perpendicular: number
}

/** Polar pattern of a lab-frame rank-3 tensor (flat, 27 components) at the given angles. */
export function predictPolarPattern(chi2Lab: Float64Array, anglesDeg: readonly number[]): PolarPoint[] {
  if (chi2Lab.length !== 27)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'tensor',
      value: chi2Lab.length,
      allowed: [27],
      message: 'the polar pattern needs a rank-3 χ(2) tensor (27 components)',
    })
  return anglesDeg.map((angleDeg) => {
    const a = (angleDeg * Math.PI) / 180
    const e = [Math.cos(a), Math.sin(a), 0]
    const p = [0, 1].map((i) => {
      let s = 0
      for (let j = 0; j < 3; j++) for (let k = 0; k < 3; k++) s += chi2Lab[9 * i + 3 * j + k] * e[j] * e[k]
      return s
    })
    const par = p[0] * e[0] + p[1] * e[1]
    const perp = -p[0] * e[1] + p[1] * e[0]
    return { angleDeg, parallel: par * par, perpendicular: perp * perp }
  })
}
