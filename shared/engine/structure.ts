/**
 * Symmetry of a nanostructure at normal incidence: rotation order n about the normal (0 = ∞,
 * a body of revolution) and its vertical mirrors (azimuths ψ in degrees, lab frame, in [0, 180),
 * or `'all'`). Meta-atom shapes and lattices map to such groups; an array has the common subgroup
 * of its meta-atom's and its lattice's groups: n = gcd (∞ acts as identity), mirrors = intersection.
 */
import { EngineError } from './errors'

/** Rotation order (0 = continuous) and vertical mirrors of a structure. */
export interface StructureSymmetry {
  /** n of the n-fold axis along the normal; 0 means ∞ (every rotation). */
  rotationOrder: number
  /** Mirror azimuths in degrees in [0, 180), ascending, or 'all' for every vertical mirror. */
  mirrors: number[] | 'all'
}

/** Meta-atom shapes. Orientations in the meta-atom frame are given beside each. */
export type ShapeKind =
  | 'disk'
  | 'ring' // C∞v
  | 'ellipse'
  | 'rectangle'
  | 'dimer' // C2v, long axis (dimer axis) along x
  | 'square'
  | 'cross' // C4v, sides / equal arms along x and y
  | 'triangle' // C3v, equilateral, one vertex along +y
  | 'hexagon' // C6v, one vertex along +x
  | 'l-shape' // C1 + the mirror at 45° (equal arms along +x and +y)
  | 'split-ring' // C1 + the mirror at 90° (gap on the +y side)
  | 'gammadion' // C4, chiral pinwheel, no mirrors
  | 'custom'

/** A meta-atom: its shape, optional azimuth (degrees, relative to the lattice), custom symmetry. */
export interface ShapeSpec {
  kind: ShapeKind
  azimuthDeg?: number
  rotationOrder?: number
  mirrors?: number[]
}

/** Lattice kinds: lattice vector a along x. */
export type LatticeKind = 'single' | 'square' | 'hexagonal' | 'rectangular' | 'oblique' | 'custom'

/** A lattice; `custom` takes its own rotation order and mirrors. */
export interface LatticeSpec {
  kind: LatticeKind
  rotationOrder?: number
  mirrors?: number[]
}

const SHAPES: Record<Exclude<ShapeKind, 'custom'>, StructureSymmetry> = {
  disk: { rotationOrder: 0, mirrors: 'all' },
  ring: { rotationOrder: 0, mirrors: 'all' },
  ellipse: { rotationOrder: 2, mirrors: [0, 90] },
  rectangle: { rotationOrder: 2, mirrors: [0, 90] },
  dimer: { rotationOrder: 2, mirrors: [0, 90] },
  square: { rotationOrder: 4, mirrors: [0, 45, 90, 135] },
  cross: { rotationOrder: 4, mirrors: [0, 45, 90, 135] },
  triangle: { rotationOrder: 3, mirrors: [30, 90, 150] },
  hexagon: { rotationOrder: 6, mirrors: [0, 30, 60, 90, 120, 150] },
  'l-shape': { rotationOrder: 1, mirrors: [45] },
  'split-ring': { rotationOrder: 1, mirrors: [90] },
  gammadion: { rotationOrder: 4, mirrors: [] },
}

const LATTICES: Record<Exclude<LatticeKind, 'custom'>, StructureSymmetry> = {
  single: { rotationOrder: 0, mirrors: 'all' },
  square: { rotationOrder: 4, mirrors: [0, 45, 90, 135] },
  hexagonal: { rotationOrder: 6, mirrors: [0, 30, 60, 90, 120, 150] },
  rectangular: { rotationOrder: 2, mirrors: [0, 90] },
  oblique: { rotationOrder: 2, mirrors: [] },
}

/** Shape names accepted by {@link shapeSymmetry}. */
export const SHAPE_KINDS = [...Object.keys(SHAPES), 'custom'] as ShapeKind[]
/** Lattice names accepted by {@link latticeSymmetry}. */
export const LATTICE_KINDS = [...Object.keys(LATTICES), 'custom'] as LatticeKind[]

/** Azimuth reduced to [0, 180) with round-off cleaned (mirror lines are defined modulo 180°). */
export function normalizeMirror(psiDeg: number): number {
  const r = Math.round((((psiDeg % 180) + 180) % 180) * 1e9) / 1e9
  return r >= 180 ? 0 : r
}

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b)
}

/**
 * Close a (rotationOrder, mirrors) description into a group: with an n-fold axis, one mirror ψ
 * implies mirrors ψ + k·180/n; with n = ∞ any mirror implies all of them.
 */
