/**
 * Computed hazard figures of one laser setup (issue 5), built on shared/laser-safety so the server
 * (detail answer) and the client (live preview in the form) show the same numbers. Every figure is
 * a `Computed` with its formula, source and edition; all are indicative.
 */
import {
  classHint,
  en207Labels,
  en207ScaleNumbers,
  en208ScaleNumber,
  exposureDurationFor,
  isAversionBand,
  limitingApertureMm,
  nohd,
  ocularMpe,
  ocularMpeIrradiance,
  peakFluence,
  peakIntensity,
  peakPower,
  pulseEnergy,
  pulseTrainLimits,
  requiredOpticalDensity,
  RULE_NAME,
  SafetyInputError,
  setupLines,
  computed,
  fmt,
  si,
  DEFAULT_EXPOSURE_DURATION_S,
  type ClassHint,
  type Computed,
  type MpeEdition,
} from './laser-safety'
import type { EyewearEntry, LaserClass } from './records'

/** The hazard inputs the figures need (a subset of a setup). */
export interface HazardInput {
  sourceType: 'cw' | 'pulsed' | 'mode_locked'
  wavelengthsNm: number[]
  pulseDurationFs: number | null
  repRateHz: number | null
  maxAvgPowerMw: number | null
  pulseEnergyUj: number | null
  beamDiameterMm: number | null
  divergenceMrad: number | null
  harmonicOrders: number[]
  laserClass: LaserClass | null
  eyewear: EyewearEntry[]
}

/** The rules of the MPE for repetitive pulses (IEC 60825-1:2014 Annex A). */
export type MpeRule = 'average' | 'singlePulse' | 'pulseTrain'

/** One MPE rule for one line: its limit, the exposure it is compared with and their ratio (when the power is known). */
export interface MpeRuleFigure {
  rule: MpeRule
  /** `average power`, `single pulse`, `pulse train`. */
  name: string
  limit: Computed
  exposure: Computed | null
  ratio: number | null
}

/** A scale-number requirement: the labels of what is needed (empty: none needed) and the numbers behind them. */
export interface ScaleFigures {
  labels: string[]
  scale: Computed[]
}

export interface WavelengthFigures {
  order: number
  wavelengthNm: number
  /** The fundamental of this line (itself for a fundamental). */
  fundamentalNm: number
  /** The wavelength is in the setup's list (a listed harmonic is recognised, not invented). */
  isListed: boolean
  /** Harmonic line evaluated with the fundamental's average power (worst case). */
  isWorstCase: boolean
  /**
   * Evaluation time used for this line (s): the requested one, or 10 s outside 400–700 nm when a shorter one was asked.
   */
  exposureDurationS: number
  /** Limiting aperture used over the evaluation time (mm). */
  apertureMm: number
  /** Headline MPE: the limit of the limiting rule (the one with the largest exposure/limit ratio). */
  mpe: Computed | null
  limitingRule: MpeRule | null
  /** Every applicable rule, the limiting one first. */
  mpeRules: MpeRuleFigure[]
  od: Computed | null
  wholeOd: number | null
  en207: ScaleFigures | null
  /** EN 208 alignment eyewear, visible lines (400–700 nm) only; null elsewhere or when inputs are missing. */
  en208: ScaleFigures | null
  classHint: Computed<ClassHint> | null
  coverage: { isCovered: boolean; by: string | null; message: string }
  problems: string[]
}

export interface SetupFigures {
  edition: MpeEdition
  spotDiameterUm: number
  /** The evaluation time asked for (s); lines outside 400–700 nm may use 10 s instead (see `exposureNotes`). */
  exposureDurationS: number
  /** What the evaluation time stands for, e.g. `aversion response (visible only)`. */
  exposureDurationLabel: string
  /** Why a line uses another evaluation time than the one asked for. */
  exposureNotes: string[]
  /** The source emits single pulses (pulsed, no repetition rate). */
  isSinglePulse: boolean
  pulseEnergy: Computed | null
  peakPower: Computed | null
  peakIntensity: Computed | null
  peakFluence: Computed | null
  nohd: Computed | null
  classHint: ClassHint | null
  declaredClass: LaserClass | null
  /** The declared class is lower than the indicative hint: check the classification. */
  isDeclaredBelowHint: boolean
  wavelengths: WavelengthFigures[]
  warnings: string[]
  assumptions: string[]
  missing: string[]
}

