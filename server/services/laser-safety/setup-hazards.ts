import { createHash } from 'node:crypto'
import type { laserSetups } from '../../db/schema/index'
import { HAZARD_FIELDS, type HazardField } from '../../../shared/schemas/records'
import { setupFigures, type FigureOptions, type HazardInput, type SetupFigures } from '../../../shared/laser-figures'

/**
 * The hazard side of a laser setup: which fields change the hazard, a SHA-256 of their values
 * (an approval binds to it; any change voids the approval) and the computed figures.
 */
type Row = typeof laserSetups.$inferSelect

/** The hazard fields of a row, normalised (nulls for empty lists, fixed key order). */
export function hazardFields(r: Row): Record<HazardField, unknown> {
  const norm: Record<string, unknown> = { ...r, harmonicOrders: r.harmonicOrders ?? [], eyewear: r.eyewear ?? [] }
  return Object.fromEntries(HAZARD_FIELDS.map((k) => [k, norm[k] ?? null])) as Record<HazardField, unknown>
}

/** SHA-256 (hex) of the hazard fields in a canonical JSON form. */
export function hazardHash(r: Row): string {
  return createHash('sha256')
    .update(JSON.stringify(hazardFields(r)))
    .digest('hex')
}

/** Names of the hazard fields that differ between a row and a change set. */
export function changedHazardFields(before: Row, next: Record<string, unknown>): HazardField[] {
  const prev = hazardFields(before)
  return HAZARD_FIELDS.filter((k) => next[k] !== undefined && JSON.stringify(prev[k]) !== JSON.stringify(next[k]))
}

export function hazardInput(r: Row): HazardInput {
  return {
    sourceType: r.sourceType,
    wavelengthsNm: r.wavelengthsNm,
    pulseDurationFs: r.pulseDurationFs,
    repRateHz: r.repRateHz,
    maxAvgPowerMw: r.maxAvgPowerMw,
    pulseEnergyUj: r.pulseEnergyUj,
    beamDiameterMm: r.beamDiameterMm,
    divergenceMrad: r.divergenceMrad,
    harmonicOrders: r.harmonicOrders ?? [],
    laserClass: r.laserClass ?? null,
    eyewear: r.eyewear ?? [],
  }
}

/**
 * Computed figures (pulse energy, peak power, intensity, fluence, MPE, OD, EN 207/208, class hint, eyewear cover) for
 * an evaluation time.
 */
export function figuresFor(r: Row, opts: FigureOptions = {}): SetupFigures {
  return setupFigures(hazardInput(r), opts)
}
