import { formatDirection, getPointGroup, type Vec3 } from '../../../shared/engine'

/**
 * Name of a wafer cut: Miller plane "(001)", "(1-10)" for cubic classes (a bar is written as a
 * leading minus, as everywhere in Overtone); "Z-cut" / "X-cut" / "Y-cut" when the normal of a
 * non-cubic crystal is a crystal axis; else the Cartesian normal "[101]".
 */
export function cutLabel(pointGroup: string, normal: Vec3): string {
  let isCubic = false
  try {
    isCubic = getPointGroup(pointGroup).isCubic
  } catch {
    /* unknown group: treat as non-cubic */
  }
  if (isCubic) return formatDirection(normal, true)
  const i = normal.findIndex((v, k) => v !== 0 && normal.every((w, j) => j === k || w === 0))
  return i >= 0 ? `${'XYZ'[i]}-cut` : formatDirection(normal)
}
