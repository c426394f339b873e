/**
 * Computed hazard figures of one laser setup (issue 5), built on shared/laser-safety so the server
 * (detail answer) and the client (live preview in the form) show the same numbers. Every figure is
 * a `Computed` with its formula, source and edition; all are indicative.
 */
import {
  classHint, en207Labels, en207ScaleNumbers, nohd, ocularMpeIrradiance, peakFluence, peakIntensity, peakPower,
  pulseEnergy, requiredOpticalDensity, SafetyInputError, setupWavelengths, computed, fmt,
  DEFAULT_EXPOSURE_DURATION_S, type ClassHint, type Computed, type MpeEdition,
} from './laser-safety'
import type { EyewearEntry, LaserClass } from './records'

/** The hazard inputs the figures need (a subset of a setup). */
export interface HazardInput {
  sourceType: 'cw' | 'pulsed' | 'mode_locked'
  wavelengthsNm: number[]
  pulseDurationFs: number | null; repRateHz: number | null; maxAvgPowerMw: number | null; pulseEnergyUj: number | null
  beamDiameterMm: number | null; divergenceMrad: number | null; harmonicOrders: number[]
  laserClass: LaserClass | null; eyewear: EyewearEntry[]
}

export interface WavelengthFigures {
  order: number; wavelengthNm: number
  /** Harmonic line evaluated with the fundamental's average power (worst case). */
  isWorstCase: boolean
  mpe: Computed | null; od: Computed | null; wholeOd: number | null
  en207: { labels: string[]; scale: Computed[] } | null
  classHint: Computed<ClassHint> | null
  coverage: { isCovered: boolean; by: string | null; message: string }
  problems: string[]
}

export interface SetupFigures {
  edition: MpeEdition; spotDiameterUm: number; exposureDurationS: number
  pulseEnergy: Computed | null; peakPower: Computed | null; peakIntensity: Computed | null; peakFluence: Computed | null
  nohd: Computed | null
  classHint: ClassHint | null; declaredClass: LaserClass | null
  /** The declared class is lower than the indicative hint: check the classification. */
  isDeclaredBelowHint: boolean
  wavelengths: WavelengthFigures[]
  warnings: string[]; assumptions: string[]; missing: string[]
}

const RANK: Record<string, number> = { '1': 0, '1M': 1, '1M?': 1, '2': 2, '2M': 3, '2M?': 3, '3R': 4, '3B': 5, '4': 6 }

/** Parses `720–850, 1064` into [from, to] ranges (a single value is a ±0.5 nm range). */
export function parseBands(text: string): [number, number][] {
  return text.split(',').map((p) => p.trim()).filter(Boolean).flatMap((p): [number, number][] => {
    const [a, b] = p.split(/\s*[-–]\s*/).map(Number)
    if (!Number.isFinite(a)) return []
    if (b === undefined || !Number.isFinite(b)) return [[a - 0.5, a + 0.5]]
    return [[Math.min(a, b), Math.max(a, b)]]
  })
}

/** OD of an eyewear entry: the stated OD, else the EN 207 scale number (LBn ⇒ T ≤ 10⁻ⁿ, OD ≥ n). */
export function eyewearOd(e: EyewearEntry): number | null {
  if (e.od !== null && e.od !== undefined) return e.od
  const lb = /LB\s*(\d+)/i.exec(e.en207 ?? '')
  return lb ? Number(lb[1]) : null
}

function attempt<T>(problems: string[], fn: () => T): T | null {
  try { return fn() } catch (err) {
    if (err instanceof SafetyInputError) { problems.push(err.message); return null }
    throw err
  }
}

function coverage(nm: number, required: number | null, eyewear: EyewearEntry[]): WavelengthFigures['coverage'] {
  const λ = fmt(nm)
  const inBand = eyewear.filter((e) => parseBands(e.bandsNm).some(([a, b]) => nm >= a && nm <= b))
  if (!inBand.length) return { isCovered: false, by: null, message: `No eyewear covers ${λ} nm` }
  if (required === null) return { isCovered: true, by: inBand[0].description, message: `${inBand[0].description} covers ${λ} nm (required OD unknown: ask the LSO)` }
  const ok = inBand.find((e) => (eyewearOd(e) ?? -1) >= required)
  if (ok) return { isCovered: true, by: ok.description, message: `${ok.description} covers ${λ} nm with OD ${eyewearOd(ok)} ≥ ${fmt(required)}` }
  const best = Math.max(...inBand.map((e) => eyewearOd(e) ?? 0))
  return { isCovered: false, by: null, message: `Eyewear for ${λ} nm has OD ${best} < required ${fmt(required)}` }
}

