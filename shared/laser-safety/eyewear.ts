/**
 * Required optical density of laser eyewear: OD = log10(H/MPE) (or E/MPE for irradiance), worked
 * out for the single-pulse, average and pulse-train rules and maximised (common practice,
 * docs/laser-safety.md §7).
 * The exposure is averaged over the limiting aperture (see `exposure.ts`).
 */
import { computed, si, type Computed } from './computed'
import { checkExposure, type BeamExposureInput, type ExposureCheck } from './exposure'

/** Names of the rules as the page shows them. */
export const RULE_NAME = { average: 'average power', singlePulse: 'single pulse', pulseTrain: 'pulse train' } as const

/** Result of {@link requiredOpticalDensity}. */
export interface RequiredOd {
  /** Required OD (≥ 0); dimensionless. */
  od: Computed
  /** Smallest whole OD that meets it (what a filter datasheet lists). */
  wholeOd: number
  /** log10(exposure/MPE) per rule; negative means that rule needs no filter. */
  byRule: { average?: number; singlePulse?: number; pulseTrain?: number }
  check: ExposureCheck
}

/** Required OD for a beam at the eye; the largest of the per-rule values, never below 0. */
export function requiredOpticalDensity(input: BeamExposureInput): RequiredOd {
  const check = checkExposure(input)
  const byRule: RequiredOd['byRule'] = {}
  if (check.average) byRule.average = Math.log10(check.average.ratio)
  if (check.singlePulse) byRule.singlePulse = Math.log10(check.singlePulse.ratio)
  if (check.pulseTrain) byRule.pulseTrain = Math.log10(check.pulseTrain.ratio)
  const value = Math.max(0, Math.log10(check.maxRatio))
  const rule = check[check.governing]!
  const quantity = check.governing === 'average' ? 'E' : 'H'
  const od = computed(
    value,
    '1',
    `OD = log10(${quantity} / MPE) = log10(${si(rule.exposure.value, rule.exposure.unit)} / ${si(rule.limit.value, rule.limit.unit)}) (${RULE_NAME[check.governing]} rule${check.average ? ', maximum over rules' : ''})`,
    'EN 207:2017 Annex B (OD = log10(exposure/MPE)); MPE per IEC 60825-1:2014 Annex A',
    {
      edition: check.edition,
      notes: [`limit: ${rule.limit.formula}`, `exposure: ${rule.exposure.formula}`],
    },
  )
  return { od, wholeOd: Math.ceil(value - 1e-9), byRule, check }
}
