/**
 * From crystal frame to sample (lab) frame. Lab z = outward normal of the cut (normalised); lab
 * x = the in-plane reference direction (its projection into the cut plane), rotated about z by
 * the azimuth (degrees, counter-clockwise seen from +z); y = z × x. Rotated tensor:
 * T'_{ab…} = R_ai R_bj … T_{ij…} where the rows of R are the lab axes in crystal coordinates.
 */
import type { Mat3, Vec3 } from './linalg'
import { cross, maxAbs, scale } from './linalg'
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
  const plane = new Array<number>(6)
  const p = cutPlane(cut, field, plane)
  const z: Vec3 = [plane[0], plane[1], plane[2]]
  const inPlane: Vec3 = [plane[3], plane[4], plane[5]]
  const x0 = scale(inPlane, 1 / p)
  const y0 = cross(z, x0)
  const a = ((cut.azimuthDeg ?? 0) * Math.PI) / 180
  const [c, s] = [Math.cos(a), Math.sin(a)]
  const x: Vec3 = [c * x0[0] + s * y0[0], c * x0[1] + s * y0[1], c * x0[2] + s * y0[2]]
  const y = cross(z, x)
  return [...x, ...y, ...z]
}

/** Throws exactly what {@link labFrame} throws for `cut`, without forming the frame (request validation). */
export function checkCut(cut: CutOrientation, field = 'crystal'): void {
  cutPlane(cut, field)
}

/**
 * The checks of {@link labFrame}: unit normal z = normal/|normal| and the reference minus its
 * component along z; returns the length of that in-plane part and, with `out`, writes z (0–2) and
 * the in-plane part (3–5).
 */
function cutPlane(cut: CutOrientation, field: string, out?: number[]): number {
  // Both vectors are scaled by their largest component first: a direction has no size, so
  // [0, 0, 1e200] and [0, 0, 1e-200] are the z axis (their squares would overflow or underflow).
  const nm = maxAbs(cut.normal)
  if (!(nm > 0) || !Number.isFinite(nm))
    throw new EngineError({
      code: 'ZERO_VECTOR',
      field: `${field}.normal`,
      value: cut.normal,
      message: 'the normal is the zero vector',
    })
  const nv = [cut.normal[0] / nm, cut.normal[1] / nm, cut.normal[2] / nm]
  const n = Math.sqrt(nv[0] * nv[0] + nv[1] * nv[1] + nv[2] * nv[2])
  const inv = 1 / n
  const z0 = nv[0] * inv
  const z1 = nv[1] * inv
  const z2 = nv[2] * inv
  const rm = maxAbs(cut.reference)
  if (!(rm > 0) || !Number.isFinite(rm))
    throw new EngineError({
      code: 'ZERO_VECTOR',
      field: `${field}.reference`,
      value: cut.reference,
      message: 'the reference is the zero vector',
    })
  const rv = [cut.reference[0] / rm, cut.reference[1] / rm, cut.reference[2] / rm]
  const r = Math.sqrt(rv[0] * rv[0] + rv[1] * rv[1] + rv[2] * rv[2])
  const along = rv[0] * z0 + rv[1] * z1 + rv[2] * z2
  const i0 = rv[0] - along * z0
  const i1 = rv[1] - along * z1
  const i2 = rv[2] - along * z2
  const p = Math.sqrt(i0 * i0 + i1 * i1 + i2 * i2)
  if (p < 1e-9 * r)
    throw new EngineError({
      code: 'REFERENCE_PARALLEL_TO_NORMAL',
      field: `${field}.reference`,
      value: cut.reference,
      message: `the reference ${JSON.stringify(cut.reference)} is parallel to the normal ${JSON.stringify(cut.normal)}`,
      hint: 'choose an in-plane direction, e.g. the wafer flat',
    })
  if (out) {
    out[0] = z0
    out[1] = z1
    out[2] = z2
    out[3] = i0
    out[4] = i1
    out[5] = i2
  }
  return p
}

/** Express a crystal-frame tensor of rank `rank` in the lab frame given by {@link labFrame}. */
export function rotateToSample(tensor: Float64Array, rank: number, frame: Mat3): Float64Array {
  return transformTensor(tensor, rank, frame)
}
