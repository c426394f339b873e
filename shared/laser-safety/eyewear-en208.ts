/**
 * EN 208 alignment eyewear (400–700 nm only): RB1–RB5 reduce the beam to about the Class 2 level.
 * Source: EN 208:2009 Annex B via a public summary (docs/laser-safety.md §7). Only the power passing a 7 mm aperture
 * counts (the share of a Gaussian beam, see `apertureFraction`).
 */
import { computed, fmt, si, type Computed } from './computed'
import { outsideTable, requirePositive } from './errors'
import { apertureFraction } from './exposure'
import { roundUpScale } from './eyewear-en207'

/** Input of {@link en208ScaleNumber}. Omit `pulse` for a CW beam; a single pulse gives `pulse.energyJ` and no rate. */
export interface En208Input {
  wavelengthNm: number
  averagePowerW?: number
  /** 1/e² beam diameter (mm). */
  beamDiameterMm: number
  pulse?: { durationS: number; repetitionRateHz?: number | null; energyJ?: number | null }
}

/**
 * Result: the RB number (0 when the beam through 7 mm is already at or below the RB1 limit: none
 * needed), the CW and pulse criteria behind it, and a label such as `RB2` (`none needed`).
 */
export interface En208Requirement {
  rb: Computed
  isNeeded: boolean
  isWithinScale: boolean
  label: string
}

const SOURCE = 'EN 208:2009 Annex B (Table B.1)'

/**
 * Minimum EN 208 RB number. CW (or pulses longer than 2×10⁻⁴ s): P ≤ 10^(n−3) W, so
 * n = log10(P) + 3. Pulses of 1 ns–0.2 ms: E·N^(1/4) ≤ 2×10^(n−7) J with N pulses in 10 s, so
 * n = log10(E·N^(1/4)/2) + 7; a pulse train must meet the CW criterion too (its average power).
 */
export function en208ScaleNumber(input: En208Input): En208Requirement {
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  if (input.wavelengthNm < 400 || input.wavelengthNm > 700)
    outsideTable('wavelengthNm', input.wavelengthNm, 'EN 208 alignment eyewear covers 400–700 nm only')
  const share = apertureFraction(input.beamDiameterMm, 7)
  const p = input.pulse
  const isSingle = !!p && p.repetitionRateHz == null
  const parts: string[] = []
  let raw = Number.NEGATIVE_INFINITY
  if (!isSingle) {
    const p7 = requirePositive('averagePowerW', input.averagePowerW ?? Number.NaN) * share
    const cwRaw = Math.log10(p7) + 3
    parts.push(`CW: n = log10(P₇) + 3 = log10(${si(p7, 'W')}) + 3 = ${fmt(cwRaw)}`)
    raw = cwRaw
  }
  if (p) {
    requirePositive('pulse.durationS', p.durationS)
    if (p.durationS < 1e-9)
      outsideTable('pulse.durationS', p.durationS, 'EN 208 has no criterion for pulses shorter than 1 ns')
    let e7: number
    let n: number
    if (isSingle) {
      e7 = requirePositive('pulse.energyJ', p.energyJ ?? Number.NaN) * share
      n = 1
    } else {
      const rate = requirePositive('pulse.repetitionRateHz', p.repetitionRateHz as number)
      e7 = (input.averagePowerW! / rate) * share
      n = Math.max(1, rate * 10)
    }
    if (p.durationS <= 2e-4) {
      const pulseRaw = Math.log10((e7 * n ** 0.25) / 2) + 7
      parts.push(
        `pulsed: n = log10(E₇·N^(1/4)/2) + 7 = log10(${si(e7, 'J')} × ${fmt(n)}^(1/4) / 2) + 7 = ${fmt(pulseRaw)}`,
      )
      raw = Math.max(raw, pulseRaw)
    } else if (isSingle) {
      const pLong = e7 / p.durationS
      const longRaw = Math.log10(pLong) + 3
      parts.push(`single pulse longer than 0.2 ms: n = log10(E₇/τ) + 3 = ${fmt(longRaw)}`)
      raw = longRaw
    }
  }
  const rb = roundUpScale(raw)
  const isNeeded = rb > 0
  const outcome = isNeeded ? `RB${rb} (rounded up)` : 'at or below 0: none needed (below the RB1 limit)'
  return {
    rb: computed(rb, 'RB', `${parts.join('; ')} → ${outcome}`, SOURCE, {
      notes: rb > 5 ? ['above RB5: no EN 208 alignment filter; use full-protection eyewear and ask the LSO'] : [],
    }),
    isNeeded,
    isWithinScale: rb <= 5,
    label: isNeeded ? `RB${rb}` : 'none needed',
  }
}
