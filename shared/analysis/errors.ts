/**
 * Typed errors of the analysis library (same shape as the engine's `EngineError`): a
 * machine-readable `code`, the input it concerns (`field`), the offending value, and a hint.
 * The library never returns `null` for bad input and never logs.
 */

/** Machine-readable error codes of the analysis library. */
export type AnalysisErrorCode =
  | 'EMPTY'
  | 'TOO_LARGE'
  | 'NO_NUMBERS'
  | 'TOO_FEW_COLUMNS'
  | 'UNKNOWN_COLUMN'
  | 'TOO_FEW_POINTS'
  | 'INVALID_OPTION'
  | 'NOTHING_TO_FIT'
  | 'FIT_FAILED'
  | 'NO_DATA_IN_WINDOW'

/** Constructor fields of an {@link AnalysisError}. */
export interface AnalysisErrorInit {
  code: AnalysisErrorCode
  field: string
  value?: unknown
  message: string
  hint?: string
}

/** Error thrown by the analysis library. `message` is one line: `field: reason (hint: …)`. */
export class AnalysisError extends Error {
  readonly code: AnalysisErrorCode
  readonly field: string
  readonly value: unknown
  readonly hint?: string

  constructor(init: AnalysisErrorInit) {
    const hint = init.hint ? ` (hint: ${init.hint})` : ''
    super(`${init.field || 'input'}: ${init.message}${hint}`)
    this.name = 'AnalysisError'
    this.code = init.code
    this.field = init.field
    this.value = init.value
    this.hint = init.hint
  }
}
