import { createHash } from 'node:crypto'
import {
  computeChannels,
  deriveArraySymmetry,
  rotateStructure,
  structureGroupName,
  getPointGroup,
  EngineError,
  ENGINE_VERSION,
  type ChannelResponse,
  type PumpSpec,
  type ShapeKind,
  type LatticeKind,
  type StructureSymmetry,
} from '../../../shared/engine'
import type { StoredChannel } from '../../../shared/records'
import type { ArrayGeometry } from '../../../shared/array-sense'
import { BadRequestError } from '../../errors'
import { keyChannels } from './channel-sets'
import { BoundedCache } from '../../../shared/engine/bounded-cache'

/**
 * Derived data of an array: its structure symmetry and the harmonic channels for the standard pumps
 * at orders 2 and 3, plus the SHA-256 of every input they depend on (for the stale flag).
 *
 * FRAME: everything is computed in the wafer-flat frame. The crystal is given as
 * {pointGroup, normal: wafer.cutNormal, reference: wafer.flatDirection}, so lab x = the primary
 * flat; the structure's mirrors are rotated by chip.rotationDeg + array.azimuthDeg (the chip's
 * edge sits at chip.rotationDeg from the flat, the array at azimuthDeg from the chip edge). A pump
 * "linear along the flat" is therefore angle 0 and "across the flat" angle 90.
 */
/** An array's geometry (shape, lattice, custom symmetry) plus where it sits on its wafer. */
export interface ChannelInputs extends ArrayGeometry {
  pointGroup: string
  cutNormal: [number, number, number]
  flatDirection: [number, number, number]
  chipRotationDeg: number
  azimuthDeg: number
}

export const STANDARD_PUMPS: { key: string; pump: PumpSpec }[] = [
  { key: 'circular+1', pump: { type: 'circular', m: 1 } },
  { key: 'circular-1', pump: { type: 'circular', m: -1 } },
  { key: 'linear-along-flat', pump: { type: 'linear', angle: 0 } },
  { key: 'linear-across-flat', pump: { type: 'linear', angle: 90 } },
]
export const STORED_ORDERS = [2, 3]

/** A continuous (C∞v) mirror set sampled for the engine, which takes a finite list (every 45° holds both pump axes). */
const CONTINUOUS_MIRRORS = [0, 45, 90, 135]

/** SHA-256 over every input (keys in a fixed order) and the engine version. */
export function channelsInputHash(x: ChannelInputs): string {
  const dims = Object.fromEntries(Object.entries(x.dimensionsNm ?? {}).sort(([a], [b]) => a.localeCompare(b)))
  const parts = [
    x.pointGroup,
    x.cutNormal,
    x.flatDirection,
    x.chipRotationDeg,
    x.shape,
    dims,
    x.shapeAzimuthDeg,
    x.lattice,
    x.periodXNm,
    x.periodYNm,
    x.azimuthDeg,
    x.customRotationOrder,
    x.customMirrors,
    ENGINE_VERSION,
  ]
  return createHash('sha256').update(JSON.stringify(parts)).digest('hex')
}

function wrapEngine<T>(fn: () => T): T {
  try {
    return fn()
  } catch (err) {
    if (!(err instanceof EngineError)) throw err
    const f = err.field ?? ''
    const field = /rotationOrder/.test(f)
      ? 'customRotationOrder'
      : /mirrors/.test(f)
        ? 'customMirrors'
        : /shape/.test(f)
          ? 'shape'
          : /lattice/.test(f)
            ? 'lattice'
            : '_'
    throw new BadRequestError(err.message, { [field]: [err.message] })
  }
}

/** The inputs of the structure symmetry: the array's geometry and the chip's rotation on the wafer. */
export type SymmetryInputs = Pick<
  ChannelInputs,
  'shape' | 'shapeAzimuthDeg' | 'lattice' | 'azimuthDeg' | 'customRotationOrder' | 'customMirrors' | 'chipRotationDeg'
