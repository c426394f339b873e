/**
 * Reading a pump description from untrusted input (`{"type": "circular", "m": 1}` …) into a
 * {@link PumpSpec}. Angles in degrees, lab frame.
 */
import type { PumpSpec } from './pump'
import { PUMP_TYPES } from './pump'
import { EngineError } from './errors'
import { readArray, readInteger, readNumber, readObject, readSign, readString } from './validate'

/** Largest |orbital charge| or |explicit m| accepted. */
export const MAX_PUMP_PROJECTION = 20

/** Parse and validate a pump; throws EngineError with field paths below `field`. */
export function parsePump(value: unknown, field = 'pump'): PumpSpec {
  const o = readObject(value, field)
  const type = readString(o.type, `${field}.type`)
  const lim = MAX_PUMP_PROJECTION
  switch (type) {
    case 'circular':
      return { type, m: readSign(o.m, `${field}.m`) }
    case 'linear':
      return { type, angle: readNumber(o.angle, `${field}.angle`) }
    case 'elliptical':
      return { type }
    case 'vortex':
      return {
        type,
        spin: readSign(o.spin, `${field}.spin`),
        charge: readInteger(o.charge, `${field}.charge`, -lim, lim),
      }
    case 'radial':
    case 'azimuthal':
      return { type }
    case 'explicit': {
      const m = readArray(o.m, `${field}.m`, (v, f) => readInteger(v, f, -lim, lim), undefined, true)
      if (o.parity === undefined) return { type, m }
      const p = readObject(o.parity, `${field}.parity`)
      return {
        type,
        m,
        parity: {
          mirror: readNumber(p.mirror, `${field}.parity.mirror`),
          sign: readSign(p.sign, `${field}.parity.sign`),
        },
      }
    }
    default:
      throw new EngineError({
        code: 'UNKNOWN_PUMP_TYPE',
        field: `${field}.type`,
        value: type,
        allowed: PUMP_TYPES,
        message: `unknown pump type ${JSON.stringify(type)}; expected one of ${PUMP_TYPES.join(', ')}`,
      })
  }
}
