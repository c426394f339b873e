/**
 * Exposure at the eye compared with the MPE, rule by rule (docs/laser-safety.md §5, §7). The exposure is
 * averaged over the limiting aperture: a beam no larger than the aperture counts in full over the
 * aperture area (Φ/A_aperture, common practice); a larger beam, taken as Gaussian with the
 * given 1/e² diameter, counts only the share through a centred aperture.
 */
import { computed, fmt, si, type Computed, type MpeEdition } from './computed'
import { requirePositive } from './errors'
import { limitingApertureMm, ocularMpe, ocularMpeIrradiance, requireEdition } from './mpe'
import { pulseTrainLimits, type PulseTrainLimits } from './repetitive-pulses'
import { circleAreaM2 } from './units'

/** Default evaluation time (s): 10 s (unintentional viewing; the time used in the published worked examples). */
export const DEFAULT_EXPOSURE_DURATION_S = 10

/** The exposure durations offered for an assessment (s): aversion response (visible only), 10 s, 100 s, 30 000 s. */
export const EXPOSURE_DURATION_CHOICES_S: readonly number[] = [0.25, 10, 100, 30000]

/** Visible band (nm) in which the aversion response (and any evaluation time below 10 s) may be relied on. */
export const isAversionBand = (nm: number) => nm >= 400 && nm <= 700

/**
 * The evaluation time actually used at a wavelength: the requested one, except that times below
 * 10 s rely on the aversion response, which exists for visible light only (IEC 60825-1:2014 4.3 e:
 * the 0.25 s time base is for 400–700 nm): outside 400–700 nm they are raised to 10 s, with the reason.
 */
export function exposureDurationFor(
  wavelengthNm: number,
  requestedS: number,
): { durationS: number; note: string | null } {
  const T = requirePositive('exposureDurationS', requestedS)
  if (T >= DEFAULT_EXPOSURE_DURATION_S || isAversionBand(wavelengthNm)) return { durationS: T, note: null }
  const what = T === 0.25 ? 'the 0.25 s aversion-response time' : `an evaluation time of ${fmt(T)} s (below 10 s)`
  return {
    durationS: DEFAULT_EXPOSURE_DURATION_S,
    note: `${fmt(wavelengthNm)} nm is not visible: ${what} applies to 400–700 nm only (no aversion response), so ${DEFAULT_EXPOSURE_DURATION_S} s is used (IEC 60825-1:2014 4.3 e; IEC TR 60825-14:2004 evaluation times)`,
  }
}

/**
 * Beam at the eye. Omit `pulse` for a CW beam. A single pulse (no repetition rate) gives its
 * energy in `pulse.energyJ` and needs no average power.
 */
export interface BeamExposureInput {
  edition: MpeEdition
  wavelengthNm: number
  /** Average power (W); not used for a single pulse. */
  averagePowerW?: number
  /** 1/e² beam diameter at the eye position (mm). */
  beamDiameterMm: number
  pulse?: { durationS: number; repetitionRateHz?: number | null; energyJ?: number | null }
  /** Evaluation time T (s); default {@link DEFAULT_EXPOSURE_DURATION_S}. */
  exposureDurationS?: number
}

/** One rule: exposure, limit, and ratio = exposure / limit. */
export interface RuleCheck {
  exposure: Computed
  limit: Computed
  ratio: number
}

/** All applicable rules for one beam; `governing` names the largest ratio (the limiting rule). */
export interface ExposureCheck {
  edition: MpeEdition
  /** Absent for a single pulse. */
  average?: RuleCheck
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
  return computed(
    value,
    unit,
    `${what} = ${si(amount, unit === 'W/m²' ? 'W' : 'J')}${shareText} / A(${fmt(d)} mm) = ${si(value, unit)}`,
    'IEC 60825-1:2014 Annex A (exposure averaged over the limiting aperture)',
  )
}

function check(exposure: Computed, limit: Computed): RuleCheck {
  return { exposure, limit, ratio: exposure.value / limit.value }
}

/**
 * Compares the beam with the MPE under each applicable rule (IEC 60825-1:2014 Annex A; Directive 2006/25/EC Annex II
 * Table 2.6).
 */
export function checkExposure(input: BeamExposureInput): ExposureCheck {
  const edition = requireEdition(input.edition)
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  const T = requirePositive('exposureDurationS', input.exposureDurationS ?? DEFAULT_EXPOSURE_DURATION_S)
  const p = input.pulse
  if (p && p.repetitionRateHz == null) {
    // A single pulse: rule 1 only (IEC 60825-1:2014 Annex A).
    requirePositive('pulse.durationS', p.durationS)
    const energy = requirePositive('pulse.energyJ', p.energyJ ?? Number.NaN)
    const limit = ocularMpe({ edition, wavelengthNm: input.wavelengthNm, durationS: p.durationS })
    const singlePulse = check(atEye(energy, 'J/m²', input, p.durationS, 'H_pulse'), limit)
    return { edition, singlePulse, governing: 'singlePulse', maxRatio: singlePulse.ratio }
  }
  const power = requirePositive('averagePowerW', input.averagePowerW ?? Number.NaN)
  const averageLimit = ocularMpeIrradiance({ edition, wavelengthNm: input.wavelengthNm, durationS: T })
  const average = check(atEye(power, 'W/m²', input, T, 'E'), averageLimit)
  if (!p) return { edition, average, governing: 'average', maxRatio: average.ratio }

  const { durationS } = p
  const repetitionRateHz = p.repetitionRateHz as number
  requirePositive('pulse.durationS', durationS)
  requirePositive('pulse.repetitionRateHz', repetitionRateHz)
  const limits = pulseTrainLimits({
    edition,
    wavelengthNm: input.wavelengthNm,
    pulseDurationS: durationS,
    repetitionRateHz,
    exposureDurationS: T,
  })
  const pulseEnergyJ = power / repetitionRateHz
  const singlePulse = check(atEye(pulseEnergyJ, 'J/m²', input, durationS, 'H_pulse'), limits.singlePulse)
  const g = limits.grouping
  const pulseTrain = check(
    atEye(pulseEnergyJ * g.pulsesPerGroup, 'J/m²', input, g.effectiveDurationS, 'H_group'),
    limits.pulseTrain,
  )
  const rules = { average, singlePulse, pulseTrain }
  const governing = (Object.keys(rules) as (keyof typeof rules)[]).reduce((a, b) =>
    rules[b].ratio > rules[a].ratio ? b : a,
  )
  return { edition, average, singlePulse, pulseTrain, limits, governing, maxRatio: rules[governing].ratio }
}
