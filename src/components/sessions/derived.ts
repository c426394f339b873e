import { formatSi } from '../../../shared/format'
/**
 * Derived figures of a session (indicative; the laser safety officer's assessment governs).
 * Pulse energy E = P_avg / f_rep. Peak power of a Gaussian pulse of FWHM τ: P_peak = 0.94 · E / τ
 * (0.94 = 2·sqrt(ln 2 / π)). Conversion efficiency η = P_N / P_pump and, for SHG, P_2 / P_pump²
 * in W⁻¹ — both with average powers, as the server computes them.
 */
export const GAUSSIAN_PEAK_FACTOR = 0.94

export function pulseEnergyJ(avgPowerMw: number | null, repRateHz: number | null): number | null {
  if (!avgPowerMw || !repRateHz || repRateHz <= 0) return null
  return avgPowerMw / 1000 / repRateHz
}

export function peakPowerW(energyJ: number | null, pulseDurationFs: number | null): number | null {
  if (energyJ === null || !pulseDurationFs || pulseDurationFs <= 0) return null
  return (GAUSSIAN_PEAK_FACTOR * energyJ) / (pulseDurationFs * 1e-15)
}

export function efficiency(harmonicPowerW: number | null, avgPowerMw: number | null, order: number) {
  if (harmonicPowerW === null || !avgPowerMw || avgPowerMw <= 0) return { efficiency: null, normalisedW: null }
  const pumpW = avgPowerMw / 1000
  return { efficiency: harmonicPowerW / pumpW, normalisedW: order === 2 ? harmonicPowerW / (pumpW * pumpW) : null }
}

/** 1.23e-9, 'J' → "1.23 nJ": the app's one SI formatter (shared/format.ts), 3 significant digits here. */
export function formatSI(value: number | null, unit: string): string {
  return formatSi(value, unit, 3)
}

/** Plain scientific notation for dimensionless or odd units: 1.2 × 10⁻⁹. */
export function formatSci(value: number | null, unit = ''): string {
  if (value === null || !Number.isFinite(value)) return '—'
  if (value === 0) return `0${unit ? ' ' + unit : ''}`
  const exp = Math.floor(Math.log10(Math.abs(value)))
  const sup = String(exp)
    .replace('-', '⁻')
    .replace(/\d/g, (d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)])
  const mant = (value / 10 ** exp).toPrecision(3)
  return `${mant} × 10${sup}${unit ? ' ' + unit : ''}`
}
