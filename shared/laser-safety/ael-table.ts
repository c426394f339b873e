/**
 * Accessible emission limits (AEL) of IEC 60825-1:2014 for the common cases, as data plus small
 * functions. Point source (C6 = 1). Source: IEC 60825-1:2014 Tables 3–8 (docs/laser-safety.md §6;
 * checked for the visible rows, secondary for the near infrared and the Class 3B pulses). The Class 1
 * pulse AEL is derived as MPE × limiting-aperture area, a relation built into the standard
 * (docs/laser-safety.md §3).
 */
import { correctionC4, correctionC7 } from './correction-factors'
import { limitingApertureMm, ocularMpe } from './mpe'
import { circleAreaM2 } from './units'

/** Classes for which an AEL is tabulated (Class 4 is "above 3B"). */
export type AelClass = '1' | '2' | '3R' | '3B'

/** An AEL value with its formula text; `value` is null when the table has no entry. */
export interface Ael {
  value: number | null
  formula: string
}

const IEC = 'IEC-60825-1:2014' as const
const isVisible = (nm: number) => nm >= 400 && nm < 700
const isNearIr = (nm: number) => nm >= 700 && nm <= 1400
const isEyeSafeBand = (nm: number) => nm >= 1500 && nm <= 1800

/** Wavelengths for which the class hint has table entries (400–1400 nm and 1500–1800 nm). */
export function isClassHintWavelength(nm: number): boolean {
  return isVisible(nm) || isNearIr(nm) || isEyeSafeBand(nm)
}

function c4c7(nm: number): number {
  return correctionC4(nm).value * correctionC7(nm, IEC).value
}

/** CW AEL (W) for the class's time base (Class 1: 100 s; Class 2/3R visible: 0.25 s). */
export function aelCw(cls: AelClass, nm: number): Ael {
  if (cls === '3B') return { value: 0.5, formula: 'AEL(3B) = 0.5 W' }
  if (cls === '2')
    return isVisible(nm)
      ? { value: 1e-3, formula: 'AEL(2) = 1 mW' }
      : { value: null, formula: 'Class 2 exists for 400–700 nm only' }
  const class1 = (): Ael => {
    if (isEyeSafeBand(nm)) return { value: 1e-2, formula: 'AEL(1) = 10 mW (1500–1800 nm)' }
    if (isNearIr(nm)) return { value: 3.9e-4 * c4c7(nm), formula: 'AEL(1) = 3.9×10⁻⁴·C4·C7 W' }
    if (nm >= 500) return { value: 3.9e-4, formula: 'AEL(1) = 0.39 mW (500–700 nm)' }
    return { value: null, formula: 'Class 1 CW AEL for 400–500 nm (photochemical) is not tabulated' }
  }
  if (cls === '1') return class1()
  if (isVisible(nm)) return { value: 5e-3, formula: 'AEL(3R) = 5 mW (400–700 nm)' }
  if (isEyeSafeBand(nm)) return { value: 5e-2, formula: 'AEL(3R) = 50 mW (1500–1800 nm)' }
  if (nm < 1050) return { value: 2e-3 * c4c7(nm), formula: 'AEL(3R) = 2×10⁻³·C4·C7 W (700–1050 nm)' }
  const one = class1()
  return { value: 5 * one.value!, formula: `AEL(3R) = 5 × AEL(1) = 5 × ${one.formula}` }
}

/** Single-pulse (or effective-pulse) AEL (J) for a pulse of duration τ < 0.25 s. */
export function aelPulse(cls: AelClass, nm: number, durationS: number): Ael {
  if (cls === '3B') return class3BPulse(nm, durationS)
  if (cls === '2' && !isVisible(nm)) return { value: null, formula: 'Class 2 exists for 400–700 nm only' }
  const mpe = ocularMpe({ edition: IEC, wavelengthNm: nm, durationS })
  const d = limitingApertureMm(nm, durationS).value
  const one = mpe.value * circleAreaM2(d)
  const base = `MPE × A(${d} mm), ${mpe.formula}`
  if (cls === '3R') return { value: 5 * one, formula: `AEL(3R) = 5 × AEL(1) = 5 × ${base}` }
  return { value: one, formula: cls === '1' ? `AEL(1) = ${base}` : `AEL(${cls}) = AEL(1) = ${base}` }
}

function class3BPulse(nm: number, durationS: number): Ael {
  let energy: number
  let text: string
  if (isVisible(nm)) {
    energy = durationS >= 0.06 ? 0.5 * durationS : 0.03
    text = durationS >= 0.06 ? '0.5 W × τ (0.06–0.25 s)' : '0.03 J (400–700 nm)'
  } else if (nm < 1050) {
    energy = 0.03 * correctionC4(nm).value
    text = '0.03·C4 J (700–1050 nm)'
  } else if (nm <= 1400) {
    energy = 0.15
    text = '0.15 J (1050–1400 nm)'
  } else {
    energy = 0.125
    text = '0.125 J (> 1400 nm)'
  }
  if (durationS >= 1e-9) return { value: energy, formula: `AEL(3B) = ${text}` }
  // Below 1 ns: a peak-power limit equal to the 1 ns energy limit / 1 ns (our reading, unconfirmed).
  return {
    value: (energy / 1e-9) * durationS,
    formula: `AEL(3B) = (${text} / 1 ns) × τ, a peak-power limit (IEC 60825-1:2014 Table 8)`,
  }
}
