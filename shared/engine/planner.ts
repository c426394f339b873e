/**
 * Fabrication planner: for one material, the cuts, meta-atom shapes and lattices a fab can make,
 * a pump and an order, list the combinations that emit the N-th harmonic along the normal with
 * the wanted circular handedness, ranked.
 *
 * Ranking (documented contract): (1) larger contributing weight first — the summed weight of the
 * q ∈ Q that produce a wanted m (see `cylindrical-content.ts`); (2) simpler structure first —
 * shape complexity + lattice complexity from the tables below; (3) input order.
 * Frames: cut vectors in the crystal Cartesian frame; lattice vector a along the cut reference.
 */
import type { PumpSpec } from './pump'
import type { ShapeSpec, LatticeSpec } from './structure'
import { deriveArraySymmetry, structureGroupName, SHAPE_KINDS, LATTICE_KINDS } from './structure'
import { parsePump } from './pump-request'
import { pumpProjections, signed } from './pump'
import { sampleEntry } from './sample-tensor'
import { getPointGroup } from './point-groups'
import { parseDirection } from './directions'
import { assertOrder } from './tensor-forms'
import { findAllowedHarmonics, sumProjections } from './selection-rules'
import { describeCut } from './explain'
import { EngineError } from './errors'
import { readArray, readBoolean, readNumber, readObject, readString } from './validate'

/** Wanted handedness of the normal emission relative to a circular pump, or any. */
export type WantedEmission = 'co' | 'counter' | 'any'

/** One ranked combination. */
export interface PlanOption {
  cutIndex: number
  cut: string
  shape: ShapeSpec
  lattice: LatticeSpec
  structureGroup: string
  rotationOrder: number
  allowedM: number[]
  /** The wanted projections among ±1 that are allowed. */
  normalM: number[]
  weight: number
  complexity: number
  reason: string
}

const SHAPE_COMPLEXITY: Record<string, number> = {
  disk: 0,
  square: 1,
  rectangle: 1,
  ellipse: 1,
  ring: 2,
  triangle: 2,
  hexagon: 2,
  cross: 2,
  dimer: 3,
  'l-shape': 3,
  'split-ring': 3,
  gammadion: 4,
  custom: 5,
}
const LATTICE_COMPLEXITY: Record<string, number> = {
  single: 0,
  square: 1,
  hexagonal: 1,
  rectangular: 2,
  oblique: 3,
  custom: 4,
}

function readShape(v: unknown, f: string): ShapeSpec {
  const o = readObject(v, f)
  const kind = readString(o.kind, `${f}.kind`) as ShapeSpec['kind']
  if (!SHAPE_KINDS.includes(kind))
    throw new EngineError({
      code: 'UNKNOWN_SHAPE',
      field: `${f}.kind`,
      value: kind,
      allowed: SHAPE_KINDS,
      message: `unknown shape ${JSON.stringify(kind)}`,
    })
  const rotationOrder = o.rotationOrder === undefined ? undefined : readNumber(o.rotationOrder, `${f}.rotationOrder`)
  const mirrors = readArray(o.mirrors, `${f}.mirrors`, (x, g) => readNumber(x, g), [])
  return { kind, azimuthDeg: readNumber(o.azimuthDeg, `${f}.azimuthDeg`, 0), rotationOrder, mirrors }
}

function readLattice(v: unknown, f: string): LatticeSpec {
  const o = readObject(v, f)
  const kind = readString(o.kind, `${f}.kind`) as LatticeSpec['kind']
  if (!LATTICE_KINDS.includes(kind))
    throw new EngineError({
      code: 'UNKNOWN_LATTICE',
      field: `${f}.kind`,
      value: kind,
      allowed: LATTICE_KINDS,
      message: `unknown lattice ${JSON.stringify(kind)}`,
    })
  const rotationOrder = o.rotationOrder === undefined ? undefined : readNumber(o.rotationOrder, `${f}.rotationOrder`)
  return { kind, rotationOrder, mirrors: readArray(o.mirrors, `${f}.mirrors`, (x, g) => readNumber(x, g), []) }
}

