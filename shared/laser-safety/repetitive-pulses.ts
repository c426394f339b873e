/**
 * Exposure limits for repetitively pulsed beams: the three rules of IEC 60825-1:2014 4.3 f / Annex A and
 * Directive 2006/25/EC Annex II Table 2.6 (docs/laser-safety.md §5).
 *
 * 1. Single pulse: each pulse ≤ MPE(τ).
 * 2. Average: the train over T ≤ MPE(T), expressed here as a mean irradiance MPE(T)/T.
 * 3. Pulse train: each (effective) pulse ≤ MPE(t_eff) × factor, where pulses closer than the
 *    grouping window (T_i for IEC 2014, T_min for the Directive) are merged into one pulse of
 *    duration equal to the window. The factor is C5 (IEC 2014) or C_P = N^−0.25 (Directive).
 */
import { computed, fmt, si, type Computed, type MpeEdition } from './computed'
import { groupingWindow } from './correction-factors'
import { requirePositive } from './errors'
import { ocularMpe, ocularMpeIrradiance, requireEdition } from './mpe'

/** Input of {@link pulseTrainLimits}. */
export interface PulseTrainInput {
  edition: MpeEdition
  wavelengthNm: number
  pulseDurationS: number
  repetitionRateHz: number
  /** Evaluation time T in seconds (e.g. 0.25 s aversion, 10 s, 100 s). */
  exposureDurationS: number
}

/** How pulses are merged for rule 3. */
export interface PulseGrouping {
  window: Computed
  isGrouped: boolean
  /** Pulses merged into one effective pulse (1 when not grouped; may be fractional). */
  pulsesPerGroup: number
  /** Duration of one effective pulse (s): the window when grouped, else the pulse duration. */
  effectiveDurationS: number
  /** N, the number of effective pulses in T (at least 1). */
  effectivePulseCount: number
}

/** The three limits for one pulse train. */
export interface PulseTrainLimits {
  edition: MpeEdition
  /** Rule 1: H per pulse (J/m²). */
  singlePulse: Computed
  /** Rule 2: mean irradiance over T (W/m²). */
  average: Computed
  grouping: PulseGrouping
  /** C5 (IEC 2014) or C_P (Directive), dimensionless. */
  trainFactor: Computed
  /** Rule 3: H per effective pulse (J/m²) = factor × MPE(t_eff). */
  pulseTrain: Computed
}

/** Groups the pulses of a train for rule 3 (see module comment). */
export function groupPulses(input: PulseTrainInput): PulseGrouping {
  const window = groupingWindow(input.wavelengthNm, input.edition)
  const isGrouped = input.repetitionRateHz * window.value > 1
  const effectiveDurationS = isGrouped ? window.value : input.pulseDurationS
  const pulsesPerGroup = isGrouped ? input.repetitionRateHz * window.value : 1
  const effectivePulseCount = Math.max(
    1,
    isGrouped ? input.exposureDurationS / window.value : input.repetitionRateHz * input.exposureDurationS,
  )
  return { window, isGrouped, pulsesPerGroup, effectiveDurationS, effectivePulseCount }
}

/**
 * C5 of IEC 60825-1:2014 for a point source (read from a public implementation of 4.3 f; to be
 * confirmed in the standard, docs/laser-safety.md §5).
 * Effective pulses no longer than T_i: 1 if T ≤ 0.25 s or N ≤ 600, else max(0.4, 5·N^−0.25).
 * Longer pulses: 1 (a point source has α ≤ 5 mrad).
 */
export function correctionC5(grouping: PulseGrouping, exposureDurationS: number): Computed {
  const src = 'IEC 60825-1:2014 Annex A (C5, repetitive pulses)'
  const n = grouping.effectivePulseCount
  const edition: MpeEdition = 'IEC-60825-1:2014'
  if (grouping.effectiveDurationS > grouping.window.value)
    return computed(1, '1', 'C5 = 1 (pulses longer than T_i, point source α ≤ 5 mrad)', src, { edition })
  if (exposureDurationS <= 0.25 || n <= 600)
    return computed(1, '1', `C5 = 1 (T ≤ 0.25 s or N ≤ 600; N = ${fmt(n)})`, src, { edition })
  const raw = 5 * n ** -0.25
  return computed(Math.max(0.4, raw), '1', `C5 = max(0.4, 5·N^−0.25) = max(0.4, ${fmt(raw)}), N = ${fmt(n)}`, src, {
    edition,
  })
}

/** C_P = N^−0.25 of the Directive (Annex II Table 2.6); thermal limits only. */
export function correctionCP(grouping: PulseGrouping): Computed {
  const n = grouping.effectivePulseCount
  return computed(n ** -0.25, '1', `C_P = N^−0.25 = ${fmt(n)}^−0.25`, 'Directive 2006/25/EC Annex II Table 2.6', {
    edition: 'EU-2006/25/EC',
    notes: ['applies to thermal limits only'],
  })
}

/** The three repetitive-pulse limits for a train (rules 1–3 of docs/laser-safety.md §5). */
export function pulseTrainLimits(input: PulseTrainInput): PulseTrainLimits {
  const edition = requireEdition(input.edition)
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('pulseDurationS', input.pulseDurationS)
  requirePositive('repetitionRateHz', input.repetitionRateHz)
  requirePositive('exposureDurationS', input.exposureDurationS)
  const base = { edition, wavelengthNm: input.wavelengthNm }
  const singlePulse = ocularMpe({ ...base, durationS: input.pulseDurationS })
  const average = ocularMpeIrradiance({ ...base, durationS: input.exposureDurationS })
  const grouping = groupPulses(input)
  const trainFactor =
    edition === 'IEC-60825-1:2014' ? correctionC5(grouping, input.exposureDurationS) : correctionCP(grouping)
  const groupMpe = ocularMpe({ ...base, durationS: grouping.effectiveDurationS })
  const name = edition === 'IEC-60825-1:2014' ? 'C5' : 'C_P'
  const pulseTrain = computed(
    trainFactor.value * groupMpe.value,
    'J/m²',
    `H_train = ${name}·MPE(t_eff) = ${fmt(trainFactor.value)} × ${si(groupMpe.value, 'J/m²')}, t_eff = ${si(grouping.effectiveDurationS, 's')}`,
    edition === 'IEC-60825-1:2014'
      ? 'IEC 60825-1:2014 Annex A (repetitive pulses, rule 3)'
      : 'Directive 2006/25/EC Annex II Table 2.6 (rule 3)',
    { edition },
  )
  return { edition, singlePulse, average, grouping, trainFactor, pulseTrain }
}
