/**
 * EN 207 scale numbers (LB1–LB10) for laser protective filters, by mode D/I/R/M.
 * Source: FACTS.md §1.5 [V] M–H (public summaries of EN 207; UCC guideline implementation).
 * EN 207 and EN 208 are superseded by ISO 19818-1:2021; an LSO must confirm the numbers.
 */
import { computed, fmt, type Computed } from './computed'
import { outsideTable, requirePositive } from './errors'
import { circleAreaM2 } from './units'

/** EN 207 test modes: D continuous, I 1 µs–0.25 s, R 1 ns–1 µs, M below 1 ns. */
export type En207Mode = 'D' | 'I' | 'R' | 'M'

/** Input of {@link en207ScaleNumbers}. Omit `pulse` for a CW beam. */
export interface En207Input {
  wavelengthNm: number
  averagePowerW: number
  beamDiameterMm: number
  pulse?: { durationS: number, repetitionRateHz: number }
  /** Interval (s) over which pulses are counted for N^(1/4); default 10 s (UCC). FACTS.md §5.2 open. */
  countingIntervalS?: number
  /** Beams narrower than this are evaluated over this diameter (mm); default 1 mm. FACTS.md §5.2 open. */
  referenceDiameterMm?: number
}

/** One mode's requirement. `lb.value` is an integer; above 10 no EN 207 filter exists. */
export interface En207Requirement {
  mode: En207Mode
  lb: Computed
  /** The unrounded scale value before rounding up. */
  rawScale: number
  isWithinScale: boolean
  label: string
}

/** Default counting interval for N in H·N^(1/4) (s). */
export const EN207_DEFAULT_COUNTING_INTERVAL_S = 10

const SOURCE = 'FACTS.md §1.5 (EN 207 via public summary [V] M–H)'

/** The EN 207 mode of a pulse of the given duration (s). */
export function en207ModeFor(pulseDurationS: number): En207Mode {
  requirePositive('pulseDurationS', pulseDurationS)
  if (pulseDurationS > 0.25) return 'D'
  if (pulseDurationS >= 1e-6) return 'I'
  if (pulseDurationS >= 1e-9) return 'R'
  return 'M'
}

type Band = 'uv' | 'visNir' | 'ir'

function bandOf(wavelengthNm: number): Band {
  if (wavelengthNm >= 180 && wavelengthNm <= 315) return 'uv'
  if (wavelengthNm > 315 && wavelengthNm <= 1400) return 'visNir'
  if (wavelengthNm > 1400 && wavelengthNm <= 1e6) return 'ir'
  return outsideTable('wavelengthNm', wavelengthNm, 'EN 207 covers 180 nm–1 mm')
}

/** Scale formula per band and mode: [formula text, function of (E or H', peak power density)]. */
const SCALE: Record<Band, Record<'D' | 'IR' | 'M', [string, (x: { e: number, h: number, hN: number, pk: number }) => number]>> = {
  uv: {
    D: ['LB = log10(E) + 3', x => Math.log10(x.e) + 3],
    IR: ['LB = log10(H/3) − 1', x => Math.log10(x.h / 3) - 1],
    M: ['LB = log10(P_pk/3) − 10', x => Math.log10(x.pk / 3) - 10],
  },
  visNir: {
    D: ['LB = log10(E) − 1', x => Math.log10(x.e) - 1],
    IR: ["LB = log10(H'/5) + 3", x => Math.log10(x.hN / 5) + 3],
    M: ["LB = log10(H'/1.5) + 4", x => Math.log10(x.hN / 1.5) + 4],
  },
  ir: {
    D: ['LB = log10(E) − 3', x => Math.log10(x.e) - 3],
    IR: ['LB = log10(H) − 2', x => Math.log10(x.h) - 2],
    M: ['LB = log10(P_pk) − 11', x => Math.log10(x.pk) - 11],
  },
}

/** Rounds a scale value up to a whole LB number (at least 1); an exact limit is allowed. */
export function roundUpScale(raw: number): number {
  return Math.max(1, Math.ceil(raw - 1e-9))
}

/** Joins modes with equal LB numbers into labels such as `DIR 532 LB6`, in D, I, R, M order. */
export function en207Labels(wavelengthNm: number, requirements: readonly En207Requirement[]): string[] {
  const byLb = new Map<number, string>()
  for (const mode of ['D', 'I', 'R', 'M'] as const)
    for (const r of requirements.filter(q => q.mode === mode)) byLb.set(r.lb.value, (byLb.get(r.lb.value) ?? '') + mode)
  return [...byLb].map(([lb, modes]) => `${modes} ${Math.round(wavelengthNm)} LB${lb}`)
}

/**
 * Minimum EN 207 scale numbers. A CW beam gets a D number; a pulsed beam gets the D number (from
 * its average power) and the number of its pulse mode. E and H are taken over the beam area.
 * H' = H·N^(1/4) for 400–1400 nm, N = pulses in the counting interval.
 */
export function en207ScaleNumbers(input: En207Input): En207Requirement[] {
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('averagePowerW', input.averagePowerW)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  const interval = requirePositive('countingIntervalS', input.countingIntervalS ?? EN207_DEFAULT_COUNTING_INTERVAL_S)
  const reference = requirePositive('referenceDiameterMm', input.referenceDiameterMm ?? 1)
  const band = bandOf(input.wavelengthNm)
  const diameter = Math.max(input.beamDiameterMm, reference)
  const area = circleAreaM2(diameter)
  const e = input.averagePowerW / area
  const make = (mode: En207Mode, key: 'D' | 'IR' | 'M', x: { e: number, h: number, hN: number, pk: number }, detail: string) => {
    const [formula, f] = SCALE[band][key]
    const rawScale = f(x)
    const lb = roundUpScale(rawScale)
    return {
      mode, rawScale, isWithinScale: lb <= 10, label: `${mode} ${Math.round(input.wavelengthNm)} LB${lb}`,
      lb: computed(lb, 'LB', `${formula} = ${fmt(rawScale)} → LB${lb} (rounded up); ${detail}, area of ${fmt(diameter)} mm`, SOURCE,
        { notes: lb > 10 ? ['above LB10: no EN 207 filter; ask the LSO'] : [] }),
    }
  }
  const base = { e, h: 0, hN: 0, pk: 0 }
  const result: En207Requirement[] = [make('D', 'D', base, `E = ${fmt(e)} W/m²`)]
  if (!input.pulse) return result
  const { durationS, repetitionRateHz } = input.pulse
  requirePositive('pulse.durationS', durationS)
  requirePositive('pulse.repetitionRateHz', repetitionRateHz)
  const mode = en207ModeFor(durationS)
  if (mode === 'D') return result
  const h = input.averagePowerW / repetitionRateHz / area
  const n = Math.max(1, repetitionRateHz * interval)
  const nFactor = input.wavelengthNm >= 400 && input.wavelengthNm <= 1400 ? n ** 0.25 : 1
  const x = { e, h, hN: h * nFactor, pk: h / durationS }
  const detail = `H = ${fmt(h)} J/m², N = ${fmt(n)} in ${fmt(interval)} s, H' = ${nFactor === 1 ? 'H (no N factor outside 400–1400 nm)' : 'H·N^(1/4)'} = ${fmt(x.hN)} J/m², P_pk = H/τ = ${fmt(x.pk)} W/m²`
  result.push(make(mode, mode === 'M' ? 'M' : 'IR', x, detail))
  return result
}
