/**
 * Derived beam quantities: pulse energy, peak power, peak intensity and fluence at a Gaussian
 * focus, and the nominal ocular hazard distance (NOHD). Plain physics (Siegman, Lasers, 1986)
 * and the NOHD form of ANSI Z136.1 / IEC TR 60825-14 (from memory; docs/laser-safety.md §8). SI results; use
 * `perM2ToPerCm2` for lab units.
 */
import { computed, fmt, si, type Computed } from './computed'
import { requireNonNegative, requirePositive, SafetyInputError } from './errors'
import { mmToM, mradToRad, umToM } from './units'

/** Temporal pulse shape; sets k in P_pk = k·E/τ (τ = FWHM). */
export type PulseShape = 'gaussian' | 'sech2'

/** k = 0.94 for a Gaussian and 0.88 for a sech² pulse (peak of that pulse shape at FWHM τ). */
export const PEAK_POWER_FACTOR: Readonly<Record<PulseShape, number>> = { gaussian: 0.94, sech2: 0.88 }

const SRC_DERIVED = 'Gaussian beam and pulse relations (Siegman, Lasers, 1986)'

/** Pulse energy E_p = P_avg / f_rep (J). */
export function pulseEnergy(averagePowerW: number, repetitionRateHz: number): Computed {
  requirePositive('averagePowerW', averagePowerW)
  requirePositive('repetitionRateHz', repetitionRateHz)
  const value = averagePowerW / repetitionRateHz
  return computed(value, 'J', `E_p = P/f = ${si(averagePowerW, 'W')} / ${si(repetitionRateHz, 'Hz')}`, SRC_DERIVED)
}

/** Peak power P_pk = k·E_p/τ (W), τ the FWHM pulse duration. */
export function peakPower(pulseEnergyJ: number, pulseDurationS: number, shape: PulseShape = 'gaussian'): Computed {
  requirePositive('pulseEnergyJ', pulseEnergyJ)
  requirePositive('pulseDurationS', pulseDurationS)
  const k = PEAK_POWER_FACTOR[shape]
  if (k === undefined)
    throw new SafetyInputError({
      code: 'OUT_OF_RANGE',
      field: 'shape',
      value: shape,
      message: "must be 'gaussian' or 'sech2'",
    })
  const value = (k * pulseEnergyJ) / pulseDurationS
  return computed(
    value,
    'W',
    `P_pk = k·E/τ = ${k} × ${si(pulseEnergyJ, 'J')} / ${si(pulseDurationS, 's')} (${shape})`,
    SRC_DERIVED,
  )
}

/** Peak (on-axis) intensity of a Gaussian focus I₀ = 2P_pk/(π w₀²) (W/m²), w₀ the 1/e² radius. */
export function peakIntensity(peakPowerW: number, waistRadiusUm: number): Computed {
  requirePositive('peakPowerW', peakPowerW)
  requirePositive('waistRadiusUm', waistRadiusUm)
  const w0 = umToM(waistRadiusUm)
  const value = (2 * peakPowerW) / (Math.PI * w0 * w0)
  return computed(
    value,
    'W/m²',
    `I₀ = 2P_pk/(π w₀²) = 2 × ${si(peakPowerW, 'W')} / (π × (${fmt(waistRadiusUm)} µm)²)`,
    SRC_DERIVED,
  )
}

/** Peak (on-axis) fluence of a Gaussian focus F₀ = 2E_p/(π w₀²) (J/m²), w₀ the 1/e² radius. */
export function peakFluence(pulseEnergyJ: number, waistRadiusUm: number): Computed {
  requirePositive('pulseEnergyJ', pulseEnergyJ)
  requirePositive('waistRadiusUm', waistRadiusUm)
  const w0 = umToM(waistRadiusUm)
  const value = (2 * pulseEnergyJ) / (Math.PI * w0 * w0)
  return computed(
    value,
    'J/m²',
    `F₀ = 2E_p/(π w₀²) = 2 × ${si(pulseEnergyJ, 'J')} / (π × (${fmt(waistRadiusUm)} µm)²)`,
    SRC_DERIVED,
    { notes: ['on-axis value; the mean over πw₀² is half of it'] },
  )
}

/** Input of {@link nohd}. */
export interface NohdInput {
  averagePowerW: number
  /** MPE as an irradiance (W/m²), e.g. `ocularMpeIrradiance(...).value`. */
  mpeWm2: number
  /** Beam diameter at the exit (mm). */
  exitDiameterMm: number
  /** Full-angle divergence (mrad). */
  divergenceMrad: number
}

/**
 * Nominal ocular hazard distance NOHD = (√(4P/(π·MPE)) − a)/φ (m), 0 when the beam is already
 * below the MPE at the exit (ANSI Z136.1 / IEC TR 60825-14 form).
 */
export function nohd(input: NohdInput): Computed {
  requirePositive('averagePowerW', input.averagePowerW)
  requirePositive('mpeWm2', input.mpeWm2)
  requireNonNegative('exitDiameterMm', input.exitDiameterMm)
  requirePositive('divergenceMrad', input.divergenceMrad)
  const a = mmToM(input.exitDiameterMm)
  const phi = mradToRad(input.divergenceMrad)
  const hazardDiameter = Math.sqrt((4 * input.averagePowerW) / (Math.PI * input.mpeWm2))
  const value = Math.max(0, (hazardDiameter - a) / phi)
  return computed(
    value,
    'm',
    `NOHD = (√(4P/(π·MPE)) − a)/φ = (${si(hazardDiameter, 'm')} − ${si(a, 'm')}) / ${fmt(phi)} rad`,
    'ANSI Z136.1-2014 Appendix B (NOHD)',
  )
}
