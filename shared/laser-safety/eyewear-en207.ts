/**
 * EN 207 scale numbers (LB1–LB10) for laser protective filters, by mode D/I/R/M.
 * Source: EN 207:2017 Annex B, read through public summaries and a public implementation of a
 * university laser safety guideline (docs/laser-safety.md §7).
 * EN 207 and EN 208 are superseded by ISO 19818-1:2021; an LSO must confirm the numbers.
 */
import { computed, fmt, si, type Computed } from './computed'
import { outsideTable, requirePositive } from './errors'
import { circleAreaM2 } from './units'

/** EN 207 test modes: D continuous, I 1 µs–0.25 s, R 1 ns–1 µs, M below 1 ns. */
export type En207Mode = 'D' | 'I' | 'R' | 'M'

/**
 * Input of {@link en207ScaleNumbers}. Omit `pulse` for a CW beam. A single pulse (no repetition
 * rate) gives `pulse.energyJ` and no average power: it gets its pulse-mode number only (N = 1).
 */
export interface En207Input {
  wavelengthNm: number
  averagePowerW?: number
  beamDiameterMm: number
  pulse?: { durationS: number; repetitionRateHz?: number | null; energyJ?: number | null }
  /**
   * Interval (s) over which pulses are counted for N^(1/4); default 10 s; open until confirmed (docs/laser-safety.md
   * §7).
   */
  countingIntervalS?: number
  /** Beams narrower than this are evaluated over this diameter (mm); default 1 mm; open until confirmed. */
  referenceDiameterMm?: number
}

/**
 * One mode's requirement. `lb.value` is an integer; 0 means the mode needs no filter (the scale
 * value is at or below zero, so the beam is below the LB1 limit); above 10 no EN 207 filter exists.
 */
export interface En207Requirement {
  mode: En207Mode
  lb: Computed
  /** The unrounded scale value before rounding up. */
  rawScale: number
  /** False when the scale value is at or below zero: no filter needed for this mode. */
  isNeeded: boolean
  isWithinScale: boolean
  /** `D 1064 LB5`, or `M 1560 none needed`. */
  label: string
}

/** Default counting interval for N in H·N^(1/4) (s). */
export const EN207_DEFAULT_COUNTING_INTERVAL_S = 10

const SOURCE = 'EN 207:2017 Annex B (Table B.1)'

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
const SCALE: Record<
  Band,
  Record<'D' | 'IR' | 'M', [string, (x: { e: number; h: number; hN: number; pk: number }) => number]>
> = {
  uv: {
    D: ['LB = log10(E) + 3', (x) => Math.log10(x.e) + 3],
    IR: ['LB = log10(H/3) − 1', (x) => Math.log10(x.h / 3) - 1],
    M: ['LB = log10(P_pk/3) − 10', (x) => Math.log10(x.pk / 3) - 10],
  },
  visNir: {
    D: ['LB = log10(E) − 1', (x) => Math.log10(x.e) - 1],
    IR: ["LB = log10(H'/5) + 3", (x) => Math.log10(x.hN / 5) + 3],
    M: ["LB = log10(H'/1.5) + 4", (x) => Math.log10(x.hN / 1.5) + 4],
  },
  ir: {
    D: ['LB = log10(E) − 3', (x) => Math.log10(x.e) - 3],
    IR: ['LB = log10(H) − 2', (x) => Math.log10(x.h) - 2],
    M: ['LB = log10(P_pk) − 11', (x) => Math.log10(x.pk) - 11],
  },
}

/**
 * Rounds a scale value up to a whole scale number; an exact limit is allowed. A value at or below
 * zero gives 0: the beam is at or below the lowest limit, so no filter is needed (never rounded up to 1).
 */
export function roundUpScale(raw: number): number {
  return raw <= 1e-9 ? 0 : Math.ceil(raw - 1e-9)
}

/**
 * Joins modes with equal LB numbers into labels such as `DIR 532 LB6`, in D, I, R, M order. Modes
 * that need no filter are left out; when none needs one the list is empty.
 */
export function en207Labels(wavelengthNm: number, requirements: readonly En207Requirement[]): string[] {
  const byLb = new Map<number, string>()
  for (const mode of ['D', 'I', 'R', 'M'] as const)
    for (const r of requirements.filter((q) => q.mode === mode && q.isNeeded))
      byLb.set(r.lb.value, (byLb.get(r.lb.value) ?? '') + mode)
  return [...byLb].map(([lb, modes]) => `${modes} ${Math.round(wavelengthNm)} LB${lb}`)
}

