import { eq } from 'drizzle-orm'
import { arrays, chips, materials, wafers } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { Coefficient } from '../../../shared/records'
import {
  AnalysisError,
  PATTERN_ASSUMPTIONS,
  describePatternBasis,
  predictPattern,
  type PatternModel,
} from '../../../shared/analysis'
import { EngineError, getPointGroup } from '../../../shared/engine'
import { BadRequestError, NotFoundError, fieldError } from '../../errors'

/**
 * The bulk-tensor model of a chip's crystal for the analysis routes, and the frame they use.
 *
 * FRAME (the same as array-channels.ts and session-compare.ts): the engine's crystal is
 * {pointGroup, normal: wafer.cutNormal, reference: wafer.flatDirection}, so at azimuth 0 the wafer
 * flat lies along lab x. The chip's reference edge sits at chip.rotationDeg counter-clockwise from
 * the flat, and every pump angle θ of this module is measured from the CHIP's reference edge. A pump
 * at θ from the edge is at θ + rotation from the flat, so I_chip(θ) = I_flat(θ + rotation) — in the
 * library's terms (I(θ; φ) = I(θ − φ; 0)) the crystal's flat direction sits at azimuth
 * φ = −chip.rotationDeg from the chip edge. A fit measures that azimuth directly.
 */
export interface CrystalModel {
  model: PatternModel
  chip: { id: number; code: string; rotationDeg: number }
  wafer: { id: number; code: string; cutNormal: [number, number, number]; flatDirection: [number, number, number] }
  material: { id: number; name: string; pointGroup: string; coefficients: Coefficient[] }
}

/** Load the crystal of an array (through its chip). 404 when the array does not exist. */
export async function loadArrayCrystal(
  db: Db,
  arrayId: number,
  order: number,
): Promise<CrystalModel & { array: { id: number; code: string; chipId: number } }> {
  const [r] = await db
    .select({ a: { id: arrays.id, code: arrays.code, chipId: arrays.chipId } })
    .from(arrays)
    .where(eq(arrays.id, arrayId))
  if (!r) throw new NotFoundError('No such array')
  return { ...(await loadChipCrystal(db, r.a.chipId, order)), array: r.a }
}

/** Load the crystal of a chip: its wafer's cut and flat and the material's point group. */
export async function loadChipCrystal(db: Db, chipId: number, order: number): Promise<CrystalModel> {
  const [r] = await db
    .select({ c: chips, w: wafers, m: materials })
    .from(chips)
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .where(eq(chips.id, chipId))
  if (!r) throw new NotFoundError('No such chip')
  return {
    model: { pointGroup: r.m.pointGroup, normal: r.w.cutNormal, reference: r.w.flatDirection, order },
    chip: { id: r.c.id, code: r.c.code, rotationDeg: r.c.rotationDeg },
    wafer: { id: r.w.id, code: r.w.code, cutNormal: r.w.cutNormal, flatDirection: r.w.flatDirection },
    material: { id: r.m.id, name: r.m.name, pointGroup: r.m.pointGroup, coefficients: r.m.coefficients ?? [] },
  }
}

/** "[1 −1 0]" for a crystal direction. */
export const formatDirection = (v: readonly number[]) => `[${v.map((c) => (c < 0 ? `−${-c}` : `${c}`)).join(' ')}]`

/**
 * Tensor ratios from the material's stored d-components (χ(2) only): one per basis element,
 * normalised by the first. Only when every basis element has a stored value at one wavelength;
 * otherwise undefined (unit ratios), with the reason in `note`.
 */
