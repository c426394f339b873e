import { ENGINE_VERSION, type ChannelResponse, type PumpSpec } from '../../../shared/engine'
import { arraySymmetry, channelsForArray, type CrystalInputs, type SymmetryInputs } from '../inventory/array-channels'
import { eq, inArray } from 'drizzle-orm'
import { arrays, chips, materials, wafers } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { SessionResult } from '../../../shared/records'

/**
 * Predicted vs observed for measurement sessions. Frames: the engine's lab frame has x along the
 * wafer's primary flat (crystal.reference = wafer.flatDirection) and z along the cut normal, so the
 * structure and linear pump angles are given relative to the wafer flat.
 */

/** The array fields the structure symmetry depends on. */
export interface ArrayGeometry {
  shape: string
  shapeAzimuthDeg: number
  lattice: string
  azimuthDeg: number
  customRotationOrder: number | null
  customMirrors: number[] | null
}

/** Everything the prediction for one array needs (joined from arrays → chips → wafers → materials). */
export interface ArrayContext {
  id: number
  code: string
  geometry: ArrayGeometry
  chipRotationDeg: number
  pointGroup: string
  cutNormal: [number, number, number]
  flatDirection: [number, number, number]
}

function predictionInputs(a: ArrayContext) {
  return {
    ...a.geometry,
    chipRotationDeg: a.chipRotationDeg,
    pointGroup: a.pointGroup,
    cutNormal: a.cutNormal,
    flatDirection: a.flatDirection,
  }
}

/** Engine channels for this session's pump and harmonic order on one array (same path as the stored channels). */
export function predictForArray(a: ArrayContext, pump: PumpSpec, order: number): ChannelResponse {
  const x = predictionInputs(a)
  return channelsForArray(x, arraySymmetry(x), pump, order)
}

type Observed = Pick<SessionResult, 'observedNormal' | 'observedM'>

/** Is emission along the normal allowed (rule 6, and not cancelled by conflicting mirror parities)? */
const normalAllowed = (p: ChannelResponse) => p.normalEmission.allowed && !p.normalEmission.suppressedByParity

/** Plain-language differences between what was observed and what the engine predicts (empty: consistent). */
export function compareObserved(predicted: ChannelResponse, observed: Observed, pump: PumpSpec): string[] {
  const flags: string[] = []
  const seen = observed.observedNormal
  const emitted = seen === 'present' || seen === 'co' || seen === 'counter' || seen === 'linear'
  if (emitted && !normalAllowed(predicted)) {
    flags.push(
      'Emission along the normal observed where the engine forbids it for this pump and order: check tilt, substrate or surface contributions, or the pump polarisation.',
    )
  } else if (emitted && (seen === 'co' || seen === 'counter')) {
    const hand = predicted.normalEmission.handedness
    if (pump.type !== 'circular' || !hand) {
      flags.push(
        `Co-/counter-rotating emission was recorded, but the pump is ${pump.type}: handedness relative to the pump is defined only for a circular pump.`,
      )
    } else if (!hand.includes(seen === 'co' ? 'co-rotating' : 'counter-rotating')) {
      const allowed = hand.join(' and ')
      flags.push(
        `Handedness mismatch: ${seen === 'co' ? 'co' : 'counter'}-rotating emission observed along the normal, but only ${allowed} emission is allowed for this pump and order: check the analyser/quarter-wave plate orientation and the handedness convention.`,
      )
    }
  } else if (seen === 'none' && normalAllowed(predicted)) {
    flags.push(
      'Emission along the normal is allowed but was not seen: it may be weak; check alignment and the collection NA.',
    )
  }
  const unexpected = observed.observedM.filter((m) => !predicted.m.includes(m))
  if (unexpected.length) {
    flags.push(
      `Observed m = ${unexpected.join(', ')} ${unexpected.length > 1 ? 'are' : 'is'} not among the allowed m {${predicted.m.join(', ')}} for this pump and order: check the analysis, the pump polarisation or the array's symmetry.`,
    )
  }
  return flags
}

/**
 * Derived quantities (docs/physics.md §5): η = P_N / P_pump with average powers, and for SHG the
 * normalised P_2 / P_pump² in W⁻¹. Pump power is stored in mW; null when a power is missing or zero.
 */
export function deriveEfficiency(avgPowerMw: number | null | undefined, harmonicPowerW: number | null, order: number) {
  if (harmonicPowerW === null || avgPowerMw === null || avgPowerMw === undefined || avgPowerMw <= 0)
    return { efficiency: null, normalisedW: null }
  const pumpW = avgPowerMw / 1000
  return { efficiency: harmonicPowerW / pumpW, normalisedW: order === 2 ? harmonicPowerW / (pumpW * pumpW) : null }
}