/** All figures for a setup; missing inputs are listed rather than guessed (except where stated). */
export function setupFigures(s: HazardInput, opts: { edition?: MpeEdition; spotDiameterUm?: number } = {}): SetupFigures {
  const edition = opts.edition ?? 'IEC-60825-1:2014'
  const spot = opts.spotDiameterUm && opts.spotDiameterUm > 0 ? opts.spotDiameterUm : 2
  const T = DEFAULT_EXPOSURE_DURATION_S
  const missing: string[] = []; const warnings: string[] = []; const problems: string[] = []
  const assumptions = [`evaluation time ${T} s; point source; exposure averaged over the 7 mm limiting aperture`]
  const f0 = s.wavelengthsNm[0]
  const isPulsed = s.sourceType !== 'cw'
  const rate = isPulsed ? s.repRateHz : null
  const tau = isPulsed && s.pulseDurationFs ? s.pulseDurationFs * 1e-15 : null
  let powerW = s.maxAvgPowerMw !== null ? s.maxAvgPowerMw / 1000 : null
  if (powerW === null && s.pulseEnergyUj !== null && rate) {
    powerW = s.pulseEnergyUj * 1e-6 * rate
    assumptions.push(`average power taken as E·f = ${fmt(powerW)} W (no maximum average power given)`)
  }
  if (powerW === null) missing.push('maximum average power (or pulse energy and repetition rate)')
  if (isPulsed && !rate) missing.push('repetition rate')
  if (isPulsed && !tau) missing.push('pulse duration')
  const beamMm = s.beamDiameterMm ?? 1
  if (s.beamDiameterMm === null) assumptions.push('beam diameter not given: 1 mm assumed (whole beam enters the pupil)')
  const pulse = tau && rate ? { durationS: tau, repetitionRateHz: rate } : undefined

  const ep = powerW && rate ? attempt(problems, () => pulseEnergy(powerW!, rate))
    : s.pulseEnergyUj ? computed(s.pulseEnergyUj * 1e-6, 'J', `E_p = ${fmt(s.pulseEnergyUj)} µJ (as entered)`, 'entered') : null
  const pk = ep && tau ? attempt(problems, () => peakPower(ep.value, tau)) : null
  const intensity = pk ? attempt(problems, () => peakIntensity(pk.value, spot / 2)) : null
  const fluence = ep && isPulsed ? attempt(problems, () => peakFluence(ep.value, spot / 2)) : null

  const lines = f0 ? attempt(problems, () => setupWavelengths(f0, s.harmonicOrders)) ?? [] : []
  if (lines.length > 1) assumptions.push('harmonic lines (λ/2, λ/3 …) evaluated WORST CASE: the same average power, pulse duration and rate as the fundamental')
  const wavelengths: WavelengthFigures[] = lines.map((l) => {
    const nm = l.wavelength.value
    const p: string[] = []
    const base = { edition, wavelengthNm: nm, averagePowerW: powerW ?? 0, beamDiameterMm: beamMm, pulse, exposureDurationS: T }
    const mpe = attempt(p, () => ocularMpeIrradiance({ edition, wavelengthNm: nm, durationS: T }))
    const req = powerW ? attempt(p, () => requiredOpticalDensity(base)) : null
    const en = powerW ? attempt(p, () => en207ScaleNumbers({ wavelengthNm: nm, averagePowerW: powerW!, beamDiameterMm: beamMm, pulse })) : null
    const hint = powerW ? attempt(p, () => classHint({ wavelengthNm: nm, averagePowerW: powerW!, beamDiameterMm: beamMm, pulse }).hint) : null
    return {
      order: l.order, wavelengthNm: nm, isWorstCase: l.order > 1, mpe, od: req?.od ?? null, wholeOd: req?.wholeOd ?? null,
      en207: en ? { labels: en207Labels(nm, en), scale: en.map((r) => r.lb) } : null, classHint: hint,
      coverage: coverage(nm, req?.od.value ?? null, s.eyewear), problems: p,
    }
  })
  const hints = wavelengths.map((w) => w.classHint?.value).filter((h): h is ClassHint => !!h && h !== 'outside-table')
  const top = hints.length ? hints.reduce((a, b) => (RANK[b] > RANK[a] ? b : a)) : null
  const below = !!top && !!s.laserClass && RANK[s.laserClass] < RANK[top]
  if (below) warnings.push(`Declared class ${s.laserClass} is lower than the indicative hint ${top}: check the classification with the LSO`)
  for (const w of wavelengths) if (!w.coverage.isCovered) warnings.push(w.coverage.message)
  const mpe0 = wavelengths[0]?.mpe
  const hazard = powerW && mpe0 && s.divergenceMrad && s.beamDiameterMm !== null
    ? attempt(problems, () => nohd({ averagePowerW: powerW!, mpeWm2: mpe0.value, exitDiameterMm: s.beamDiameterMm!, divergenceMrad: s.divergenceMrad! })) : null
  if (problems.length) warnings.push(...problems)
  return {
    edition, spotDiameterUm: spot, exposureDurationS: T, pulseEnergy: ep, peakPower: pk, peakIntensity: intensity, peakFluence: fluence,
    nohd: hazard, classHint: top, declaredClass: s.laserClass, isDeclaredBelowHint: below, wavelengths, warnings, assumptions, missing,
  }
}