export function storedRatios(
  model: PatternModel,
  labels: string[],
  coefficients: readonly Coefficient[],
): { ratios?: number[]; note: string } {
  const unit = `unit ratios: ${labels[0]} = 1 and ${labels.slice(1).join(', ') || 'no other component'} = 0 (illustrative shape, not the material's measured coefficients)`
  if (model.order !== 2) return { note: `${unit}; χ(3) components are not mapped from the stored coefficients` }
  const byWl = new Map<number, Map<string, number>>()
  for (const c of coefficients.filter((c) => c.order === 2))
    (byWl.get(c.wavelengthNm) ?? byWl.set(c.wavelengthNm, new Map()).get(c.wavelengthNm)!).set(c.component, c.valuePmV)
  for (const [wl, comps] of byWl) {
    const values = labels.map((l) => comps.get(l))
    if (values.every((v) => v !== undefined) && values[0] !== 0) {
      const ratios = values.map((v) => v! / values[0]!)
      return {
        ratios,
        note: `ratios from the material's stored coefficients at ${wl} nm (${labels.map((l, k) => `${l} = ${values[k]} pm/V`).join(', ')}), normalised to ${labels[0]}; tabulated magnitudes carry no sign, so relative signs may be wrong`,
      }
    }
  }
  return {
    note: `${unit}; the material has no stored value for every independent component (${labels.join(', ')}) at one wavelength`,
  }
}

export interface PatternAnswer {
  order: number
  model: PatternModel
  /**
   * Crystal azimuth used: angle of the model's reference direction from the pump's zero, degrees, counter-clockwise.
   */
  azimuthDeg: number
  basis: string[]
  ratios: number[]
  points: { angleDeg: number; parallel: number; perpendicular: number; none: number }[]
  assumptions: string[]
  frame: string
}

/** Map library errors to field-level 400s (engine errors are mapped by the error middleware). */
export function asFieldError(err: unknown, fieldOf: (f: string) => string = (f) => f): never {
  if (err instanceof AnalysisError) {
    const field = fieldOf(err.field)
    throw new BadRequestError(err.message, { [field]: [err.message] })
  }
  if (err instanceof EngineError) throw fieldError(fieldOf(err.field || '_'), err.message)
  throw err
}

/** Predicted pattern of a model at the given azimuth, every `step` degrees over 0–360. */
export function computePattern(
  model: PatternModel,
  azimuthDeg: number,
  step: number,
  ratiosIn: number[] | undefined,
  frame: string,
  extra: string[] = [],
): PatternAnswer {
  try {
    getPointGroup(model.pointGroup)
    const basis = describePatternBasis(model).labels
    const ratios = ratiosIn ?? basis.map((_, k) => (k === 0 ? 1 : 0))
    const angles = Array.from({ length: Math.floor(360 / step) + 1 }, (_, i) => Math.min(360, i * step))
    const points = predictPattern(model, ratios, azimuthDeg, angles).map(
      ({ angleDeg, parallel, perpendicular, none }) => ({ angleDeg, parallel, perpendicular, none }),
    )
    return {
      order: model.order,
      model,
      azimuthDeg,
      basis,
      ratios,
      points,
      assumptions: [...PATTERN_ASSUMPTIONS, ...extra],
      frame,
    }
  } catch (err) {
    return asFieldError(err)
  }
}

/** The pattern of a chip's crystal, pump angle from the chip's reference edge. */
export function crystalPattern(c: CrystalModel, step: number): PatternAnswer {
  const basis = (() => {
    try {
      return describePatternBasis(c.model).labels
    } catch (err) {
      return asFieldError(err, () => 'order')
    }
  })()
  const { ratios, note } = storedRatios(c.model, basis, c.material.coefficients)
  const frame = `pump angle θ from the chip's reference edge (counter-clockwise seen from above); crystal: ${c.material.name} (${c.model.pointGroup}), cut normal ${formatDirection(c.model.normal)}, wafer flat ${formatDirection(c.model.reference)}; the chip is turned ${c.chip.rotationDeg}° from the flat, so the flat direction sits at ${-c.chip.rotationDeg}° from the chip edge`
  return computePattern(c.model, -c.chip.rotationDeg, step, ratios, frame, [note])
}
