/**
 * The channel request (the CLI's and `POST /api/channels`' input) and its validation.
 *
 * Defaults: `surface` false, `kleinman` false (intrinsic permutation symmetry only),
 * `crystal.azimuth` 0°, `structure.mirrors` [], `lmax` 4, `window` 8. Required: crystal
 * (pointGroup, normal, reference), structure.rotationOrder, pump, order. `surface: true` replaces
 * the bulk tensor by the isotropic-interface χ(N) (class ∞m, Q = {0}); the point group is still validated.
 * Structure mirrors are used as given (not closed under the rotation order), but mirrors that
 * imply a higher rotation order than `structure.rotationOrder` are refused (INCONSISTENT_SYMMETRY).
 */
import type { Vec3 } from './linalg'
import type { PumpSpec } from './pump'
import { getPointGroup } from './point-groups'
import { parseDirection } from './directions'
import { checkCut } from './cut-rotation'
import { parsePump } from './pump-request'
import { assertOrder } from './tensor-forms'
import { checkStructureSymmetry } from './structure'
import { readArray, readBoolean, readInteger, readNumber, readObject, readString } from './validate'

/** A validated channel request with defaults applied. Vectors: crystal Cartesian frame. */
export interface ChannelRequest {
  crystal: { pointGroup: string; normal: Vec3; reference: Vec3; azimuthDeg: number }
  surface: boolean
  kleinman: boolean
  /** rotationOrder 0 = ∞; mirrors: lab-frame azimuths in degrees, as given. */
  structure: { rotationOrder: number; mirrors: number[] }
  pump: PumpSpec
  order: number
  lmax: number
  window: number
}

/** Default values of the optional request fields. */
export const CHANNEL_DEFAULTS = {
  surface: false,
  kleinman: false,
  azimuthDeg: 0,
  mirrors: [] as number[],
  lmax: 4,
  window: 8,
} as const

/** Validate an untrusted request; throws EngineError whose `field` is the dot path of the bad input. */
export function parseChannelRequest(input: unknown): ChannelRequest {
  const r = readObject(input, '')
  const c = readObject(r.crystal, 'crystal')
  const group = getPointGroup(readString(c.pointGroup, 'crystal.pointGroup'), 'crystal.pointGroup')
  const normal = parseDirection(c.normal, 'crystal.normal', group.isCubic)
  const reference = parseDirection(c.reference, 'crystal.reference', group.isCubic)
  const azimuthDeg = readNumber(c.azimuth, 'crystal.azimuth', CHANNEL_DEFAULTS.azimuthDeg)
  checkCut({ normal, reference, azimuthDeg })
  const s = readObject(r.structure, 'structure')
  const structure = {
    rotationOrder: readInteger(s.rotationOrder, 'structure.rotationOrder', 0, 360),
    mirrors: readArray(s.mirrors, 'structure.mirrors', (v, f) => readNumber(v, f), [...CHANNEL_DEFAULTS.mirrors]),
  }
  checkStructureSymmetry(structure.rotationOrder, structure.mirrors)
  const pump = parsePump(r.pump)
  readNumber(r.order, 'order')
  assertOrder(r.order, 'order')
  return {
    crystal: { pointGroup: group.symbol, normal, reference, azimuthDeg },
    surface: readBoolean(r.surface, 'surface', CHANNEL_DEFAULTS.surface),
    kleinman: readBoolean(r.kleinman, 'kleinman', CHANNEL_DEFAULTS.kleinman),
    structure,
    pump,
    order: r.order,
    lmax: readInteger(r.lmax, 'lmax', 1, 8, CHANNEL_DEFAULTS.lmax),
    window: readInteger(r.window, 'window', 1, 64, CHANNEL_DEFAULTS.window),
  }
}
