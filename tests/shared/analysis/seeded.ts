/** Seeded randomness for the analysis tests (mulberry32 + Box–Muller), so every run sees the same noise. */
export function seededNormal(seed: number): () => number {
  let a = seed >>> 0
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform())
}

/** Angles 0, step, … < 360 (degrees). */
export function sweepAngles(stepDeg: number): number[] {
  return Array.from({ length: Math.round(360 / stepDeg) }, (_, i) => i * stepDeg)
}
