/**
 * Typed errors of the laser-safety library.
 *
 * Every invalid input throws a {@link SafetyInputError} naming the offending input (`field`), the
 * value received and a one-line reason. Inputs that are valid numbers but fall outside the small
 * documented tables (wavelength band, exposure duration, scale number) use the code
 * `OUTSIDE_TABLE` and tell the user to ask the laser safety officer (LSO). The library never
 * returns `null` for bad input and never logs.
 */

/** Machine-readable error codes. */
export type SafetyErrorCode = 'INVALID_NUMBER' | 'OUT_OF_RANGE' | 'OUTSIDE_TABLE'

/** Sentence appended to every `OUTSIDE_TABLE` message. */
export const ASK_THE_LSO = 'outside the table, ask the LSO'

/** Constructor fields of a {@link SafetyInputError}. */
export interface SafetyInputErrorInit {
  code: SafetyErrorCode
  /** Name of the bad input, e.g. `averagePowerW`. */
  field: string
  value: unknown
  /** Reason without the field name (it is prefixed automatically). */
  message: string
}

/** Error thrown for any invalid or untabulated input. `message` is one line: `field: reason`. */
export class SafetyInputError extends Error {
  readonly code: SafetyErrorCode
  readonly field: string
  readonly value: unknown

  constructor(init: SafetyInputErrorInit) {
    super(`${init.field}: ${init.message}`)
    this.name = 'SafetyInputError'
    this.code = init.code
    this.field = init.field
    this.value = init.value
  }
}

/** Throws unless `value` is a finite number. */
export function requireFinite(field: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new SafetyInputError({
      code: 'INVALID_NUMBER',
      field,
      value,
      message: `must be a finite number, got ${String(value)}`,
    })
  return value
}

/** Throws unless `value` is a finite number > 0. */
export function requirePositive(field: string, value: number): number {
  requireFinite(field, value)
  if (value <= 0)
    throw new SafetyInputError({ code: 'OUT_OF_RANGE', field, value, message: `must be greater than 0, got ${value}` })
  return value
}

/** Throws unless `value` is a finite number ≥ 0. */
export function requireNonNegative(field: string, value: number): number {
  requireFinite(field, value)
  if (value < 0)
    throw new SafetyInputError({ code: 'OUT_OF_RANGE', field, value, message: `must not be negative, got ${value}` })
  return value
}

/** Throws an `OUTSIDE_TABLE` error for a value the documented tables do not cover. */
export function outsideTable(field: string, value: unknown, why: string): never {
  throw new SafetyInputError({ code: 'OUTSIDE_TABLE', field, value, message: `${why}; ${ASK_THE_LSO}` })
}
