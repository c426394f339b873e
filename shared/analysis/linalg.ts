/**
 * Small dense linear algebra for the fits (p ≤ ~30 unknowns): Gauss–Jordan inversion with partial
 * pivoting and linear least squares via the normal equations. Internal to the analysis library.
 */

/** Inverse of a square matrix (rows), or `undefined` when it is singular to working precision. */
export function invert(a: readonly (readonly number[])[]): number[][] | undefined {
  const n = a.length
  const m = a.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))])
  const scale = Math.max(1e-300, ...a.map((r) => Math.max(...r.map(Math.abs))))
  for (let c = 0; c < n; c++) {
    let p = c
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r
    if (Math.abs(m[p][c]) < 1e-13 * scale) return undefined
    ;[m[c], m[p]] = [m[p], m[c]]
    const d = m[c][c]
    for (let j = 0; j < 2 * n; j++) m[c][j] /= d
    for (let r = 0; r < n; r++) {
      if (r === c || m[r][c] === 0) continue
      const f = m[r][c]
      for (let j = 0; j < 2 * n; j++) m[r][j] -= f * m[c][j]
    }
  }
  return m.map((row) => row.slice(n))
}

/** JᵀJ of a Jacobian given as rows (one row per data point). */
export function normalMatrix(jac: readonly (readonly number[])[]): number[][] {
  const p = jac[0]?.length ?? 0
  const out = Array.from({ length: p }, () => new Array<number>(p).fill(0))
  for (const row of jac) for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) out[i][j] += row[i] * row[j]
  return out
}

/** Least-squares coefficients of y ≈ Σ c_k·columns_k (design given as rows), or `undefined` if singular. */
export function leastSquares(design: readonly (readonly number[])[], y: readonly number[]): number[] | undefined {
  const inv = invert(normalMatrix(design))
  if (!inv) return undefined
  const p = inv.length
  const jty = new Array<number>(p).fill(0)
  design.forEach((row, i) => row.forEach((v, k) => (jty[k] += v * y[i])))
  return inv.map((row) => row.reduce((s, v, k) => s + v * jty[k], 0))
}