/** Load the prediction inputs of several arrays in one query (arrays → chips → wafers → materials). */
/** Db or an open transaction (only `select` is used). */
export type Reader = Pick<Db, 'select'>

export async function loadArrayContexts(
  db: Reader,
  ids: number[],
): Promise<Map<number, ArrayContext & { retiredAt: Date | null }>> {
  if (!ids.length) return new Map()
  // Only the columns a prediction reads: the session pages and the export load thousands of these.
  const rows = await db
    .select({
      id: arrays.id,
      code: arrays.code,
      retiredAt: arrays.retiredAt,
      g: {
        shape: arrays.shape,
        shapeAzimuthDeg: arrays.shapeAzimuthDeg,
        lattice: arrays.lattice,
        azimuthDeg: arrays.azimuthDeg,
        customRotationOrder: arrays.customRotationOrder,
        customMirrors: arrays.customMirrors,
      },
      rotationDeg: chips.rotationDeg,
      cutNormal: wafers.cutNormal,
      flatDirection: wafers.flatDirection,
      pointGroup: materials.pointGroup,
    })
    .from(arrays)
    .innerJoin(chips, eq(chips.id, arrays.chipId))
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .where(inArray(arrays.id, ids))
  return new Map(
    rows.map((r) => [
      r.id,
      {
        id: r.id,
        code: r.code,
        retiredAt: r.retiredAt,
        chipRotationDeg: r.rotationDeg,
        pointGroup: r.pointGroup,
        cutNormal: r.cutNormal,
        flatDirection: r.flatDirection,
        geometry: r.g,
      },
    ]),
  )
}

type Prediction = { predicted: ChannelResponse } | { error: string }

function predictOrError(ctx: ArrayContext, pump: PumpSpec, order: number): Prediction {
  try {
    return { predicted: predictForArray(ctx, pump, order) }
  } catch (err) {
    return { error: (err as Error).message }
  }
}

function compareWith(
  p: Prediction,
  ctx: ArrayContext,
  observed: Observed,
  pump: PumpSpec,
): { predicted: ChannelResponse; flags: string[] } {
  let message: string
  if ('predicted' in p) {
    try {
      return { predicted: p.predicted, flags: compareObserved(p.predicted, observed, pump) }
    } catch (err) {
      message = (err as Error).message
    }
  } else message = p.error
  const predicted: ChannelResponse = {
    q: [],
    m: [],
    parity: [],
    normalEmission: { allowed: false, m: [] },
    multipoles: [],
    explain: [message],
    engineVersion: ENGINE_VERSION,
    qWeights: [],
  }
  return { predicted, flags: [`No prediction for ${ctx.code}: ${message}`] }
}

/** Prediction and flags for one observed result; an engine failure becomes a flag, never a 500 on a saved record. */
export function compareResult(
  ctx: ArrayContext,
  observed: Observed,
  pump: PumpSpec,
  order: number,
): { predicted: ChannelResponse; flags: string[] } {
  return compareWith(predictOrError(ctx, pump, order), ctx, observed, pump)
}

/**
 * Every input of predictForArray (the compile-time check below fails if one is added to array-channels and not listed
 * here).
 */
const PREDICTION_INPUTS = [
  'pointGroup',
  'cutNormal',
  'flatDirection',
  'chipRotationDeg',
  'shape',
  'shapeAzimuthDeg',
  'lattice',
  'azimuthDeg',
  'customRotationOrder',
  'customMirrors',
] as const
type Unlisted = Exclude<keyof (SymmetryInputs & CrystalInputs), (typeof PREDICTION_INPUTS)[number]>
const allInputsListed: [Unlisted] extends [never] ? true : Unlisted = true
void allInputsListed

/**
 * compareResult for a pass over many results (the inventory export): the engine's prediction is
 * remembered per (prediction inputs, pump, order) for the life of the returned function. A lab
 * measures a few designs on a few wafers, so thousands of results share a few hundred
 * predictions. Answers exactly as compareResult (predictions are pure; the shared `predicted`
 * objects must not be changed by the caller).
 */
export function rememberingCompare(): typeof compareResult {
  const memo = new Map<string, Prediction>()
  return (ctx, observed, pump, order) => {
    const x = predictionInputs(ctx)
    const key = JSON.stringify([PREDICTION_INPUTS.map((k) => x[k]), pump, order])
    let p = memo.get(key)
    if (!p) memo.set(key, (p = predictOrError(ctx, pump, order)))
    return compareWith(p, ctx, observed, pump)
  }
}
