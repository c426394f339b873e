/**
 * Cylindrical content Q of a (lab-frame) tensor subspace: the set of q for which the Fourier
 * component of α ↦ R_z(α)·T is non-zero, with R_z(α)·T = Σ_q T_q e^{−iqα} (a field with
 * projection m picks up e^{−imα}; q = m_out − Σ m_in). |q| ≤ rank. Because T is real, Q and its
 * weights are symmetric under q → −q; rotating T about z only changes phases, so Q and weights
 * do not depend on the in-plane azimuth.
 *
 * Weight of q: Σ ‖T_q‖² over an orthonormal basis of the subspace, divided by the subspace
 * dimension, so the weights sum to 1 and do not depend on the chosen basis.
 */
import { orthonormalize, rotationAboutAxis } from './linalg'
import { transformTensor } from './tensor-space'

/** Relative weight below which a Fourier order counts as absent. */
export const Q_WEIGHT_TOL = 1e-10

/** Cylindrical content: present q (ascending) and the weight of every present q. */
export interface CylindricalContent {
  q: number[]
  weights: { q: number; weight: number }[]
}

/**
 * Compute Q by exact discrete Fourier analysis of α ↦ R_z(α)·T on 2·rank+1 equally spaced angles
 * (exact: the map is a trigonometric polynomial of degree ≤ rank).
 * @param tensors Lab-frame basis tensors of the allowed subspace (empty → Q = {}).
 */
export function computeCylindricalContent(tensors: readonly Float64Array[], rank: number): CylindricalContent {
  const basis = orthonormalize(tensors)
  if (basis.length === 0) return { q: [], weights: [] }
  const K = 2 * rank + 1
  const power = new Float64Array(2 * rank + 1)
  const samples = Array.from({ length: K }, (_, k) => rotationAboutAxis([0, 0, 1], (2 * Math.PI * k) / K))
  const cos: number[][] = []
  const sin: number[][] = []
  for (let q = -rank; q <= rank; q++) {
    cos.push(samples.map((_, k) => Math.cos((2 * Math.PI * q * k) / K)))
    sin.push(samples.map((_, k) => Math.sin((2 * Math.PI * q * k) / K)))
  }
  for (const t of basis) {
    const rotated = samples.map((R) => transformTensor(t, rank, R))
    for (let qi = 0; qi < 2 * rank + 1; qi++) {
      const c = cos[qi]
      const s = sin[qi]
      let p = 0
      for (let f = 0; f < t.length; f++) {
        let re = 0
        let im = 0
        for (let k = 0; k < K; k++) {
          re += rotated[k][f] * c[k]
          im += rotated[k][f] * s[k]
        }
        p += re * re + im * im
      }
      power[qi] += p / (K * K)
    }
  }
  const weights: { q: number; weight: number }[] = []
  for (let q = -rank; q <= rank; q++) {
    const w = power[q + rank] / basis.length
    if (w > Q_WEIGHT_TOL) weights.push({ q, weight: w })
  }
  return { q: weights.map((w) => w.q), weights }
}
