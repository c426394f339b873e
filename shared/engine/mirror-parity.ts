/**
 * Parity of a lab-frame tensor subspace under a vertical mirror: the plane containing z and
 * (cos ψ, sin ψ, 0), ψ in degrees. The reflection acts on every index. The subspace is even
 * (+1) if every basis tensor is unchanged, odd (−1) if every basis tensor changes sign, and has
 * no definite parity (0) otherwise — including when the mirror is not a symmetry of the cut
 * crystal at all. Nothing is guessed.
 */
import { reflectionMatrix } from './linalg'
import { transformTensor, tensorNorm } from './tensor-space'

/** Parity under a mirror: +1 even, −1 odd, 0 no definite parity. */
export type Parity = 1 | -1 | 0

/** Relative tolerance of the even/odd test. */
export const PARITY_TOL = 1e-9

/** Reflection matrix of the vertical mirror at azimuth ψ (degrees, lab frame). */
export function verticalMirror(psiDeg: number) {
  const a = (psiDeg * Math.PI) / 180
  return reflectionMatrix([-Math.sin(a), Math.cos(a), 0])
}

/**
 * Parity of the tensor subspace spanned by `tensors` (lab frame, rank `rank`) under the vertical
 * mirror at `psiDeg`. An empty or zero subspace has no parity (0).
 */
export function computeMirrorParity(tensors: readonly Float64Array[], rank: number, psiDeg: number): Parity {
  const M = verticalMirror(psiDeg)
  let result: Parity | undefined
  for (const t of tensors) {
    const n = tensorNorm(t)
    if (n === 0) continue
    const r = transformTensor(t, rank, M)
    let dEven = 0
    let dOdd = 0
    for (let i = 0; i < t.length; i++) {
      dEven = Math.max(dEven, Math.abs(r[i] - t[i]))
      dOdd = Math.max(dOdd, Math.abs(r[i] + t[i]))
    }
    const p: Parity = dEven <= PARITY_TOL * n ? 1 : dOdd <= PARITY_TOL * n ? -1 : 0
    if (p === 0 || (result !== undefined && result !== p)) return 0
    result = p
  }
  return result ?? 0
}
