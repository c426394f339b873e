/**
 * Pump beams at normal incidence: their total angular momentum projections m on the lab +z axis
 * and their parity under vertical mirrors. Convention: a field with projection m picks up
 * e^{−imα} under a rotation by α about +z; time dependence e^{−iωt}; angles in degrees, lab frame.
 */
import type { Parity } from './mirror-parity'
import { normalizeMirror } from './structure'

/** Pump configurations. */
export type PumpSpec =
  | { type: 'circular'; m: 1 | -1 }
  | { type: 'linear'; angle: number }
  | { type: 'elliptical' }
  | { type: 'vortex'; spin: 1 | -1; charge: number }
  | { type: 'radial' }
  | { type: 'azimuthal' }
  | { type: 'explicit'; m: number[]; parity?: { mirror: number; sign: 1 | -1 } }

/** Pump type names. */
export const PUMP_TYPES = ['circular', 'linear', 'elliptical', 'vortex', 'radial', 'azimuthal', 'explicit'] as const

/**
 * Projections m carried by the pump (ascending, distinct): circular {m}; linear and elliptical
 * {−1, +1}; vortex {spin + charge}; radial and azimuthal {0}; explicit as given.
 */
export function pumpProjections(pump: PumpSpec): number[] {
  switch (pump.type) {
    case 'circular':
      return [pump.m]
    case 'linear':
    case 'elliptical':
      return [-1, 1]
    case 'vortex':
      return [pump.spin + pump.charge]
    case 'radial':
    case 'azimuthal':
      return [0]
    case 'explicit':
      return [...new Set(pump.m)].sort((a, b) => a - b)
  }
}

/** Same mirror line (angles equal modulo 180°). */
export function isSameMirror(a: number, b: number): boolean {
  const d = (((a - b) % 180) + 180) % 180
  return d < 1e-6 || d > 180 - 1e-6
}
const close = isSameMirror

/**
 * Parity of the pump field under the vertical mirror at ψ: linear at θ is even for ψ ≡ θ and odd
 * for ψ ≡ θ + 90 (mod 180), none otherwise; radial even and azimuthal odd for every ψ; explicit
 * only at its declared mirror; circular, elliptical and vortex pumps have none (0).
 */
export function pumpParity(pump: PumpSpec, psiDeg: number): Parity {
  switch (pump.type) {
    case 'linear':
      if (close(psiDeg, pump.angle)) return 1
      if (close(psiDeg, pump.angle + 90)) return -1
      return 0
    case 'radial':
      return 1
    case 'azimuthal':
      return -1
    case 'explicit':
      return pump.parity && close(psiDeg, pump.parity.mirror) ? pump.parity.sign : 0
    default:
      return 0
  }
}

/** Words for the handedness of a circularly polarised field with projection m = ±1. */
export interface CircularHandedness {
  m: 1 | -1
  /** Sense of rotation of the field vector seen from +z looking down (towards −z). */
  rotationSeenFromAbove: 'counter-clockwise' | 'clockwise'
  /** For a beam propagating along +z (e.g. reflected / emitted upwards). */
  alongPlusZ: { helicity: 1 | -1; words: string }
  /** For a beam propagating along −z (e.g. a pump incident from above). */
  alongMinusZ: { helicity: 1 | -1; words: string }
}

function words(helicity: 1 | -1): string {
  return helicity > 0
    ? 'positive helicity: right-handed (IEEE, seen from the source) = left-circular (optics, seen by the receiver)'
    : 'negative helicity: left-handed (IEEE, seen from the source) = right-circular (optics, seen by the receiver)'
}

/**
 * Physical handedness of m = ±1. With e^{−iωt}, m = +1 is the field (x̂ + iŷ), rotating from x
 * to y: counter-clockwise seen from +z. Its spin is along +z, so helicity = m for a beam along +z
 * and −m for a beam along −z. Both naming conventions are given because both are in use.
 */
export function describeCircularHandedness(m: 1 | -1): CircularHandedness {
  const plus = m
  const minus = -m as 1 | -1
  return {
    m,
    rotationSeenFromAbove: m > 0 ? 'counter-clockwise' : 'clockwise',
    alongPlusZ: { helicity: plus, words: words(plus) },
    alongMinusZ: { helicity: minus, words: words(minus) },
  }
}

/** One-line description of a pump for derivations. */
export function describePump(pump: PumpSpec): string {
  const m = pumpProjections(pump).map(signed).join(', ')
  switch (pump.type) {
    case 'circular':
      return `circular pump, m = ${signed(pump.m)} (${describeCircularHandedness(pump.m).rotationSeenFromAbove} seen from +z)`
    case 'linear':
      return `linear pump polarised at ${pump.angle}°, m ∈ {${m}}, even under the mirror at ${normalizeMirror(pump.angle)}° and odd under the one at ${normalizeMirror(pump.angle + 90)}°`
    case 'elliptical':
      return `elliptical pump, m ∈ {${m}}, no mirror parity`
    case 'vortex':
      return `vortex pump, spin ${signed(pump.spin)} and charge ${signed(pump.charge)}: m = ${m}, no mirror parity`
    case 'radial':
      return 'radially polarised pump, m = 0, even under every vertical mirror'
    case 'azimuthal':
      return 'azimuthally polarised pump, m = 0, odd under every vertical mirror'
    case 'explicit':
      return `pump with m ∈ {${m}}${pump.parity ? `, ${pump.parity.sign > 0 ? 'even' : 'odd'} under the mirror at ${pump.parity.mirror}°` : ', no declared parity'}`
  }
}

/** Signed integer text: +2, −1, 0. */
export function signed(n: number): string {
  if (Number.isInteger(n) && n >= -SIGNED_SPAN && n <= SIGNED_SPAN) return SIGNED_TEXT[n + SIGNED_SPAN]
  return formatSigned(n)
}

function formatSigned(n: number): string {
  return n > 0 ? `+${n}` : n < 0 ? `−${-n}` : '0'
}

/** Texts of the small integers, formed once (projections and m stay well inside ±SIGNED_SPAN). */
const SIGNED_SPAN = 256
const SIGNED_TEXT: readonly string[] = Array.from({ length: 2 * SIGNED_SPAN + 1 }, (_, i) =>
  formatSigned(i - SIGNED_SPAN),
)

/** Signed texts of a (dense) list joined by `, `: the same text as `values.map(signed).join(', ')`. */
export function signedList(values: readonly number[]): string {
  let text = ''
  for (let i = 0; i < values.length; i++) text += i === 0 ? signed(values[i]) : `, ${signed(values[i])}`
  return text
}
