/**
 * Small dense linear algebra in plain TypeScript: 3-vectors, 3×3 matrices (row-major, 9 numbers),
 * reduced row echelon form with a tolerance, null spaces and Gram–Schmidt. Frame-free; no units.
 */

/** A 3-vector (Cartesian components). */
export type Vec3 = readonly [number, number, number]
/** A 3×3 matrix stored row-major: `m[3*row + col]`. */
export type Mat3 = readonly number[]

/** Default absolute tolerance for pivots and zero tests on O(1) quantities. */
export const LINALG_TOL = 1e-9

/** The 3×3 identity. */
export const IDENTITY3: Mat3 = [1, 0, 0, 0, 1, 0, 0, 0, 1]

/** Product a·b of two 3×3 matrices. */
export function mulMat3(a: Mat3, b: Mat3): Mat3 {
  const out = new Array<number>(9)
  for (let r = 0; r < 3; r++)
    for (let c = 0; c < 3; c++) out[3 * r + c] = a[3 * r] * b[c] + a[3 * r + 1] * b[3 + c] + a[3 * r + 2] * b[6 + c]
  return out
}

/** Matrix–vector product m·v. */
export function mulMat3Vec(m: Mat3, v: Vec3): Vec3 {
  return [
    m[0] * v[0] + m[1] * v[1] + m[2] * v[2],
    m[3] * v[0] + m[4] * v[1] + m[5] * v[2],
    m[6] * v[0] + m[7] * v[1] + m[8] * v[2],
  ]
}

/** Determinant of a 3×3 matrix. */
export function det3(m: Mat3): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6])
}

/** Scalar product. */
export function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
}

/** Vector product a × b (right-handed). */
export function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

/** Largest |component| (0 only for the zero vector). */
export function maxAbs(a: Vec3): number {
  return Math.max(Math.abs(a[0]), Math.abs(a[1]), Math.abs(a[2]))
}

/**
 * Euclidean length, scaled by the largest component first, so that neither 1e200 (whose square
 * overflows) nor 1e-200 (whose square underflows to 0) loses the answer.
 */
export function norm(a: Vec3): number {
  const m = maxAbs(a)
  if (m === 0 || !Number.isFinite(m)) return m
  const x = a[0] / m,
    y = a[1] / m,
    z = a[2] / m
  return m * Math.sqrt(x * x + y * y + z * z)
}

/** a / |a| computed without overflow or underflow (see {@link norm}); the zero vector stays zero. */
export function unitVector(a: Vec3): Vec3 {
  const m = maxAbs(a)
  if (m === 0) return [0, 0, 0]
  const x = a[0] / m,
    y = a[1] / m,
    z = a[2] / m
  const l = Math.sqrt(x * x + y * y + z * z)
  return [x / l, y / l, z / l]
}

/** a·s. */
export function scale(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s]
}

/** Proper rotation by `angleRad` about the unit `axis` (right-hand rule), Rodrigues' formula. */
export function rotationAboutAxis(axis: Vec3, angleRad: number): Mat3 {
  const [x, y, z] = unitVector(axis)
  const c = Math.cos(angleRad)
  const s = Math.sin(angleRad)
  const t = 1 - c
  return [
    t * x * x + c,
    t * x * y - s * z,
    t * x * z + s * y,
    t * x * y + s * z,
    t * y * y + c,
    t * y * z - s * x,
    t * x * z - s * y,
    t * y * z + s * x,
    t * z * z + c,
  ]
}

/** Reflection through the plane with unit normal `n`: I − 2 n nᵀ. */
export function reflectionMatrix(n: Vec3): Mat3 {
  const [x, y, z] = unitVector(n)
  return [
    1 - 2 * x * x,
    -2 * x * y,
    -2 * x * z,
    -2 * x * y,
    1 - 2 * y * y,
    -2 * y * z,
    -2 * x * z,
    -2 * y * z,
    1 - 2 * z * z,
  ]
}

/** Result of {@link rref}: the reduced rows (same width) and the pivot column of each. */
export interface RrefResult {
  rows: number[][]
  pivots: number[]
}

/**
 * Reduced row echelon form by Gauss–Jordan elimination with partial pivoting. Entries whose
 * magnitude is below `tol` are treated as zero (and snapped to 0 in the output).
 */
export function rref(matrix: readonly (readonly number[])[], cols: number, tol = LINALG_TOL): RrefResult {
  const a = matrix.map((r) => r.slice())
  const pivots: number[] = []
  let row = 0
  for (let col = 0; col < cols && row < a.length; col++) {
    let best = row
    for (let r = row + 1; r < a.length; r++) if (Math.abs(a[r][col]) > Math.abs(a[best][col])) best = r
    if (Math.abs(a[best][col]) <= tol) continue
    ;[a[row], a[best]] = [a[best], a[row]]
    const p = a[row][col]
    for (let c = col; c < cols; c++) a[row][c] /= p
    for (let r = 0; r < a.length; r++) {
      if (r === row) continue
      const f = a[r][col]
      if (f === 0) continue
      for (let c = col; c < cols; c++) a[r][c] -= f * a[row][c]
    }
    pivots.push(col)
    row++
  }
  const rows = a.slice(0, row).map((r) => r.map((v) => (Math.abs(v) <= tol ? 0 : v)))
  return { rows, pivots }
}

/**
 * Basis of the null space {x : A x = 0} of a matrix with `cols` columns: one vector per free
 * column of the RREF, with 1 at that free column.
 */
export function nullSpace(matrix: readonly (readonly number[])[], cols: number, tol = LINALG_TOL): number[][] {
  const { rows, pivots } = rref(matrix, cols, tol)
  const isPivot = new Array<boolean>(cols).fill(false)
  pivots.forEach((p) => (isPivot[p] = true))
  const basis: number[][] = []
  for (let free = 0; free < cols; free++) {
    if (isPivot[free]) continue
    const v = new Array<number>(cols).fill(0)
    v[free] = 1
    rows.forEach((r, i) => (v[pivots[i]] = -r[free]))
    basis.push(v)
  }
  return basis
}

/** Orthonormal basis (Gram–Schmidt, twice for stability) of the span of `vectors`. */
export function orthonormalize(vectors: readonly Float64Array[], tol = LINALG_TOL): Float64Array[] {
  const out: Float64Array[] = []
  for (const v of vectors) {
    const w = Float64Array.from(v)
    for (let pass = 0; pass < 2; pass++)
      for (const u of out) {
        let d = 0
        for (let i = 0; i < w.length; i++) d += w[i] * u[i]
        for (let i = 0; i < w.length; i++) w[i] -= d * u[i]
      }
    let n = 0
    for (let i = 0; i < w.length; i++) n += w[i] * w[i]
    n = Math.sqrt(n)
    if (n <= tol) continue
    for (let i = 0; i < w.length; i++) w[i] /= n
    out.push(w)
  }
  return out
}
