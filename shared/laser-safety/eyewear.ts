/**
 * Required optical density of laser eyewear: OD = log10(H/MPE) (or E/MPE for irradiance), worked
 * out for the single-pulse, average and pulse-train rules and maximised (FACTS.md §1.5 [V] H).
 * The exposure is averaged over the limiting aperture (see `exposure.ts`).
 */
import { computed, fmt, type Computed } from './computed'
import { checkExposure, type BeamExposureInput, type ExposureCheck } from './exposure'

/** Result of {@link requiredOpticalDensity}. */
export interface RequiredOd {
  /** Required OD (≥ 0); dimensionless. */
  od: Computed
  /** Smallest whole OD that meets it (what a filter datasheet lists). */
  wholeOd: number
  /** log10(exposure/MPE) per rule; negative means that rule needs no filter. */
  byRule: { average: number, singlePulse?: number, pulseTrain?: number }
  check: ExposureCheck
}

/** Required OD for a beam at the eye; the largest of the per-rule values, never below 0. */
export function requiredOpticalDensity(input: BeamExposureInput): RequiredOd {
  const check = checkExposure(input)
  const byRule: RequiredOd['byRule'] = { average: Math.log10(check.average.ratio) }
  if (check.singlePulse) byRule.singlePulse = Math.log10(check.singlePulse.ratio)
  if (check.pulseTrain) byRule.pulseTrain = Math.log10(check.pulseTrain.ratio)
  const value = Math.max(0, Math.log10(check.maxRatio))
  const rule = check[check.governing]!
  const quantity = check.governing === 'average' ? 'E' : 'H'
  const od = computed(value, '1',
    `OD = log10(${quantity} / MPE) = log10(${fmt(rule.exposure.value)} / ${fmt(rule.limit.value)}) (${check.governing} rule, maximum over rules)`,
    'FACTS.md §1.5 (OD [V] H)', {
      edition: check.edition,
      notes: [`limit: ${rule.limit.formula}`, `exposure: ${rule.exposure.formula}`],
    })
  return { od, wholeOd: Math.ceil(value - 1e-9), byRule, check }
}
