import type { LocationQuery } from 'vue-router'
import { defaultChannelForm, type ChannelForm } from './channel-form'

/** The calculator's form ↔ URL query, so a result can be linked (short keys; defaults are left out). */
export function toQuery(f: ChannelForm): Record<string, string> {
  const d = defaultChannelForm()
  const q: Record<string, string> = {
    pg: f.pointGroup,
    n: f.normal,
    ref: f.reference,
    N: String(f.order),
    pump: f.pump.type,
  }
  if (f.surface) q.surface = '1'
  if (f.structureMode === 'shape')
    Object.assign(q, { shape: f.shape, lat: f.lattice }, f.shapeAzimuthDeg ? { az: String(f.shapeAzimuthDeg) } : {})
  else Object.assign(q, { rot: String(f.rotationOrder), mir: f.mirrors })
  if (f.pump.type === 'circular') q.m = String(f.pump.m)
  if (f.pump.type === 'linear') q.angle = String(f.pump.angle)
  if (f.pump.type === 'vortex') Object.assign(q, { spin: String(f.pump.spin), l: String(f.pump.charge) })
  if (f.lmax !== d.lmax) q.lmax = String(f.lmax)
  if (f.window !== d.window) q.win = String(f.window)
  return q
}

const str = (v: LocationQuery[string]) =>
  (Array.isArray(v) ? (v[0] ?? undefined) : (v ?? undefined)) as string | undefined
const num = (v: LocationQuery[string], fallback: number) => {
  const x = Number(str(v))
  return str(v) !== undefined && Number.isFinite(x) ? x : fallback
}
const sign = (v: LocationQuery[string]) => (num(v, 1) < 0 ? -1 : 1) as 1 | -1

export function fromQuery(q: LocationQuery): ChannelForm {
  const f = defaultChannelForm()
  if (!str(q.pg)) return f
  f.pointGroup = str(q.pg)!
  f.normal = str(q.n) ?? f.normal
  f.reference = str(q.ref) ?? f.reference
  f.surface = str(q.surface) === '1'
  f.order = num(q.N, 2)
  if (str(q.rot) !== undefined)
    Object.assign(f, { structureMode: 'direct', rotationOrder: num(q.rot, 0), mirrors: str(q.mir) ?? '' })
  else
    Object.assign(f, { shape: str(q.shape) ?? 'disk', lattice: str(q.lat) ?? 'single', shapeAzimuthDeg: num(q.az, 0) })
  const type = str(q.pump)
  if (type === 'linear') f.pump = { type, angle: num(q.angle, 0) }
  else if (type === 'vortex') f.pump = { type, spin: sign(q.spin), charge: num(q.l, 1) }
  else if (type === 'elliptical' || type === 'radial' || type === 'azimuthal') f.pump = { type }
  else f.pump = { type: 'circular', m: sign(q.m) }
  f.lmax = num(q.lmax, f.lmax)
  f.window = num(q.win, f.window)
  return f
}
