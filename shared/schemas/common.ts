import { z } from 'zod'
// The plain-words error map for every schema (installed on load).
import './messages'

/**
 * Building blocks every request schema uses, so one rule holds on every route and form:
 * ids are plain positive decimal integers, and text carries no control or bidirectional-override
 * characters.
 */

/** Largest id a row can have (ids are signed 32-bit INT columns). */
export const MAX_ID = 2_147_483_647
const ID_PATTERN = /^[1-9][0-9]{0,9}$/
const ID_MESSAGE = `Use a plain whole number from 1 to ${MAX_ID}`

/**
 * An id: a JSON integer, or a string of decimal digits without sign, leading zero, spaces,
 * exponent, hex or fraction (`0x1`, `1e0`, ` 1`, `1.0`, `01` are refused, where `Number()` would
 * take them). `message` replaces the wording of the refusal (e.g. "Pick a file of this session").
 */
export function idValue(message = ID_MESSAGE) {
  return z
    .union([z.number(), z.string()], { error: message })
    .refine(
      (v) =>
        typeof v === 'number'
          ? Number.isInteger(v) && v >= 1 && v <= MAX_ID
          : ID_PATTERN.test(v) && Number(v) <= MAX_ID,
      message,
    )
    .transform((v) => Number(v))
}

/** `:id` in a path. */
export const idParamSchema = z.object({ id: idValue() })

/**
 * C0 and C1 control characters (U+0000–U+001F, U+007F–U+009F) and the bidirectional embedding,
 * override and isolate characters (U+202A–U+202E, U+2066–U+2069), which can make stored text
 * display in an order other than the one it is stored in (CVE-2021-42574, "Trojan Source").
 * Multi-line text may hold tab, line feed and carriage return.
 */
// eslint-disable-next-line no-control-regex
const CONTROL_SINGLE = /[\u0000-\u001f\u007f-\u009f]/
// eslint-disable-next-line no-control-regex
const CONTROL_MULTI = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/
const BIDI = /[\u202a-\u202e\u2066-\u2069]/

/** Why `s` is refused as text (null when it is fine). */
export function textProblem(s: string, multiline: boolean): string | null {
  if (BIDI.test(s)) return 'Remove the invisible text-direction characters (U+202A–U+202E, U+2066–U+2069)'
  if ((multiline ? CONTROL_MULTI : CONTROL_SINGLE).test(s)) {
    return multiline
      ? 'Remove the control characters (only tabs and line breaks are allowed)'
      : 'Use one line without tabs or control characters'
  }
  return null
}

/** A trimmed string with the text rule (single line unless `multiline`); chain `.min()`, `.max()` as usual. */
export function safeString(opts: { multiline?: boolean; error?: string } = {}) {
  const multiline = opts.multiline ?? false
  return z
    .string(opts.error ? { error: opts.error } : undefined)
    .trim()
    .check((ctx) => {
      const problem = textProblem(ctx.value, multiline)
      if (problem) ctx.issues.push({ code: 'custom', message: problem, input: ctx.value })
    })
}
