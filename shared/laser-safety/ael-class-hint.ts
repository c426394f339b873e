/**
 * Indicative laser class hint (1, 1M?, 2, 2M?, 3R, 3B, 4) for the common cases: CW and
 * repetitively pulsed beams at 400–1400 nm and 1500–1800 nm, point source, IEC 60825-1:2014.
 * Anything else yields `outside-table` ("outside the table, ask the LSO"). A hint is not a
 * classification: the manufacturer's label and the LSO govern.
 *
 * A class is met when every applicable requirement of IEC 60825-1:2014 4.3 f holds
 * (docs/laser-safety.md §6):
 * the average power against the CW AEL, each pulse against the single-pulse AEL, and each
 * effective (grouped) pulse against the pulse AEL × C5. Class 3B uses the first two only.
 */
import { computed, fmt, si, type Computed } from './computed'
import { ASK_THE_LSO, requirePositive } from './errors'
import { aelCw, aelPulse, isClassHintWavelength, type Ael, type AelClass } from './ael-table'
import { apertureFraction } from './exposure'
import { correctionC5, groupPulses } from './repetitive-pulses'

/** Possible hints; `?` marks a magnifier-dependent class that needs the LSO to confirm. */
export type ClassHint = '1' | '1M?' | '2' | '2M?' | '3R' | '3B' | '4' | 'outside-table'

/**
 * Input of {@link classHint}. Omit `pulse` for a CW beam. A single pulse (no repetition rate)
 * gives `pulse.energyJ` and no average power: only the single-pulse AEL applies to it.
 */
export interface ClassHintInput {
  wavelengthNm: number
  averagePowerW?: number
  /** 1/e² beam diameter at 100 mm from the exit (mm); a beam over 7 mm may be 1M/2M. Default 1 mm. */
  beamDiameterMm?: number
  pulse?: { durationS: number; repetitionRateHz?: number | null; energyJ?: number | null }
}

/** One requirement checked for one class. */
export interface ClassCheck {
  cls: AelClass
  rule: 'average' | 'single pulse' | 'pulse train'
  emission: number
  unit: 'W' | 'J'
  ael: Ael
  passes: boolean
}

/** The hint with the requirement checks behind it (for showing the working). */
export interface ClassHintResult {
  hint: Computed<ClassHint>
  checks: ClassCheck[]
}

const SOURCE = 'IEC 60825-1:2014 4.3 e–f and Tables 3–8 (AEL)'
const ORDER: readonly AelClass[] = ['1', '2', '3R', '3B']

function timeBaseS(cls: AelClass, nm: number): number {
  return (cls === '2' || cls === '3R') && nm < 700 ? 0.25 : 100
}

function checksFor(cls: AelClass, input: ClassHintInput, share: number): ClassCheck[] {
  const nm = input.wavelengthNm
  const out: ClassCheck[] = []
  const add = (rule: ClassCheck['rule'], emission: number, unit: 'W' | 'J', ael: Ael, factor = 1) =>
    out.push({ cls, rule, emission, unit, ael, passes: ael.value !== null && emission <= ael.value * factor })
  const p = input.pulse
  if (p && p.repetitionRateHz == null) {
    // A single pulse: the single-pulse AEL only (IEC 60825-1:2014 4.3 f, requirement 1).
    if (p.durationS >= 0.25) add('single pulse', (p.energyJ! / p.durationS) * share, 'W', aelCw(cls, nm))
    else add('single pulse', p.energyJ! * share, 'J', aelPulse(cls, nm, p.durationS))
    return out
  }
  const power = input.averagePowerW! * share
  add('average', power, 'W', aelCw(cls, nm))
  if (!p || p.durationS >= 0.25) return out
  const energy = (input.averagePowerW! / p.repetitionRateHz!) * share
  add('single pulse', energy, 'J', aelPulse(cls, nm, p.durationS))
  if (cls === '3B') return out
  const T = timeBaseS(cls, nm)
  const g = groupPulses({
    edition: 'IEC-60825-1:2014',
    wavelengthNm: nm,
    pulseDurationS: p.durationS,
    repetitionRateHz: p.repetitionRateHz!,
    exposureDurationS: T,
  })
  const c5 = correctionC5(g, T).value
  const groupAel = aelPulse(cls, nm, g.effectiveDurationS)
  add('pulse train', energy * g.pulsesPerGroup, 'J', {
    value: groupAel.value === null ? null : groupAel.value * c5,
    formula: `C5 × ${groupAel.formula}, C5 = ${fmt(c5)}, ${fmt(g.pulsesPerGroup)} pulses per group`,
  })
  return out
}

function lowestClass(input: ClassHintInput, share: number, checks: ClassCheck[]): ClassHint {
  for (const cls of ORDER) {
    const c = checksFor(cls, input, share)
    checks.push(...c)
    if (c.every((x) => x.passes)) return cls
  }
  return '4'
}

/** Indicative class hint; see the module comment for the rules and limits. */
export function classHint(input: ClassHintInput): ClassHintResult {
  const nm = requirePositive('wavelengthNm', input.wavelengthNm)
  const diameter = requirePositive('beamDiameterMm', input.beamDiameterMm ?? 1)
  const isSingle = !!input.pulse && input.pulse.repetitionRateHz == null
  if (isSingle) requirePositive('pulse.energyJ', input.pulse!.energyJ ?? Number.NaN)
  else requirePositive('averagePowerW', input.averagePowerW ?? Number.NaN)
  if (input.pulse) {
    requirePositive('pulse.durationS', input.pulse.durationS)
    if (!isSingle) requirePositive('pulse.repetitionRateHz', input.pulse.repetitionRateHz!)
  }
  const edition = 'IEC-60825-1:2014' as const
  if (!isClassHintWavelength(nm))
    return {
      hint: computed<ClassHint>('outside-table', 'class', `no table entry for ${fmt(nm)} nm: ${ASK_THE_LSO}`, SOURCE, {
        edition,
      }),
      checks: [],
    }
  const checks: ClassCheck[] = []
  const full = lowestClass(input, 1, checks)
  let hint: ClassHint = full
  if (full !== '1' && full !== '2' && diameter > 7) {
    const share = apertureFraction(diameter, 7)
    const throughAperture = lowestClass(input, share, [])
    if (throughAperture === '1') hint = '1M?'
    else if (throughAperture === '2') hint = '2M?'
  }
  const failed = checks
    .filter((c) => !c.passes)
    .map(
      (c) =>
        `Class ${c.cls} ${c.rule}: ${si(c.emission, c.unit)} > ${c.ael.value === null ? 'n/a' : si(c.ael.value, c.unit)} (${c.ael.formula})`,
    )
  const notes = ['indicative only; the manufacturer’s classification and the LSO govern', ...failed]
  if (hint.endsWith('?'))
    notes.push(
      'within the lower class through a 7 mm aperture only: magnifying optics may make it hazardous; ask the LSO',
    )
  return {
    hint: computed(
      hint,
      'class',
      isSingle
        ? 'lowest class whose single-pulse AEL holds (single pulse, IEC 60825-1:2014 4.3 f)'
        : `lowest class whose AELs all hold (average, single pulse, pulse train × C5)`,
      SOURCE,
      { edition, notes },
    ),
    checks,
  }
}
