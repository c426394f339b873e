/**
 * Typed errors of the harmonic-channel engine.
 *
 * Every invalid input throws an {@link EngineError} carrying a machine-readable `code`, the dot
 * path of the offending input (`field`, e.g. `pump.angle`), the value received, and when useful
 * the allowed values and a hint. The engine never returns `null` for bad input and never logs.
 */

/** Machine-readable error codes of the engine. */
export type EngineErrorCode =
  | 'INVALID_JSON'
  | 'MISSING_FIELD'
  | 'INVALID_TYPE'
  | 'OUT_OF_RANGE'
  | 'UNKNOWN_POINT_GROUP'
  | 'UNKNOWN_PUMP_TYPE'
  | 'UNKNOWN_SHAPE'
  | 'UNKNOWN_LATTICE'
  | 'ZERO_VECTOR'
  | 'REFERENCE_PARALLEL_TO_NORMAL'
  | 'INVALID_DIRECTION'
  | 'INCONSISTENT_SYMMETRY'
  | 'UNSUPPORTED'

/** Constructor fields of an {@link EngineError}. */
export interface EngineErrorInit {
  code: EngineErrorCode
  /** Dot path of the bad input (`''` for the whole request). */
  field: string
  value: unknown
  /** Human-readable reason, without the field name (it is prefixed automatically). */
  message: string
  allowed?: readonly unknown[] | string
  hint?: string
}

/** Error thrown by the engine for any invalid input. `message` is one line: `field: reason`. */
export class EngineError extends Error {
  readonly code: EngineErrorCode
  readonly field: string
  readonly value: unknown
  readonly allowed?: readonly unknown[] | string
  readonly hint?: string

  constructor(init: EngineErrorInit) {
    const where = init.field === '' ? 'request' : init.field
    const hint = init.hint ? ` (hint: ${init.hint})` : ''
    super(`${where}: ${init.message}${hint}`.replace(/\s*\n\s*/g, ' '))
    this.name = 'EngineError'
    this.code = init.code
    this.field = init.field
    this.value = init.value
    this.allowed = init.allowed
    this.hint = init.hint
  }
}

/** Short printable form of an input value for error messages (never multi-line, ≤ 60 chars). */
export function formatValue(value: unknown): string {
  let text: string
  try {
    text = value === undefined ? 'undefined' : (JSON.stringify(value) ?? String(value))
  } catch {
    text = String(value)
  }
  return text.length > 60 ? `${text.slice(0, 57)}...` : text
}
