/**
 * Crystal directions given by a user: numeric vectors in the crystal Cartesian frame, axis names
 * (`X`, `Y`, `Z` for X-, Y-, Z-cut; `-X` …), Miller notation for cubic crystals only (`[1-10]`
 * direction, `(111)` plane normal; in a cubic crystal both are the Cartesian vector [h k l]).
 */
import type { Vec3 } from './linalg'
import { maxAbs } from './linalg'
import { EngineError } from './errors'

/** A direction as accepted from users: a 3-vector, an axis name, or (cubic) Miller notation. */
export type DirectionInput = readonly number[] | string

const AXIS_NAMES: Record<string, Vec3> = { X: [1, 0, 0], Y: [0, 1, 0], Z: [0, 0, 1] }

function parseMiller(text: string): Vec3 | undefined {
  const m = /^[[(]\s*(-?\d)\s*,?\s*(-?\d)\s*,?\s*(-?\d)\s*[\])]$/.exec(text)
  return m ? [Number(m[1]), Number(m[2]), Number(m[3])] : undefined
}

/**
 * Parse a direction in the crystal Cartesian frame. Throws INVALID_DIRECTION / ZERO_VECTOR with
 * `field`. Miller notation is refused for non-cubic crystals (needs lattice parameters).
 */
export function parseDirection(input: unknown, field: string, isCubic: boolean): Vec3 {
  let v: Vec3 | undefined
  if (Array.isArray(input)) {
    if (input.length !== 3 || !input.every(isFiniteNumber))
      throw new EngineError({
        code: 'INVALID_DIRECTION',
        field,
        value: input,
        message: `a direction must be an array of 3 finite numbers, got ${JSON.stringify(input)}`,
      })
    v = [input[0], input[1], input[2]]
  } else if (typeof input === 'string') {
    const text = input.trim().toUpperCase().replace(/-CUT$/, '')
    const sign = text.startsWith('-') ? -1 : 1
    const axis = AXIS_NAMES[text.replace(/^[-+]/, '')]
    if (axis) v = [axis[0] * sign, axis[1] * sign, axis[2] * sign]
    else {
      const miller = parseMiller(input.trim())
      if (miller && !isCubic)
        throw new EngineError({
          code: 'INVALID_DIRECTION',
          field,
          value: input,
          message: `Miller notation ${input} is only accepted for cubic crystals`,
          hint: 'for non-cubic crystals give X, Y, Z or a Cartesian vector such as [0,0,1]',
        })
      v = miller
    }
    if (!v)
      throw new EngineError({
        code: 'INVALID_DIRECTION',
        field,
        value: input,
        allowed: ['X', 'Y', 'Z', '[uvw]', '(hkl)', '[x,y,z]'],
        message: `cannot read direction ${JSON.stringify(input)}`,
      })
  } else
    throw new EngineError({
      code: input === undefined ? 'MISSING_FIELD' : 'INVALID_TYPE',
      field,
      value: input,
      message:
        input === undefined
          ? 'a direction is required'
          : `a direction must be an array of 3 numbers or an axis name, got ${JSON.stringify(input)}`,
    })
  // A direction has no scale: only the exact zero vector is refused ([0, 0, 1e-200] is the z axis).
  if (maxAbs(v) === 0)
    throw new EngineError({ code: 'ZERO_VECTOR', field, value: input, message: 'the direction is the zero vector' })
  return v
}

/**
 * Printable direction: Miller-style (`[1-10]`, `(111)` with `plane`) when proportional to small
 * integers, else rounded components.
 */
export function formatDirection(v: Vec3, plane = false): string {
  const [open, close] = plane ? ['(', ')'] : ['[', ']']
  const smallest = Math.min(...v.filter((x) => Math.abs(x) > 1e-9).map(Math.abs))
  for (let k = 1; k <= 6; k++) {
    const s = v.map((x) => (x / smallest) * k)
    if (s.every((x) => Math.abs(x - Math.round(x)) < 1e-6) && s.every((x) => Math.abs(x) < 10)) {
      let ints = s.map(Math.round)
      const g = ints.reduce((a, b) => gcd(a, Math.abs(b)), 0)
      ints = ints.map((x) => x / g)
      return open + ints.map(String).join('') + close
    }
  }
  return open + v.map((x) => Number(x.toFixed(3))).join(', ') + close
}

function isFiniteNumber(x: unknown): boolean {
  return typeof x === 'number' && Number.isFinite(x)
}

function gcd(a: number, b: number): number {
  return b === 0 ? Math.abs(a) : gcd(b, a % b)
}
