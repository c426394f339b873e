import { describeCircularHandedness, type PumpSpec } from '../../../shared/engine'

/** Pump kinds offered in forms (the engine's 'explicit' kind is for the API and CLI only). */
export const PUMP_KIND_OPTIONS = [
  { value: 'circular', label: 'Circular' },
  { value: 'linear', label: 'Linear' },
  { value: 'elliptical', label: 'Elliptical' },
  { value: 'vortex', label: 'Vortex (spin + orbital charge)' },
  { value: 'radial', label: 'Radial' },
  { value: 'azimuthal', label: 'Azimuthal' },
] as const

export const signedText = (n: number) => (n > 0 ? `+${n}` : n < 0 ? `−${-n}` : '0')

/** Short pump label for tables, e.g. "circular m = +1", "linear 45°", "vortex s = +1, ℓ = −2". */
export function pumpLabel(pump: PumpSpec): string {
  switch (pump.type) {
    case 'circular':
      return `circular m = ${signedText(pump.m)}`
    case 'linear':
      return `linear ${pump.angle}°`
    case 'vortex':
      return `vortex s = ${signedText(pump.spin)}, ℓ = ${signedText(pump.charge)}`
    case 'explicit':
      return `m ∈ {${pump.m.map(signedText).join(', ')}}`
    default:
      return pump.type
  }
}

/** "m = +1: counter-clockwise seen from +z; for a beam along −z …; along +z …" (both conventions). */
export function handednessText(m: 1 | -1): { title: string; minusZ: string; plusZ: string } {
  const h = describeCircularHandedness(m)
  return {
    title: `m = ${signedText(m)}: ${h.rotationSeenFromAbove} seen from +z`,
    minusZ: `for a beam along −z (pump from above): ${h.alongMinusZ.words}`,
    plusZ: `for a beam along +z (emitted upwards): ${h.alongPlusZ.words}`,
  }
}
