/**
 * Small input readers shared by the request parsers: each checks one field of an `unknown`
 * value and throws an {@link EngineError} naming the field's dot path.
 */
import { EngineError, formatValue } from './errors'

/** A plain object, or throws INVALID_TYPE / MISSING_FIELD at `field`. */
export function readObject(value: unknown, field: string): Record<string, unknown> {
  if (value === undefined)
    throw new EngineError({ code: 'MISSING_FIELD', field, value, message: 'this field is required' })
  if (typeof value !== 'object' || value === null || Array.isArray(value))
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be an object, got ${formatValue(value)}`,
    })
  return value as Record<string, unknown>
}

/** A finite number, `fallback` when absent (undefined fallback → required). */
export function readNumber(value: unknown, field: string, fallback?: number): number {
  if (value === undefined && fallback !== undefined) return fallback
  if (value === undefined)
    throw new EngineError({ code: 'MISSING_FIELD', field, value, message: 'this number is required' })
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be a finite number, got ${formatValue(value)}`,
    })
  return value
}

/** An integer in [min, max], `fallback` when absent (undefined fallback → required). */
export function readInteger(value: unknown, field: string, min: number, max: number, fallback?: number): number {
  const n = readNumber(value, field, fallback)
  if (!Number.isInteger(n) || n < min || n > max)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field,
      value,
      allowed: `integers ${min}..${max}`,
      message: `must be an integer from ${min} to ${max}, got ${formatValue(value)}`,
    })
  return n
}

/** +1 or −1. */
export function readSign(value: unknown, field: string): 1 | -1 {
  const n = readNumber(value, field)
  if (n !== 1 && n !== -1)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field,
      value,
      allowed: [1, -1],
      message: `must be 1 or -1, got ${formatValue(value)}`,
    })
  return n
}

/** A boolean, `fallback` when absent. */
export function readBoolean(value: unknown, field: string, fallback: boolean): boolean {
  if (value === undefined) return fallback
  if (typeof value !== 'boolean')
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be true or false, got ${formatValue(value)}`,
    })
  return value
}

/** A string, or throws. */
export function readString(value: unknown, field: string): string {
  if (value === undefined)
    throw new EngineError({ code: 'MISSING_FIELD', field, value, message: 'this text field is required' })
  if (typeof value !== 'string')
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be a string, got ${formatValue(value)}`,
    })
  return value
}

/** An array (optionally non-empty) of values read by `item`, `fallback` when absent. */
export function readArray<T>(
  value: unknown,
  field: string,
  item: (v: unknown, f: string) => T,
  fallback?: T[],
  nonEmpty = false,
): T[] {
  if (value === undefined && fallback !== undefined) return fallback
  if (value === undefined)
    throw new EngineError({ code: 'MISSING_FIELD', field, value, message: 'this list is required' })
  if (!Array.isArray(value))
    throw new EngineError({
      code: 'INVALID_TYPE',
      field,
      value,
      message: `must be an array, got ${formatValue(value)}`,
    })
  if (nonEmpty && value.length === 0)
    throw new EngineError({ code: 'OUT_OF_RANGE', field, value, message: 'must not be empty' })
  return value.map((v, i) => item(v, `${field}.${i}`))
}
