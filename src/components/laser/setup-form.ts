import type { EyewearEntry, LaserSetup } from '../../../shared/records'
import type { LaserSetupInput } from '../../../shared/schemas/records'
import type { HazardInput } from '../../../shared/laser-figures'

/** Form state of the setup dialog: numbers as typed (rate in MHz), wavelengths as a list of chips. */
export interface SetupForm {
  name: string
  room: string
  sourceType: LaserSetupInput['sourceType']
  wavelengths: number[]
  notes: string
  pulseDurationFs: number | null
  repRateMhz: number | null
  maxAvgPowerMw: number | null
  pulseEnergyUj: number | null
  beamDiameterMm: number | null
  divergenceMrad: number | null
  harmonicOrders: number[]
  laserClass: LaserSetup['laserClass']
  eyewear: EyewearEntry[]
  interlocks: string
  controlledAreaNotes: string
  reason: string
}

const num = (v: unknown) =>
  v === null || v === undefined || v === '' || !Number.isFinite(Number(v)) ? null : Number(v)

export function toForm(x: LaserSetup | null): SetupForm {
  return {
    name: x?.name ?? '',
    room: x?.room ?? '',
    sourceType: x?.sourceType ?? 'mode_locked',
    wavelengths: [...(x?.wavelengthsNm ?? [])],
    notes: x?.notes ?? '',
    pulseDurationFs: x?.pulseDurationFs ?? null,
    repRateMhz: x?.repRateHz ? x.repRateHz / 1e6 : null,
    maxAvgPowerMw: x?.maxAvgPowerMw ?? null,
    pulseEnergyUj: x?.pulseEnergyUj ?? null,
    beamDiameterMm: x?.beamDiameterMm ?? null,
    divergenceMrad: x?.divergenceMrad ?? null,
    harmonicOrders: [...(x?.harmonicOrders ?? [])],
    laserClass: x?.laserClass ?? null,
    eyewear: (x?.eyewear ?? []).map((e) => ({ ...e })),
    interlocks: x?.interlocks ?? '',
    controlledAreaNotes: x?.controlledAreaNotes ?? '',
    reason: '',
  }
}

export const wavelengthList = (f: SetupForm) => [...f.wavelengths]

/**
 * Wavelengths typed into the chips field ("800", or "1550, 775" pasted at once): the numbers, or null if one is not a
 * number.
 */
export function parseWavelengths(text: string): number[] | null {
  const parts = text.split(/[,;\s]+/).filter(Boolean)
  const nums = parts.map(Number)
  return parts.length && nums.every((n) => Number.isFinite(n) && n > 0) ? nums : null
}

export function toInput(f: SetupForm): LaserSetupInput {
  return {
    name: f.name.trim(),
    room: f.room.trim(),
    sourceType: f.sourceType,
    wavelengthsNm: wavelengthList(f),
    notes: f.notes.trim() || null,
    pulseDurationFs: num(f.pulseDurationFs),
    repRateHz: num(f.repRateMhz) === null ? null : Number(f.repRateMhz) * 1e6,
    maxAvgPowerMw: num(f.maxAvgPowerMw),
    pulseEnergyUj: num(f.pulseEnergyUj),
    beamDiameterMm: num(f.beamDiameterMm),
    divergenceMrad: num(f.divergenceMrad),
    harmonicOrders: f.harmonicOrders,
    laserClass: f.laserClass,
    eyewear: f.eyewear.map((e) => ({
      ...e,
      bandsNm: e.bandsNm.trim().replace(/[,;]\s*$/, ''),
      od: num(e.od),
      en207: e.en207?.trim() || null,
    })),
    interlocks: f.interlocks.trim() || null,
    controlledAreaNotes: f.controlledAreaNotes.trim() || null,
  }
}

/** The form as figures input for the live preview (null when the basics are missing). */
export function toHazardInput(f: SetupForm): HazardInput | null {
  const i = toInput(f)
  if (!i.wavelengthsNm.length || i.wavelengthsNm.some((w) => !(w > 0))) return null
  return {
    ...i,
    harmonicOrders: i.harmonicOrders ?? [],
    eyewear: (i.eyewear ?? []).filter((e) => e.bandsNm.trim()),
  } as HazardInput
}
