/**
 * Generators of the 32 crystallographic point groups in their standard settings
 * (IEEE Std 176-1987 / Nye, Physical Properties of Crystals), plus two limiting (Curie) groups.
 *
 * Frame: crystal Cartesian frame. Settings: monoclinic diad ∥ y (mirror ⟂ y); mm2 diad ∥ z;
 * 32 and -3m diad ∥ x; 3m and -6m2 mirror ⟂ x; -42m diad ∥ x (mirrors diagonal); cubic
 * x = [100], y = [010], z = [001]. Only generators are stored; every element is derived by
 * closure in `point-groups.ts`, every tensor form by solving in `tensor-forms.ts`.
 */
import type { Mat3 } from '../linalg'
import { rotationAboutAxis } from '../linalg'

const H = Math.sqrt(3) / 2

/** Named symmetry operations (matrices acting on crystal Cartesian coordinates). */
export const SYMMETRY_OPERATIONS = {
  /** Inversion −1. */
  I: [-1, 0, 0, 0, -1, 0, 0, 0, -1],
  /** Diads (2-fold rotations) about x, y, z. */
  C2x: [1, 0, 0, 0, -1, 0, 0, 0, -1],
  C2y: [-1, 0, 0, 0, 1, 0, 0, 0, -1],
  C2z: [-1, 0, 0, 0, -1, 0, 0, 0, 1],
  /** Tetrad: rotation by +90° about z. */
  C4z: [0, -1, 0, 1, 0, 0, 0, 0, 1],
  /** Inversion tetrad -4 about z: inversion after +90° rotation. */
  S4z: [0, 1, 0, -1, 0, 0, 0, 0, -1],
  /** Triad: rotation by +120° about z. */
  C3z: [-0.5, -H, 0, H, -0.5, 0, 0, 0, 1],
  /** Hexad: rotation by +60° about z. */
  C6z: [0.5, -H, 0, H, 0.5, 0, 0, 0, 1],
  /** Triad about [111]: x → y → z → x. */
  C3xyz: [0, 0, 1, 1, 0, 0, 0, 1, 0],
  /** Mirrors with normals x, y, z. */
  Mx: [-1, 0, 0, 0, 1, 0, 0, 0, 1],
  My: [1, 0, 0, 0, -1, 0, 0, 0, 1],
  Mz: [1, 0, 0, 0, 1, 0, 0, 0, -1],
} as const satisfies Record<string, Mat3>

/** Name of a stored symmetry operation. */
export type OperationName = keyof typeof SYMMETRY_OPERATIONS

/** Crystal systems of the point groups. */
export type CrystalSystem =
  'triclinic' | 'monoclinic' | 'orthorhombic' | 'tetragonal' | 'trigonal' | 'hexagonal' | 'cubic'

/** One row of the generator table. */
export interface PointGroupEntry {
  /** Hermann–Mauguin symbol, ASCII (bar as leading minus: -43m). */
  symbol: string
  schoenflies: string
  system: CrystalSystem
  generators: readonly OperationName[]
  /** How the group sits in the Cartesian frame, in words (shown beside every matrix). */
  setting?: string
}

/** The setting of a class in words: the table's own text, else what its crystal system fixes. */
export function settingText(entry: Pick<PointGroupEntry, 'symbol' | 'system' | 'setting'>): string {
  if (entry.setting) return entry.setting
  if (entry.system === 'cubic') return 'x ∥ [100], y ∥ [010], z ∥ [001]'
  if (entry.system === 'triclinic') return 'any right-handed Cartesian frame'
  if (entry.system === 'orthorhombic') return 'x, y, z along the three diads'
  return 'z ∥ the principal axis'
}