function wantedM(want: WantedEmission, pump: PumpSpec): number[] {
  if (want === 'any') return [-1, 1]
  if (pump.type !== 'circular')
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'want',
      value: want,
      allowed: ['any'],
      message: `"${want}" is defined only for a circular pump, got a ${pump.type} pump`,
      hint: 'use want: "any"',
    })
  return [want === 'co' ? pump.m : -pump.m]
}

/**
 * Rank the fab's combinations (validates `request`; throws EngineError with field paths).
 * Request: { pointGroup, cuts: [{normal, reference}], shapes: [{kind, azimuthDeg?, …}],
 * lattices: [{kind, …}], pump, order, want: 'co' | 'counter' | 'any', surface? }.
 */
export function planFabrication(request: unknown): PlanOption[] {
  const r = readObject(request, '')
  const group = getPointGroup(readString(r.pointGroup, 'pointGroup'), 'pointGroup')
  const cuts = readArray(
    r.cuts,
    'cuts',
    (v, f) => {
      const c = readObject(v, f)
      return {
        normal: parseDirection(c.normal, `${f}.normal`, group.isCubic),
        reference: parseDirection(c.reference, `${f}.reference`, group.isCubic),
      }
    },
    undefined,
    true,
  )
  const shapes = readArray(r.shapes, 'shapes', readShape, undefined, true)
  const lattices = readArray(r.lattices, 'lattices', readLattice, [{ kind: 'single' }])
  const pump = parsePump(r.pump)
  readNumber(r.order, 'order')
  assertOrder(r.order, 'order')
  const order = r.order
  const want = readString(r.want ?? 'any', 'want') as WantedEmission
  if (!['co', 'counter', 'any'].includes(want))
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'want',
      value: want,
      allowed: ['co', 'counter', 'any'],
      message: `must be co, counter or any, got ${JSON.stringify(want)}`,
    })
  const surface = readBoolean(r.surface, 'surface', false)
  const targets = wantedM(want, pump)
  const sums = sumProjections(pumpProjections(pump), order)
  const options: PlanOption[] = []
  cuts.forEach((cut, cutIndex) => {
    const { sample } = sampleEntry({
      pointGroup: group.symbol,
      normal: cut.normal,
      reference: cut.reference,
      order,
      surface,
    })
    shapes.forEach((shape, si) =>
      lattices.forEach((lattice, li) => {
        const sym = deriveArraySymmetry(shape, lattice)
        const n = sym.rotationOrder
        const allowedM = findAllowedHarmonics({
          pumpProjections: pumpProjections(pump),
          order,
          q: sample.content.q,
          rotationOrder: n,
          window: order + 6,
        })
        const normalM = targets.filter((t) => allowedM.includes(t))
        if (normalM.length === 0) return
        const reaches = (q: number) =>
          normalM.some((t) => sums.some((s) => (n === 0 ? t - s - q === 0 : (((t - s - q) % n) + n) % n === 0)))
        const used = sample.content.weights.filter((w) => reaches(w.q))
        const weight = Math.round(used.reduce((a, w) => a + w.weight, 0) * 1e9) / 1e9
        const name = structureGroupName(sym)
        const cutName = describeCut(cut.normal, group.isCubic)
        const hand =
          pump.type === 'circular'
            ? normalM.map((x) => (x === pump.m ? 'co-rotating' : 'counter-rotating')).join(' and ')
            : `m = ${normalM.map(signed).join(', ')}`
        options.push({
          cutIndex,
          cut: cutName,
          shape: shapes[si],
          lattice: lattices[li],
          structureGroup: name,
          rotationOrder: n,
          allowedM,
          normalM,
          weight,
          complexity: (SHAPE_COMPLEXITY[shape.kind] ?? 5) + (LATTICE_COMPLEXITY[lattice.kind] ?? 4),
          reason: `${cutName} of ${group.symbol}, ${shape.kind} on a ${lattice.kind} lattice (${name}): ${hand} emission along the normal through q ∈ {${used.map((w) => signed(w.q)).join(', ')}}${n === 0 ? '' : ` + k·${n}`} (weight ${(100 * weight).toFixed(0)}%)`,
        })
      }),
    )
  })
  return options
    .map((o, i) => ({ o, i }))
    .sort((a, b) => b.o.weight - a.o.weight || a.o.complexity - b.o.complexity || a.i - b.i)
    .map((x) => x.o)
}
