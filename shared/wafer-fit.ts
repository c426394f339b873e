/**
 * How many rectangular chips a round wafer can give: the chips on a saw grid of pitch
 * (width + kerf) × (height + kerf), counting only chips wholly inside the wafer, best of four grid
 * offsets (the usual gross-die-per-wafer count by grid, common practice; the flat and an edge
 * exclusion make the real number smaller, so this is an upper bound that only refuses the impossible).
 */
export const DEFAULT_KERF_MM = 0.05

export function maxChipsOnWafer(
  diameterMm: number,
  widthMm: number,
  heightMm: number,
  kerfMm = DEFAULT_KERF_MM,
): number {
  const r = diameterMm / 2,
    px = widthMm + kerfMm,
    py = heightMm + kerfMm
  const inside = (x: number, y: number) => x * x + y * y <= r * r + 1e-9
  const nx = Math.ceil(r / px) + 1,
    ny = Math.ceil(r / py) + 1
  let best = 0
  for (const ox of [0, 0.5])
    for (const oy of [0, 0.5]) {
      let n = 0
      for (let i = -nx; i <= nx; i++) {
        const x0 = (i + ox) * px - kerfMm / 2,
          x1 = x0 + widthMm
        for (let j = -ny; j <= ny; j++) {
          const y0 = (j + oy) * py - kerfMm / 2,
            y1 = y0 + heightMm
          if (inside(x0, y0) && inside(x1, y0) && inside(x0, y1) && inside(x1, y1)) n++
        }
      }
      best = Math.max(best, n)
    }
  return best
}
