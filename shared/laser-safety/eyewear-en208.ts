/**
 * EN 208 alignment eyewear (400–700 nm only): RB1–RB5 reduce the beam to about the Class 2 level.
 * Source: FACTS.md §1.5 [V] M–H (public EN 208 summary). Only the power passing a 7 mm aperture
 * counts (the share of a Gaussian beam, see `apertureFraction`).
 */
import { computed, fmt, type Computed } from './computed'
import { outsideTable, requirePositive } from './errors'
import { apertureFraction } from './exposure'
import { roundUpScale } from './eyewear-en207'

/** Input of {@link en208ScaleNumber}. Omit `pulse` for a CW beam. */
export interface En208Input {
  wavelengthNm: number
  averagePowerW: number
  /** 1/e² beam diameter (mm). */
  beamDiameterMm: number
  pulse?: { durationS: number, repetitionRateHz: number }
}

/** Result: the RB number, the CW and pulse criteria behind it, and a label such as `633 RB2`. */
export interface En208Requirement {
  rb: Computed
  isWithinScale: boolean
  label: string
}

const SOURCE = 'FACTS.md §1.5 (EN 208 via public summary [V] M–H)'

/**
 * Minimum EN 208 RB number. CW (or pulses longer than 2×10⁻⁴ s): P ≤ 10^(n−3) W, so
 * n = log10(P) + 3. Pulses of 1 ns–0.2 ms: E·N^(1/4) ≤ 2×10^(n−7) J with N pulses in 10 s, so
 * n = log10(E·N^(1/4)/2) + 7; a pulse train must meet the CW criterion too (its average power).
 */
export function en208ScaleNumber(input: En208Input): En208Requirement {
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('averagePowerW', input.averagePowerW)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  if (input.wavelengthNm < 400 || input.wavelengthNm > 700)
    outsideTable('wavelengthNm', input.wavelengthNm, 'EN 208 alignment eyewear covers 400–700 nm only')
  const share = apertureFraction(input.beamDiameterMm, 7)
  const p7 = input.averagePowerW * share
  const cwRaw = Math.log10(p7) + 3
  const parts = [`CW: n = log10(P₇) + 3 = log10(${fmt(p7)} W) + 3 = ${fmt(cwRaw)}`]
  let raw = cwRaw
  if (input.pulse) {
    const { durationS, repetitionRateHz } = input.pulse
    requirePositive('pulse.durationS', durationS)
    requirePositive('pulse.repetitionRateHz', repetitionRateHz)
    if (durationS < 1e-9) outsideTable('pulse.durationS', durationS, 'EN 208 has no criterion for pulses shorter than 1 ns')
    if (durationS <= 2e-4) {
      const n = Math.max(1, repetitionRateHz * 10)
      const e7 = (input.averagePowerW / repetitionRateHz) * share
      const pulseRaw = Math.log10((e7 * n ** 0.25) / 2) + 7
      parts.push(`pulsed: n = log10(E₇·N^(1/4)/2) + 7 = log10(${fmt(e7)} J × ${fmt(n)}^(1/4) / 2) + 7 = ${fmt(pulseRaw)}`)
      raw = Math.max(raw, pulseRaw)
    }
  }
  const rb = roundUpScale(raw)
  return {
    rb: computed(rb, 'RB', `${parts.join('; ')} → RB${rb} (rounded up)`, SOURCE,
      { notes: rb > 5 ? ['above RB5: no EN 208 alignment filter; use full-protection eyewear and ask the LSO'] : [] }),
    isWithinScale: rb <= 5,
    label: `${Math.round(input.wavelengthNm)} RB${rb}`,
  }
}