>
/** The inputs of the crystal side: material point group and the wafer's cut and flat. */
export type CrystalInputs = Pick<
  ChannelInputs,
  'pointGroup' | 'cutNormal' | 'flatDirection' | 'chipRotationDeg' | 'azimuthDeg'
>

/** Structure symmetry of the array in the wafer-flat frame (meta-atom at shapeAzimuthDeg in the lattice). */
export function arraySymmetry(x: SymmetryInputs): StructureSymmetry {
  return wrapEngine(() => {
    const custom = { rotationOrder: x.customRotationOrder ?? undefined, mirrors: x.customMirrors ?? undefined }
    const own = deriveArraySymmetry(
      { kind: x.shape as ShapeKind, azimuthDeg: x.shapeAzimuthDeg, ...(x.shape === 'custom' ? custom : {}) },
      { kind: x.lattice as LatticeKind, ...(x.lattice === 'custom' ? custom : {}) },
    )
    return rotateStructure(own, x.chipRotationDeg + x.azimuthDeg)
  })
}

/**
 * The engine's channels for one pump and order on an array, in the wafer-flat frame, with the frame
 * notes first. The one place both the stored channels (standard pumps) and the session predictions
 * (the session's own pump) ask the engine, so the two can never disagree. Centrosymmetric crystals
 * use the surface χ(2) for even orders.
 */
export function channelsForArray(
  x: CrystalInputs,
  symmetry: StructureSymmetry,
  pump: PumpSpec,
  order: number,
): ChannelResponse {
  const group = wrapEngine(() => getPointGroup(x.pointGroup))
  const mirrors = symmetry.mirrors === 'all' ? CONTINUOUS_MIRRORS : symmetry.mirrors
  const surface = order % 2 === 0 && group.isCentrosymmetric
  const result = wrapEngine(() =>
    computeChannels({
      crystal: { pointGroup: group.symbol, normal: x.cutNormal, reference: x.flatDirection },
      surface,
      structure: { rotationOrder: symmetry.rotationOrder, mirrors },
      pump,
      order,
    }),
  )
  const turn = x.chipRotationDeg + x.azimuthDeg
  const notes = [
    `lab x = primary flat of the wafer; the array is rotated by ${turn}° (chip ${x.chipRotationDeg}° from the flat + array ${x.azimuthDeg}° on the chip), so its mirrors are given from the flat; "linear along the flat" is 0°`,
  ]
  if (symmetry.mirrors === 'all')
    notes.push('the structure has every vertical mirror (C∞v); the mirrors at 0°, 45°, 90° and 135° stand for them')
  if (surface)
    notes.push(
      `${group.symbol} is centrosymmetric: bulk χ(2) vanishes, so only the surface χ(2) of the interface is used`,
    )
  return { ...result, explain: [...notes, ...result.explain] }
}

/**
 * Derive symmetry and channels for one array. Pure; throws a field-level 400 on bad custom input.
 * `channelSetKey` is the content key under which the channels are stored (see channel-sets.ts).
 */
export type DerivedChannels = {
  symmetry: StructureSymmetry
  symmetryName: string
  channels: StoredChannel[]
  channelSetKey: string
  hash: string
}
export function deriveChannels(x: ChannelInputs): DerivedChannels {
  // An import or a recompute derives the same design on the same wafer many times: remember the
  // last results by input hash (the hash covers every input and the engine version).
  const hash = channelsInputHash(x)
  return derivedCache.get(hash) ?? derivedCache.set(hash, deriveUncached(x, hash))
}
const derivedCache = new BoundedCache<string, DerivedChannels>(2000)

function deriveUncached(x: ChannelInputs, hash: string): DerivedChannels {
  const symmetry = arraySymmetry(x)
  const channels: StoredChannel[] = []
  for (const order of STORED_ORDERS) {
    for (const { key, pump } of STANDARD_PUMPS)
      channels.push({ order, pumpKey: key, pump, result: channelsForArray(x, symmetry, pump, order) })
  }
  return {
    symmetry,
    symmetryName: structureGroupName(symmetry),
    channels,
    channelSetKey: keyChannels(channels).key,
    hash,
  }
}
