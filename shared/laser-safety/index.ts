/**
 * Public entry of the laser-safety library (issue 5, laser-setup register). Pure functions:
 * every result carries its formula, source and, where a limit table is used, the edition.
 * All figures are indicative; screens must show {@link LASER_SAFETY_CAUTION} beside them.
 */
export { LASER_CAUTION as LASER_SAFETY_CAUTION } from '../safety'

export { computed, fmt, si, MPE_EDITIONS, type Computed, type MpeEdition } from './computed'
export { ASK_THE_LSO, SafetyInputError, type SafetyErrorCode, type SafetyInputErrorInit } from './errors'
export { circleAreaM2, mmToM, mradToRad, perCm2ToPerM2, perM2ToPerCm2, umToM } from './units'
export { correctionC4, correctionC7, groupingWindow } from './correction-factors'
export { MPE_BANDS, type MpeBand, type MpeRow } from './mpe-table'
export { limitingApertureMm, ocularMpe, ocularMpeIrradiance, type MpeInput } from './mpe'
export {
  correctionC5,
  correctionCP,
  groupPulses,
  pulseTrainLimits,
  type PulseGrouping,
  type PulseTrainInput,
  type PulseTrainLimits,
} from './repetitive-pulses'
export {
  apertureFraction,
  checkExposure,
  DEFAULT_EXPOSURE_DURATION_S,
  EXPOSURE_DURATION_CHOICES_S,
  exposureDurationFor,
  isAversionBand,
  type BeamExposureInput,
  type ExposureCheck,
  type RuleCheck,
} from './exposure'
export { aelCw, aelPulse, type Ael, type AelClass } from './ael-table'
export { classHint, type ClassCheck, type ClassHint, type ClassHintInput, type ClassHintResult } from './ael-class-hint'
export { requiredOpticalDensity, RULE_NAME, type RequiredOd } from './eyewear'
export {
  EN207_DEFAULT_COUNTING_INTERVAL_S,
  en207Labels,
  en207ModeFor,
  en207ScaleNumbers,
  roundUpScale,
  type En207Input,
  type En207Mode,
  type En207Requirement,
} from './eyewear-en207'
export { en208ScaleNumber, type En208Input, type En208Requirement } from './eyewear-en208'
export {
  nohd,
  peakFluence,
  peakIntensity,
  peakPower,
  pulseEnergy,
  PEAK_POWER_FACTOR,
  type NohdInput,
  type PulseShape,
} from './beam'
export { MAX_HARMONIC_ORDER, setupLines, setupWavelengths, type SetupLine, type SetupWavelength } from './harmonics'
