/**
 * From crystal frame to sample (lab) frame. Lab z = outward normal of the cut (normalised); lab
 * x = the in-plane reference direction (its projection into the cut plane), rotated about z by
 * the azimuth (degrees, counter-clockwise seen from +z); y = z × x. Rotated tensor:
 * T'_{ab…} = R_ai R_bj … T_{ij…} where the rows of R are the lab axes in crystal coordinates.
 */
import type { Mat3, Vec3 } from './linalg'
import { cross, dot, norm, scale } from './linalg'
import { transformTensor } from './tensor-space'
import { EngineError } from './errors'

/** A cut with its in-plane orientation, all in the crystal Cartesian frame. */
export interface CutOrientation {
  /** Outward surface normal (crystal Cartesian frame, any length ≠ 0). */
  normal: Vec3
  /** In-plane reference (e.g. primary flat), not parallel to the normal. */
  reference: Vec3
  /** Extra rotation of the lab x axis about the normal, degrees; default 0. */
  azimuthDeg?: number
}

/**
 * Rotation matrix crystal → lab (rows = lab x, y, z in crystal coordinates).
 * Throws ZERO_VECTOR (`{field}.normal` / `{field}.reference`) or REFERENCE_PARALLEL_TO_NORMAL.
 */
export function labFrame(cut: CutOrientation, field = 'crystal'): Mat3 {
  const n = norm(cut.normal)
  if (!(n > 1e-12))
    throw new EngineError({ code: 'ZERO_VECTOR', field: `${field}.normal`, value: cut.normal, message: 'the normal is the zero vector' })
  const z = scale(cut.normal, 1 / n)
  const r = norm(cut.reference)
  if (!(r > 1e-12))
    throw new EngineError({ code: 'ZERO_VECTOR', field: `${field}.reference`, value: cut.reference, message: 'the reference is the zero vector' })
  const inPlane: Vec3 = [0, 1, 2].map((i) => cut.reference[i] - dot(cut.reference, z) * z[i]) as unknown as Vec3
  const p = norm(inPlane)
  if (p < 1e-9 * r)
    throw new EngineError({
      code: 'REFERENCE_PARALLEL_TO_NORMAL', field: `${field}.reference`, value: cut.reference,
      message: `the reference ${JSON.stringify(cut.reference)} is parallel to the normal ${JSON.stringify(cut.normal)}`,
      hint: 'choose an in-plane direction, e.g. the wafer flat',
    })
  const x0 = scale(inPlane, 1 / p)
  const y0 = cross(z, x0)
  const a = ((cut.azimuthDeg ?? 0) * Math.PI) / 180
  const [c, s] = [Math.cos(a), Math.sin(a)]
  const x: Vec3 = [c * x0[0] + s * y0[0], c * x0[1] + s * y0[1], c * x0[2] + s * y0[2]]
  const y = cross(z, x)
  return [...x, ...y, ...z]
}

/** Express a crystal-frame tensor of rank `rank` in the lab frame given by {@link labFrame}. */
export function rotateToSample(tensor: Float64Array, rank: number, frame: Mat3): Float64Array {
  return transformTensor(tensor, rank, frame)
}