/** Options of {@link setupFigures}. */
export interface FigureOptions {
  edition?: MpeEdition
  spotDiameterUm?: number
  exposureDurationS?: number
}

/** What an evaluation time stands for (IEC 60825-1:2014 4.3 e; IEC TR 60825-14:2004). */
export function exposureDurationLabel(t: number): string {
  if (t === 0.25) return 'aversion response, visible beams only'
  if (t === DEFAULT_EXPOSURE_DURATION_S) return 'default: unintentional exposure'
  if (t === 100) return 'worst-case accidental exposure (IEC TR 60825-14)'
  if (t === 30000) return 'a full working day (8 h 20 min)'
  return 'typed value'
}

const RANK: Record<string, number> = { '1': 0, '1M': 1, '1M?': 1, '2': 2, '2M': 3, '2M?': 3, '3R': 4, '3B': 5, '4': 6 }

/** Parses `720–850, 1064` into [from, to] ranges (a single value is a ±0.5 nm range). */
export function parseBands(text: string): [number, number][] {
  return text
    .split(',')
    .map((p) => p.trim())
    .filter(Boolean)
    .flatMap((p): [number, number][] => {
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
  try {
    return fn()
  } catch (err) {
    if (err instanceof SafetyInputError) {
      problems.push(err.message)
      return null
    }
    throw err
  }
}

function coverage(nm: number, required: number | null, eyewear: EyewearEntry[]): WavelengthFigures['coverage'] {
  const λ = fmt(nm)
  const inBand = eyewear.filter((e) => parseBands(e.bandsNm).some(([a, b]) => nm >= a && nm <= b))
  if (!inBand.length) return { isCovered: false, by: null, message: `No eyewear covers ${λ} nm` }
  if (required === null)
    return {
      isCovered: true,
      by: inBand[0].description,
      message: `${inBand[0].description} covers ${λ} nm (required OD unknown: ask the LSO)`,
    }
  const ok = inBand.find((e) => (eyewearOd(e) ?? -1) >= required)
  if (ok)
    return {
      isCovered: true,
      by: ok.description,
      message: `${ok.description} covers ${λ} nm with OD ${eyewearOd(ok)} ≥ ${fmt(required)}`,
    }
  const best = Math.max(...inBand.map((e) => eyewearOd(e) ?? 0))
  return { isCovered: false, by: null, message: `Eyewear for ${λ} nm has OD ${best} < required ${fmt(required)}` }
}

/** All figures for a setup; missing inputs are listed rather than guessed (except where stated). */
export function setupFigures(s: HazardInput, opts: FigureOptions = {}): SetupFigures {
  const edition = opts.edition ?? 'IEC-60825-1:2014'
  const spot = opts.spotDiameterUm && opts.spotDiameterUm > 0 ? opts.spotDiameterUm : 2
  const askedT =
    opts.exposureDurationS && opts.exposureDurationS > 0 ? opts.exposureDurationS : DEFAULT_EXPOSURE_DURATION_S
  const missing: string[] = []
  const warnings: string[] = []
  const problems: string[] = []
  const assumptions = [`evaluation time T = ${fmt(askedT)} s (${exposureDurationLabel(askedT)}); point source (C6 = 1)`]
  const isPulsed = s.sourceType !== 'cw'
  const rate = isPulsed && s.repRateHz ? s.repRateHz : null
  const isSingle = isPulsed && !rate
  const tau = isPulsed && s.pulseDurationFs ? s.pulseDurationFs * 1e-15 : null
  const energyJ = isPulsed && s.pulseEnergyUj ? s.pulseEnergyUj * 1e-6 : null
  let powerW = !isSingle && s.maxAvgPowerMw !== null ? s.maxAvgPowerMw / 1000 : null
  if (!isSingle && powerW === null && energyJ !== null && rate) {
    powerW = energyJ * rate
    assumptions.push(`average power taken as E·f = ${si(powerW, 'W')} (no maximum average power given)`)
  }
  if (isSingle) {
    assumptions.push(
      'single pulses (no repetition rate): single-pulse MPE, OD, EN 207 / EN 208 numbers and class hint (IEC 60825-1:2014 4.3 f, requirement 1)',
    )
    if (energyJ === null) missing.push('pulse energy (a single-pulse source needs it; or give a repetition rate)')
  } else if (powerW === null) missing.push('maximum average power (or pulse energy and repetition rate)')
  if (isPulsed && !tau) missing.push('pulse duration')
  const beamMm = s.beamDiameterMm ?? 1
  if (s.beamDiameterMm === null) assumptions.push('beam diameter not given: 1 mm assumed (whole beam enters the pupil)')
  const pulse = !tau
    ? undefined
    : isSingle
      ? energyJ
        ? { durationS: tau, energyJ }
        : undefined
      : { durationS: tau, repetitionRateHz: rate! }
  const hasDose = isSingle ? !!pulse : powerW !== null

  const ep =
    powerW && rate
      ? attempt(problems, () => pulseEnergy(powerW!, rate))
      : energyJ
        ? computed(energyJ, 'J', `E_p = ${si(energyJ, 'J')} (as entered)`, 'entered on the setup')
        : null
  const pk = ep && tau ? attempt(problems, () => peakPower(ep.value, tau)) : null
  const intensity = pk ? attempt(problems, () => peakIntensity(pk.value, spot / 2)) : null
  const fluence = ep && isPulsed ? attempt(problems, () => peakFluence(ep.value, spot / 2)) : null

  const lines = s.wavelengthsNm.length
    ? (attempt(problems, () => setupLines(s.wavelengthsNm, s.harmonicOrders)) ?? [])
    : []
  if (lines.some((l) => l.order > 1))
    assumptions.push(
      'harmonic lines (λ/2, λ/3 …) evaluated WORST CASE: the same average power (or pulse energy), pulse duration and rate as their fundamental',
    )
  if (lines.filter((l) => l.order === 1).length > 1)
    assumptions.push('each listed fundamental is evaluated with the setup’s full power')
  const exposureNotes: string[] = []
  const apertureText: string[] = []
  const wavelengths: WavelengthFigures[] = lines.map((l) => {
    const nm = l.wavelengthNm
    const p: string[] = []
    const { durationS: T, note } = exposureDurationFor(nm, askedT)
    if (note) exposureNotes.push(note)
    const apertureMm = attempt(p, () => limitingApertureMm(nm, T).value) ?? 7
    const pulseAperture = pulse && nm > 1400 ? attempt(p, () => limitingApertureMm(nm, pulse.durationS).value) : null
    apertureText.push(
      `${fmt(nm)} nm: ${fmt(apertureMm)} mm over ${fmt(T)} s${pulseAperture !== null && pulseAperture !== apertureMm ? `, ${fmt(pulseAperture)} mm per pulse` : ''}`,
    )
    const base = {
      edition,
      wavelengthNm: nm,
      averagePowerW: powerW ?? undefined,
      beamDiameterMm: beamMm,
      pulse,
      exposureDurationS: T,
    }
    const req = hasDose ? attempt(p, () => requiredOpticalDensity(base)) : null
    const mpeRules: MpeRuleFigure[] = req
      ? (['average', 'singlePulse', 'pulseTrain'] as const).flatMap((rule) => {
          const c = req.check[rule]
          return c ? [{ rule, name: RULE_NAME[rule], limit: c.limit, exposure: c.exposure, ratio: c.ratio }] : []
        })
      : limitsOnly(p, edition, nm, T, isSingle, tau, rate)
    const limitingRule: MpeRule | null = req ? req.check.governing : mpeRules.length === 1 ? mpeRules[0]!.rule : null
    mpeRules.sort((a, b) => Number(b.rule === limitingRule) - Number(a.rule === limitingRule))
    const headline = limitingRule
      ? mpeRules.find((r) => r.rule === limitingRule)!.limit
      : (mpeRules.find((r) => r.rule === 'average')?.limit ?? null)
    const mpe =
      headline && limitingRule && mpeRules.length > 1
        ? {
            ...headline,
            formula: `limiting rule: ${RULE_NAME[limitingRule]} (largest exposure/limit ratio of ${mpeRules.length} rules); ${headline.formula}`,
          }
        : headline
    const en = hasDose
      ? attempt(p, () =>
          en207ScaleNumbers({ wavelengthNm: nm, averagePowerW: powerW ?? undefined, beamDiameterMm: beamMm, pulse }),
        )
      : null
    const isSubNs = !!pulse && pulse.durationS < 1e-9
    if (hasDose && isAversionBand(nm) && isSubNs)
      p.push(
        'EN 208 alignment eyewear: no scale number for pulses shorter than 1 ns (EN 208:2009 Annex B covers CW and 1 ns–0.2 ms pulses); use EN 207 eyewear for alignment',
      )
    const rb =
      hasDose && isAversionBand(nm) && !isSubNs
        ? attempt(p, () =>
            en208ScaleNumber({ wavelengthNm: nm, averagePowerW: powerW ?? undefined, beamDiameterMm: beamMm, pulse }),
          )
        : null
    const hint = hasDose
      ? attempt(
          p,
          () => classHint({ wavelengthNm: nm, averagePowerW: powerW ?? undefined, beamDiameterMm: beamMm, pulse }).hint,
        )
      : null
    return {
      order: l.order,
      wavelengthNm: nm,
      fundamentalNm: l.fundamentalNm,
      isListed: l.isListed,
      isWorstCase: l.order > 1,
      exposureDurationS: T,
      apertureMm,
      mpe,
      limitingRule,
      mpeRules,
      od: req?.od ?? null,
      wholeOd: req?.wholeOd ?? null,
      en207: en ? { labels: en207Labels(nm, en), scale: en.map((r) => r.lb) } : null,
      en208: rb ? { labels: rb.isNeeded ? [rb.label] : [], scale: [rb.rb] } : null,
      classHint: hint,
      coverage: coverage(nm, req?.od.value ?? null, s.eyewear),
      problems: p,
    }
  })
  if (apertureText.length)
    assumptions.push(
      `limiting apertures (IEC 60825-1:2014 Annex A): ${apertureText.join('; ')}; exposure averaged over them`,
    )
  assumptions.push(
    'class hints use the classification time bases of IEC 60825-1:2014 4.3 e (0.25 s for Class 2/3R visible, 100 s otherwise), whatever the evaluation time',
  )
  const hints = wavelengths.map((w) => w.classHint?.value).filter((h): h is ClassHint => !!h && h !== 'outside-table')
  const top = hints.length ? hints.reduce((a, b) => (RANK[b] > RANK[a] ? b : a)) : null
  const below = !!top && !!s.laserClass && RANK[s.laserClass] < RANK[top]
  if (below)
    warnings.push(
      `Declared class ${s.laserClass} is lower than the indicative hint ${top}: check the classification with the LSO`,
    )
  for (const w of wavelengths) if (!w.coverage.isCovered) warnings.push(w.coverage.message)
  const avg0 = wavelengths[0]?.mpeRules.find((r) => r.rule === 'average')?.limit
  const hazard =
    powerW && avg0 && s.divergenceMrad && s.beamDiameterMm !== null
      ? attempt(problems, () =>
          nohd({
            averagePowerW: powerW!,
            mpeWm2: avg0.value,
            exitDiameterMm: s.beamDiameterMm!,
            divergenceMrad: s.divergenceMrad!,
          }),
        )
      : null
  if (problems.length) warnings.push(...problems)
  return {
    edition,
    spotDiameterUm: spot,
    exposureDurationS: askedT,
    exposureDurationLabel: exposureDurationLabel(askedT),
    exposureNotes,
    isSinglePulse: isSingle,
    pulseEnergy: ep,
    peakPower: pk,
    peakIntensity: intensity,
    peakFluence: fluence,
    nohd: hazard,
    classHint: top,
    declaredClass: s.laserClass,
    isDeclaredBelowHint: below,
    wavelengths,
    warnings,
    assumptions,
    missing,
  }
}

/** The MPE limits of a line when the power is not known (no exposure to compare with). */
function limitsOnly(
  p: string[],
  edition: MpeEdition,
  nm: number,
  T: number,
  isSingle: boolean,
  tau: number | null,
  rate: number | null,
): MpeRuleFigure[] {
  const rule = (r: MpeRule, limit: Computed | null): MpeRuleFigure[] =>
    limit ? [{ rule: r, name: RULE_NAME[r], limit, exposure: null, ratio: null }] : []
  if (isSingle)
    return tau
      ? rule(
          'singlePulse',
          attempt(p, () => ocularMpe({ edition, wavelengthNm: nm, durationS: tau })),
        )
      : []
  if (tau && rate) {
    const l = attempt(p, () =>
      pulseTrainLimits({
        edition,
        wavelengthNm: nm,
        pulseDurationS: tau,
        repetitionRateHz: rate,
        exposureDurationS: T,
      }),
    )
    return l
      ? [...rule('average', l.average), ...rule('singlePulse', l.singlePulse), ...rule('pulseTrain', l.pulseTrain)]
      : []
  }
  return rule(
    'average',
    attempt(p, () => ocularMpeIrradiance({ edition, wavelengthNm: nm, durationS: T })),
  )
}