export function closeStructure(
  rotationOrder: number,
  mirrors: readonly number[] | 'all',
  field = 'structure',
): StructureSymmetry {
  if (!Number.isInteger(rotationOrder) || rotationOrder < 0)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: `${field}.rotationOrder`,
      value: rotationOrder,
      message: `rotationOrder must be a non-negative integer (0 = ∞), got ${JSON.stringify(rotationOrder)}`,
    })
  if (mirrors === 'all') return { rotationOrder, mirrors: 'all' }
  if (rotationOrder === 0) return { rotationOrder, mirrors: mirrors.length > 0 ? 'all' : [] }
  const set = new Set<number>()
  for (const psi of mirrors)
    for (let k = 0; k < rotationOrder; k++) set.add(normalizeMirror(psi + (k * 180) / rotationOrder))
  return { rotationOrder, mirrors: [...set].sort((a, b) => a - b) }
}

/** Symmetry of a meta-atom (meta-atom frame rotated by `azimuthDeg`). Source: elementary geometry. */
export function shapeSymmetry(shape: ShapeSpec, field = 'shape'): StructureSymmetry {
  let base: StructureSymmetry
  if (shape.kind === 'custom') base = closeStructure(shape.rotationOrder ?? 1, shape.mirrors ?? [], field)
  else if (shape.kind in SHAPES) base = SHAPES[shape.kind as Exclude<ShapeKind, 'custom'>]
  else
    throw new EngineError({
      code: 'UNKNOWN_SHAPE',
      field: `${field}.kind`,
      value: shape.kind,
      allowed: SHAPE_KINDS,
      message: `unknown shape ${JSON.stringify(shape.kind)}`,
    })
  return rotateStructure(base, shape.azimuthDeg ?? 0)
}

/** Symmetry of a lattice (lattice vector a along lab x). */
export function latticeSymmetry(lattice: LatticeSpec, field = 'lattice'): StructureSymmetry {
  if (lattice.kind === 'custom') return closeStructure(lattice.rotationOrder ?? 1, lattice.mirrors ?? [], field)
  if (lattice.kind in LATTICES) return LATTICES[lattice.kind as Exclude<LatticeKind, 'custom'>]
  throw new EngineError({
    code: 'UNKNOWN_LATTICE',
    field: `${field}.kind`,
    value: lattice.kind,
    allowed: LATTICE_KINDS,
    message: `unknown lattice ${JSON.stringify(lattice.kind)}`,
  })
}

/** Rotate a structure's group by `azimuthDeg` about the normal (mirrors shift by the azimuth). */
export function rotateStructure(s: StructureSymmetry, azimuthDeg: number): StructureSymmetry {
  if (s.mirrors === 'all' || azimuthDeg === 0) return s
  return {
    rotationOrder: s.rotationOrder,
    mirrors: s.mirrors.map((m) => normalizeMirror(m + azimuthDeg)).sort((a, b) => a - b),
  }
}

/** Common subgroup of two structure groups (intersection): n = gcd(n1, n2) with 0 = ∞, mirrors ∩. */
export function intersectStructures(a: StructureSymmetry, b: StructureSymmetry): StructureSymmetry {
  const n = gcd(a.rotationOrder, b.rotationOrder)
  if (a.mirrors === 'all') return { rotationOrder: n, mirrors: b.mirrors }
  if (b.mirrors === 'all') return { rotationOrder: n, mirrors: a.mirrors }
  const other = new Set(b.mirrors.map(normalizeMirror))
  return { rotationOrder: n, mirrors: a.mirrors.filter((m) => other.has(normalizeMirror(m))) }
}

/** Symmetry of an array of meta-atoms on a lattice at normal incidence (rule 3 of the contract). */
export function deriveArraySymmetry(shape: ShapeSpec, lattice: LatticeSpec): StructureSymmetry {
  return intersectStructures(shapeSymmetry(shape), latticeSymmetry(lattice))
}

/** Conventional name of a structure group, e.g. `C4v`, `C∞v`, `C3`, `Cs`. */
export function structureGroupName(s: StructureSymmetry): string {
  const n = s.rotationOrder === 0 ? '∞' : String(s.rotationOrder)
  const hasMirrors = s.mirrors === 'all' || s.mirrors.length > 0
  if (s.rotationOrder === 1) return hasMirrors ? 'Cs' : 'C1'
  return `C${n}${hasMirrors ? 'v' : ''}`
}

/** Concrete mirror list (for `'all'`, the mirrors of a C∞v sampled every `stepDeg`). */
export function listMirrors(s: StructureSymmetry, stepDeg = 15): number[] {
  if (s.mirrors !== 'all') return s.mirrors
  return Array.from({ length: Math.round(180 / stepDeg) }, (_, k) => k * stepDeg)
}
