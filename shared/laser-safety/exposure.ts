/**
 * Exposure at the eye compared with the MPE, rule by rule (FACTS.md §1.4, §1.5). The exposure is
 * averaged over the limiting aperture: a beam no larger than the aperture counts in full over the
 * aperture area (Φ/A_aperture, FACTS.md §1.5 [V] H); a larger beam, taken as Gaussian with the
 * given 1/e² diameter, counts only the share through a centred aperture.
 */
import { computed, fmt, type Computed, type MpeEdition } from './computed'
import { requirePositive } from './errors'
import { limitingApertureMm, ocularMpeIrradiance, requireEdition } from './mpe'
import { pulseTrainLimits, type PulseTrainLimits } from './repetitive-pulses'
import { circleAreaM2 } from './units'

/** Default evaluation time (s): 10 s, the value used in FACTS.md §1.6 example A. */
export const DEFAULT_EXPOSURE_DURATION_S = 10

/** Beam at the eye. Omit `pulse` for a CW beam. */
export interface BeamExposureInput {
  edition: MpeEdition
  wavelengthNm: number
  averagePowerW: number
  /** 1/e² beam diameter at the eye position (mm). */
  beamDiameterMm: number
  pulse?: { durationS: number, repetitionRateHz: number }
  /** Evaluation time T (s); default {@link DEFAULT_EXPOSURE_DURATION_S}. */
  exposureDurationS?: number
}

/** One rule: exposure, limit, and ratio = exposure / limit. */
export interface RuleCheck {
  exposure: Computed
  limit: Computed
  ratio: number
}

/** All applicable rules for one beam; `governing` names the largest ratio. */
export interface ExposureCheck {
  edition: MpeEdition
  average: RuleCheck
  singlePulse?: RuleCheck
  pulseTrain?: RuleCheck
  limits?: PulseTrainLimits
  governing: 'average' | 'singlePulse' | 'pulseTrain'
  maxRatio: number
}

/** Share of a Gaussian beam (1/e² diameter d) passing a centred aperture D; 1 when d ≤ D. */
export function apertureFraction(beamDiameterMm: number, apertureMm: number): number {
  requirePositive('beamDiameterMm', beamDiameterMm)
  requirePositive('apertureMm', apertureMm)
  return beamDiameterMm <= apertureMm ? 1 : 1 - Math.exp(-2 * (apertureMm / beamDiameterMm) ** 2)
}

function atEye(amount: number, unit: string, input: BeamExposureInput, durationS: number, what: string): Computed {
  const d = limitingApertureMm(input.wavelengthNm, durationS).value
  const share = apertureFraction(input.beamDiameterMm, d)
  const value = (amount * share) / circleAreaM2(d)
  const shareText = share === 1 ? '' : ` × ${fmt(share)} (share through aperture)`
  return computed(value, unit, `${what} = ${fmt(amount)}${shareText} / A(${fmt(d)} mm) = ${fmt(value)} ${unit}`, 'FACTS.md §1.5 (aperture rule [V] H)')
}

function check(exposure: Computed, limit: Computed): RuleCheck {
  return { exposure, limit, ratio: exposure.value / limit.value }
}

/** Compares the beam with the MPE under each applicable rule of FACTS.md §1.4. */
export function checkExposure(input: BeamExposureInput): ExposureCheck {
  const edition = requireEdition(input.edition)
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('averagePowerW', input.averagePowerW)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  const T = requirePositive('exposureDurationS', input.exposureDurationS ?? DEFAULT_EXPOSURE_DURATION_S)
  const averageLimit = ocularMpeIrradiance({ edition, wavelengthNm: input.wavelengthNm, durationS: T })
  const average = check(atEye(input.averagePowerW, 'W/m²', input, T, 'E'), averageLimit)
  if (!input.pulse) return { edition, average, governing: 'average', maxRatio: average.ratio }

  const { durationS, repetitionRateHz } = input.pulse
  requirePositive('pulse.durationS', durationS)
  requirePositive('pulse.repetitionRateHz', repetitionRateHz)
  const limits = pulseTrainLimits({ edition, wavelengthNm: input.wavelengthNm, pulseDurationS: durationS, repetitionRateHz, exposureDurationS: T })
  const pulseEnergyJ = input.averagePowerW / repetitionRateHz
  const singlePulse = check(atEye(pulseEnergyJ, 'J/m²', input, durationS, 'H_pulse'), limits.singlePulse)
  const g = limits.grouping
  const pulseTrain = check(atEye(pulseEnergyJ * g.pulsesPerGroup, 'J/m²', input, g.effectiveDurationS, 'H_group'), limits.pulseTrain)
  const rules = { average, singlePulse, pulseTrain }
  const governing = (Object.keys(rules) as (keyof typeof rules)[]).reduce((a, b) => (rules[b].ratio > rules[a].ratio ? b : a))
  return { edition, average, singlePulse, pulseTrain, limits, governing, maxRatio: rules[governing].ratio }
}