/**
 * Minimum EN 207 scale numbers. A CW beam gets a D number; a pulsed beam gets the D number (from
 * its average power) and the number of its pulse mode; a single pulse gets its pulse-mode number
 * only. E and H are taken over the beam area. H' = H·N^(1/4) for 400–1400 nm, N = pulses in the
 * counting interval (1 for a single pulse).
 */
export function en207ScaleNumbers(input: En207Input): En207Requirement[] {
  requirePositive('wavelengthNm', input.wavelengthNm)
  requirePositive('beamDiameterMm', input.beamDiameterMm)
  const interval = requirePositive('countingIntervalS', input.countingIntervalS ?? EN207_DEFAULT_COUNTING_INTERVAL_S)
  const reference = requirePositive('referenceDiameterMm', input.referenceDiameterMm ?? 1)
  const band = bandOf(input.wavelengthNm)
  const diameter = Math.max(input.beamDiameterMm, reference)
  const area = circleAreaM2(diameter)
  const nm = Math.round(input.wavelengthNm)
  const make = (
    mode: En207Mode,
    key: 'D' | 'IR' | 'M',
    x: { e: number; h: number; hN: number; pk: number },
    detail: string,
  ): En207Requirement => {
    const [formula, f] = SCALE[band][key]
    const rawScale = f(x)
    const lb = roundUpScale(rawScale)
    const isNeeded = lb > 0
    const outcome = isNeeded ? `LB${lb} (rounded up)` : 'at or below 0: none needed'
    return {
      mode,
      rawScale,
      isNeeded,
      isWithinScale: lb <= 10,
      label: isNeeded ? `${mode} ${nm} LB${lb}` : `${mode} ${nm} none needed`,
      lb: computed(
        lb,
        'LB',
        `${formula} = ${fmt(rawScale)} → ${outcome}; ${detail}, area of ${fmt(diameter)} mm`,
        SOURCE,
        { notes: lb > 10 ? ['above LB10: no EN 207 filter; ask the LSO'] : [] },
      ),
    }
  }
  const p = input.pulse
  const isSingle = !!p && p.repetitionRateHz == null
  const result: En207Requirement[] = []
  let e = 0
  if (!isSingle) {
    const power = requirePositive('averagePowerW', input.averagePowerW ?? Number.NaN)
    e = power / area
    result.push(make('D', 'D', { e, h: 0, hN: 0, pk: 0 }, `E = ${si(e, 'W/m²')}`))
  }
  if (!p) return result
  const { durationS } = p
  requirePositive('pulse.durationS', durationS)
  const mode = en207ModeFor(durationS)
  if (mode === 'D' && !isSingle) return result
  let energy: number
  let n: number
  if (isSingle) {
    energy = requirePositive('pulse.energyJ', p.energyJ ?? Number.NaN)
    n = 1
  } else {
    const rate = requirePositive('pulse.repetitionRateHz', p.repetitionRateHz as number)
    energy = input.averagePowerW! / rate
    n = Math.max(1, rate * interval)
  }
  if (mode === 'D') {
    const eLong = energy / durationS / area
    result.push(
      make(
        'D',
        'D',
        { e: eLong, h: 0, hN: 0, pk: 0 },
        `single pulse longer than 0.25 s: E = E_p/τ/A = ${si(eLong, 'W/m²')}`,
      ),
    )
    return result
  }
  const h = energy / area
  const nFactor = input.wavelengthNm >= 400 && input.wavelengthNm <= 1400 ? n ** 0.25 : 1
  const x = { e, h, hN: h * nFactor, pk: h / durationS }
  const count = isSingle ? 'N = 1 (single pulse)' : `N = ${fmt(n)} in ${si(interval, 's')}`
  const detail = `H = ${si(h, 'J/m²')}, ${count}, H' = ${nFactor === 1 ? 'H (no N factor outside 400–1400 nm)' : 'H·N^(1/4)'} = ${si(x.hN, 'J/m²')}, P_pk = H/τ = ${si(x.pk, 'W/m²')}`
  result.push(make(mode, mode === 'M' ? 'M' : 'IR', x, detail))
  return result
}
