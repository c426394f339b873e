/**
 * Rotational symmetry of a measured or modelled pattern: the dominant angular Fourier harmonic k
 * (k ≥ 1) of I(θ), found by linear least squares on [1, cos kθ, sin kθ]_{k ≤ K} so that uneven or
 * partial sweeps are handled. A polar plot of I ∝ cos²(kθ/2) has k lobes (cos²(3θ): k = 6, six lobes).
 */
import { leastSquares } from './linalg'

/** Result of {@link findDominantHarmonic}. */
export interface HarmonicAnalysis {
  /** Dominant harmonic k ≥ 1 (number of lobes); 0 when the pattern is flat or cannot be analysed. */
  fold: number
  /** Amplitude sqrt(a_k² + b_k²) for k = 0 … K (k = 0: the mean). */
  amplitudes: number[]
}

/** Dominant angular harmonic of `values` sampled at `anglesDeg` (K = min(maxHarmonic, (n − 1)/2)). */
export function findDominantHarmonic(
  anglesDeg: readonly number[],
  values: readonly number[],
  maxHarmonic = 12,
): HarmonicAnalysis {
  const K = Math.min(maxHarmonic, Math.floor((values.length - 1) / 2))
  if (K < 1) return { fold: 0, amplitudes: [] }
  const design = anglesDeg.map((d) => {
    const a = (d * Math.PI) / 180
    const row = [1]
    for (let k = 1; k <= K; k++) row.push(Math.cos(k * a), Math.sin(k * a))
    return row
  })
  const c = leastSquares(design, values)
  if (!c) return K > 1 ? findDominantHarmonic(anglesDeg, values, K - 1) : { fold: 0, amplitudes: [] }
  const amplitudes = [Math.abs(c[0]), ...Array.from({ length: K }, (_, k) => Math.hypot(c[1 + 2 * k], c[2 + 2 * k]))]
  let fold = 0
  for (let k = 1; k <= K; k++) if (amplitudes[k] > (fold ? amplitudes[fold] : 0)) fold = k
  const scale = Math.max(amplitudes[0], ...amplitudes.slice(1))
  return { fold: fold && amplitudes[fold] > 1e-9 * scale ? fold : 0, amplitudes }
}
