/**
 * Unit helpers. The library works in SI internally (m, s, W, J, W/m², J/m²); inputs carry the
 * unit in their name (`wavelengthNm`, `beamDiameterMm`, `divergenceMrad`) as labs write them.
 */

/** Millimetres to metres. */
export function mmToM(mm: number): number {
  return mm * 1e-3
}

/** Milliradians to radians. */
export function mradToRad(mrad: number): number {
  return mrad * 1e-3
}

/** Micrometres to metres. */
export function umToM(um: number): number {
  return um * 1e-6
}

/** Area (m²) of a circle of the given diameter (mm). */
export function circleAreaM2(diameterMm: number): number {
  const r = mmToM(diameterMm) / 2
  return Math.PI * r * r
}

/** Converts a per-m² quantity (W/m², J/m²) to per-cm² (W/cm², J/cm²). */
export function perM2ToPerCm2(x: number): number {
  return x * 1e-4
}

/** Converts a per-cm² quantity (W/cm², J/cm²) to per-m² (W/m², J/m²). */
export function perCm2ToPerM2(x: number): number {
  return x * 1e4
}