/** The 32 crystallographic point groups with generators in the standard settings above. */
export const POINT_GROUP_TABLE: readonly PointGroupEntry[] = [
  { symbol: '1', schoenflies: 'C1', system: 'triclinic', generators: [] },
  { symbol: '-1', schoenflies: 'Ci', system: 'triclinic', generators: ['I'] },
  { symbol: '2', schoenflies: 'C2', system: 'monoclinic', generators: ['C2y'], setting: 'diad ∥ y' },
  { symbol: 'm', schoenflies: 'Cs', system: 'monoclinic', generators: ['My'], setting: 'mirror ⟂ y' },
  {
    symbol: '2/m',
    schoenflies: 'C2h',
    system: 'monoclinic',
    generators: ['C2y', 'I'],
    setting: 'diad ∥ y, mirror ⟂ y',
  },
  { symbol: '222', schoenflies: 'D2', system: 'orthorhombic', generators: ['C2z', 'C2x'] },
  { symbol: 'mm2', schoenflies: 'C2v', system: 'orthorhombic', generators: ['Mx', 'My'], setting: 'diad ∥ z' },
  { symbol: 'mmm', schoenflies: 'D2h', system: 'orthorhombic', generators: ['C2z', 'C2x', 'I'] },
  { symbol: '4', schoenflies: 'C4', system: 'tetragonal', generators: ['C4z'] },
  { symbol: '-4', schoenflies: 'S4', system: 'tetragonal', generators: ['S4z'] },
  { symbol: '4/m', schoenflies: 'C4h', system: 'tetragonal', generators: ['C4z', 'I'] },
  { symbol: '422', schoenflies: 'D4', system: 'tetragonal', generators: ['C4z', 'C2x'] },
  { symbol: '4mm', schoenflies: 'C4v', system: 'tetragonal', generators: ['C4z', 'Mx'] },
  {
    symbol: '-42m',
    schoenflies: 'D2d',
    system: 'tetragonal',
    generators: ['S4z', 'C2x'],
    setting: 'diad ∥ x, mirrors diagonal',
  },
  { symbol: '4/mmm', schoenflies: 'D4h', system: 'tetragonal', generators: ['C4z', 'C2x', 'I'] },
  { symbol: '3', schoenflies: 'C3', system: 'trigonal', generators: ['C3z'] },
  { symbol: '-3', schoenflies: 'C3i', system: 'trigonal', generators: ['C3z', 'I'] },
  { symbol: '32', schoenflies: 'D3', system: 'trigonal', generators: ['C3z', 'C2x'], setting: 'diad ∥ x' },
  { symbol: '3m', schoenflies: 'C3v', system: 'trigonal', generators: ['C3z', 'Mx'], setting: 'mirror ⟂ x' },
  { symbol: '-3m', schoenflies: 'D3d', system: 'trigonal', generators: ['C3z', 'C2x', 'I'], setting: 'diad ∥ x' },
  { symbol: '6', schoenflies: 'C6', system: 'hexagonal', generators: ['C6z'] },
  { symbol: '-6', schoenflies: 'C3h', system: 'hexagonal', generators: ['C3z', 'Mz'] },
  { symbol: '6/m', schoenflies: 'C6h', system: 'hexagonal', generators: ['C6z', 'I'] },
  { symbol: '622', schoenflies: 'D6', system: 'hexagonal', generators: ['C6z', 'C2x'] },
  { symbol: '6mm', schoenflies: 'C6v', system: 'hexagonal', generators: ['C6z', 'Mx'] },
  {
    symbol: '-6m2',
    schoenflies: 'D3h',
    system: 'hexagonal',
    generators: ['C3z', 'Mz', 'Mx'],
    setting: 'mirror ⟂ x (d22 family)',
  },
  { symbol: '6/mmm', schoenflies: 'D6h', system: 'hexagonal', generators: ['C6z', 'C2x', 'I'] },
  { symbol: '23', schoenflies: 'T', system: 'cubic', generators: ['C2z', 'C2x', 'C3xyz'] },
  { symbol: 'm-3', schoenflies: 'Th', system: 'cubic', generators: ['C2z', 'C2x', 'C3xyz', 'I'] },
  { symbol: '432', schoenflies: 'O', system: 'cubic', generators: ['C4z', 'C3xyz'] },
  { symbol: '-43m', schoenflies: 'Td', system: 'cubic', generators: ['S4z', 'C3xyz'] },
  { symbol: 'm-3m', schoenflies: 'Oh', system: 'cubic', generators: ['C4z', 'C3xyz', 'I'] },
]

/**
 * Classes also known in a second setting that changes the tensor's form. `-62m` is D3h with the diad
 * along x and the mirror normal to y (so d11 = −d12 = −d26, the form monolayer papers use with x along
 * the armchair direction), not an alias of `-6m2` (mirror normal to x, the d22 family). International
 * Tables for Crystallography Vol. A, the two orientations −6m2 and −62m of class D3h.
 */
export const SETTING_TABLE: readonly PointGroupEntry[] = [
  {
    symbol: '-62m',
    schoenflies: 'D3h',
    system: 'hexagonal',
    generators: ['C3z', 'Mz', 'C2x'],
    setting: 'diad ∥ x, mirror ⟂ y (d11 family)',
  },
]

/** Rotation angle (rad) incommensurate with 2π: invariance under it implies invariance under every
 * rotation about the same axis for tensors of rank ≤ 6 (all Fourier orders |q| ≤ 6 are excluded). */
const GENERIC_ANGLE = 1

/** A limiting (Curie) group: infinite, so only its generators are used (never closed). */
export interface LimitGroupEntry {
  symbol: string
  schoenflies: string
  description: string
  generators: readonly Mat3[]
}

/**
 * Limiting groups: `∞m` (C∞v, isotropic interface with normal z) and `∞∞m` (Kh, isotropic medium).
 * Continuous rotations are represented by one rotation through a generic angle.
 */
export const LIMIT_GROUP_TABLE: readonly LimitGroupEntry[] = [
  {
    symbol: '∞m',
    schoenflies: 'C∞v',
    description: 'isotropic interface (normal along z)',
    generators: [rotationAboutAxis([0, 0, 1], GENERIC_ANGLE), SYMMETRY_OPERATIONS.Mx],
  },
  {
    symbol: '∞∞m',
    schoenflies: 'Kh',
    description: 'isotropic medium',
    generators: [
      rotationAboutAxis([0, 0, 1], GENERIC_ANGLE),
      rotationAboutAxis([1, 0, 0], GENERIC_ANGLE),
      SYMMETRY_OPERATIONS.I,
    ],
  },
]
