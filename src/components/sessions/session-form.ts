import type { PumpSpec } from '../../../shared/engine'
import type { SessionInput } from '../../../shared/schemas/records'
import { OBSERVED_NORMAL } from '../../../shared/schemas/records'

/**
 * Form state of "Log a session". Units as the person types them; `toSessionInput` converts (MHz → Hz, pW/nW/µW → W).
 */
export interface SessionForm {
  laserSetupId: number | null
  /** Local date-time, `YYYY-MM-DDTHH:mm`. */
  performedAt: string
  wavelengthNm: number | null
  pulseDurationFs: number | null
  repRateMhz: number | null
  avgPowerMw: number | null
  spotDiameterUm: number | null
  objectiveNa: number | null
  pump: Exclude<PumpSpec, { type: 'explicit' }>
  harmonicOrder: number
  geometry: 'transmission' | 'reflection'
  collection: 'normal' | 'angle_resolved'
  analyser: string
  detector: string
  integrationS: number | null
  filters: string
  notes: string
}

export type PowerUnit = 'pW' | 'nW' | 'µW'
export const POWER_UNITS: Record<PowerUnit, number> = { pW: 1e-12, nW: 1e-9, µW: 1e-6 }

export interface ResultForm {
  arrayId: number
  arrayCode: string
  powerValue: number | null
  powerUnit: PowerUnit
  observedNormal: (typeof OBSERVED_NORMAL)[number]
  /** Comma-separated integers, e.g. "0, 4". */
  observedM: string
  notes: string
}

export const OBSERVED_OPTIONS: { value: ResultForm['observedNormal']; label: string }[] = [
  { value: 'not_checked', label: 'Not checked' },
  { value: 'none', label: 'Nothing along the normal' },
  { value: 'present', label: 'Something (handedness not analysed)' },
  { value: 'co', label: 'Co-rotating circular' },
  { value: 'counter', label: 'Counter-rotating circular' },
  { value: 'linear', label: 'Linear' },
]

export const observedLabel = (v: string) => OBSERVED_OPTIONS.find((o) => o.value === v)?.label ?? v

function localNow(): string {
  const d = new Date(Date.now() - new Date().getTimezoneOffset() * 60_000)
  return d.toISOString().slice(0, 16)
}

export function emptySessionForm(): SessionForm {
  return {
    laserSetupId: null,
    performedAt: localNow(),
    wavelengthNm: 1550,
    pulseDurationFs: null,
    repRateMhz: null,
    avgPowerMw: null,
    spotDiameterUm: null,
    objectiveNa: null,
    pump: { type: 'circular', m: 1 },
    harmonicOrder: 2,
    geometry: 'reflection',
    collection: 'normal',
    analyser: '',
    detector: '',
    integrationS: null,
    filters: '',
    notes: '',
  }
}

export function newResult(arrayId: number, arrayCode: string): ResultForm {
  return {
    arrayId,
    arrayCode,
    powerValue: null,
    powerUnit: 'nW',
    observedNormal: 'not_checked',
    observedM: '',
    notes: '',
  }
}

/** "0, 4, −2" → [0, 4, -2] (accepts the typographic minus); non-integers are dropped. */
export function parseMList(text: string): number[] {
  return text
    .split(/[,;\s]+/)
    .map((s) => s.replace('−', '-').replace(/^\+/, ''))
    .filter((s) => /^-?\d+$/.test(s))
    .map(Number)
}

const orNull = (v: number | null | string) => (v === null || v === '' || Number.isNaN(Number(v)) ? null : Number(v))
const textOrNull = (s: string) => (s.trim() ? s.trim() : null)

export function toResultInput(r: ResultForm): SessionInput['results'][number] {
  const p = orNull(r.powerValue)
  return {
    arrayId: r.arrayId,
    harmonicPowerW: p === null ? null : p * POWER_UNITS[r.powerUnit],
    observedNormal: r.observedNormal,
    observedM: parseMList(r.observedM),
    notes: textOrNull(r.notes),
  }
}

export function toSessionInput(f: SessionForm, results: ResultForm[]): Omit<SessionInput, 'safetyNotesRead'> {
  const rep = orNull(f.repRateMhz)
  return {
    laserSetupId: f.laserSetupId ?? 0,
    performedAt: new Date(f.performedAt).toISOString(),
    wavelengthNm: Number(f.wavelengthNm),
    pulseDurationFs: orNull(f.pulseDurationFs),
    repRateHz: rep === null ? null : rep * 1e6,
    avgPowerMw: Number(f.avgPowerMw ?? 0),
    spotDiameterUm: orNull(f.spotDiameterUm),
    objectiveNa: orNull(f.objectiveNa),
    pump: f.pump,
    harmonicOrder: f.harmonicOrder,
    geometry: f.geometry,
    collection: f.collection,
    analyser: textOrNull(f.analyser),
    detector: textOrNull(f.detector),
    integrationS: orNull(f.integrationS),
    filters: textOrNull(f.filters),
    notes: textOrNull(f.notes),
    results: results.map(toResultInput),
  }
}

/** Server field paths → form field names (the form enters MHz where the API takes Hz). */
export const serverFieldName = (path: string) => (path === 'repRateHz' ? 'repRateMhz' : path)

/** What "Log a session" last filled in from a laser setup (so a value typed by hand is never replaced). */
export interface FilledFromSetup {
  pulseDurationFs: number | null
  repRateMhz: number | null
}

/**
 * Picking a laser setup fills the session's pulse duration and repetition rate from the setup's
 * register (both stay editable: the laser may have run differently that day). A field is filled
 * only while it is blank or still holds what the previous setup filled in; a value the person typed stays.
 * Returns what was filled, for the next change.
 */
export function fillFromSetup(
  form: SessionForm,
  setup: { pulseDurationFs: number | null; repRateHz: number | null },
  last: FilledFromSetup,
): FilledFromSetup {
  const untouched = (v: number | null | string, before: number | null) => v === null || v === '' || v === before
  const next: FilledFromSetup = {
    pulseDurationFs: setup.pulseDurationFs,
    repRateMhz: setup.repRateHz === null ? null : setup.repRateHz / 1e6,
  }
  const filled: FilledFromSetup = { ...last }
  if (untouched(form.pulseDurationFs, last.pulseDurationFs)) {
    form.pulseDurationFs = next.pulseDurationFs
    filled.pulseDurationFs = next.pulseDurationFs
  }
  if (untouched(form.repRateMhz, last.repRateMhz)) {
    form.repRateMhz = next.repRateMhz
    filled.repRateMhz = next.repRateMhz
  }
  return filled
}
