import {
  POINT_GROUP_SYMBOLS,
  deriveArraySymmetry,
  getPointGroup,
  type LatticeKind,
  type PumpSpec,
  type ShapeKind,
  type StructureSymmetry,
} from '../../../shared/engine'

/** The calculator's form. Directions are typed as text: (hkl), [uvw], X/Y/Z, or "0, 0, 1" (Cartesian). */
export interface ChannelForm {
  pointGroup: string
  normal: string
  reference: string
  surface: boolean
  structureMode: 'shape' | 'direct'
  shape: Exclude<ShapeKind, 'custom'>
  shapeAzimuthDeg: number
  lattice: Exclude<LatticeKind, 'custom'>
  rotationOrder: number
  /** Comma-separated mirror azimuths (deg). */
  mirrors: string
  pump: Exclude<PumpSpec, { type: 'explicit' }>
  order: number
  lmax: number
  window: number
}

export const defaultChannelForm = (): ChannelForm => ({
  pointGroup: '-43m',
  normal: '(001)',
  reference: '[110]',
  surface: false,
  structureMode: 'shape',
  shape: 'disk',
  shapeAzimuthDeg: 0,
  lattice: 'single',
  rotationOrder: 0,
  mirrors: '',
  pump: { type: 'circular', m: 1 },
  order: 2,
  lmax: 4,
  window: 8,
})

export const MATERIAL_PICKS = [
  { name: 'GaAs', pointGroup: '-43m' },
  { name: 'GaP', pointGroup: '-43m' },
  { name: 'LiNbO₃', pointGroup: '3m' },
  { name: 'BBO', pointGroup: '3m' },
  { name: 'ZnO', pointGroup: '6mm' },
  { name: 'GaN', pointGroup: '6mm' },
  { name: 'MoS₂ (1 layer)', pointGroup: '-6m2' },
  { name: 'α-quartz', pointGroup: '32' },
  { name: 'KTP', pointGroup: 'mm2' },
]

/** Cut quick picks: normal + an in-plane reference direction (lab x). */
export function cutPicks(pointGroup: string): { label: string; normal: string; reference: string }[] {
  if (isCubic(pointGroup))
    return [
      { label: '(001), x ∥ [110]', normal: '(001)', reference: '[110]' },
      { label: '(001), x ∥ [100]', normal: '(001)', reference: '[100]' },
      { label: '(111), x ∥ [1-10]', normal: '(111)', reference: '[1-10]' },
      { label: '(110), x ∥ [001]', normal: '(110)', reference: '[001]' },
    ]
  return [
    { label: 'Z-cut, x ∥ X', normal: 'Z', reference: 'X' },
    { label: 'X-cut, x ∥ Y', normal: 'X', reference: 'Y' },
    { label: 'X-cut, x ∥ Z', normal: 'X', reference: 'Z' },
    { label: 'Y-cut, x ∥ Z', normal: 'Y', reference: 'Z' },
  ]
}

export function isCubic(pointGroup: string): boolean {
  try {
    return getPointGroup(pointGroup).isCubic
  } catch {
    return false
  }
}

/** Point groups by crystal system, in table order. */
export function pointGroupsBySystem(): { system: string; symbols: string[] }[] {
  const out: { system: string; symbols: string[] }[] = []
  for (const s of POINT_GROUP_SYMBOLS) {
    const system = getPointGroup(s).system
    const group = out.find((g) => g.system === system) ?? (out.push({ system, symbols: [] }), out[out.length - 1])
    group.symbols.push(s)
  }
  return out
}

/** "0, 0, 1" → [0, 0, 1] (Cartesian); anything else is sent as typed for the engine to read. */
export function directionInput(text: string): string | number[] {
  const t = text.trim()
  if (/,/.test(t)) {
    const parts = t
      .replace(/^[[(]|[\])]$/g, '')
      .split(',')
      .map((x) => Number(x.trim().replace('−', '-')))
    if (parts.length === 3 && parts.every(Number.isFinite)) return parts
  }
  return t
}

export const parseMirrors = (text: string) =>
  text
    .split(/[,;\s]+/)
    .filter(Boolean)
    .map((x) => Number(x.replace('−', '-')))

/** Mirror list for a request: 'all' (a body of revolution) is sampled every 15°, as the session predictions do. */
export const mirrorList = (s: StructureSymmetry) =>
  s.mirrors === 'all' ? Array.from({ length: 12 }, (_, k) => k * 15) : s.mirrors

export function structureOf(f: ChannelForm): StructureSymmetry {
  if (f.structureMode === 'direct') return { rotationOrder: Number(f.rotationOrder), mirrors: parseMirrors(f.mirrors) }
  return deriveArraySymmetry({ kind: f.shape, azimuthDeg: Number(f.shapeAzimuthDeg) || 0 }, { kind: f.lattice })
}

/** The engine request for the form (the body of `POST /api/channels` too). */
export function toChannelRequest(f: ChannelForm) {
  const s = structureOf(f)
  return {
    crystal: { pointGroup: f.pointGroup, normal: directionInput(f.normal), reference: directionInput(f.reference) },
    surface: f.surface,
    structure: { rotationOrder: s.rotationOrder, mirrors: mirrorList(s) },
    pump: f.pump,
    order: f.order,
    lmax: f.lmax,
    window: f.window,
  }
}
