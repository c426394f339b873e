/**
 * A depth limit for JSON request bodies, checked on the raw bytes before they are parsed (the
 * `verify` hook of express.json): an array nested 5 000 deep is only ~10 kB, yet recursive code
 * after the parser (schema validation, the engine, audit diffs) could overflow the stack on it.
 * One pass, no recursion; brackets inside strings do not count.
 */
export const MAX_JSON_DEPTH = 32

const QUOTE = 0x22
const BACKSLASH = 0x5c
const OPEN = new Set([0x5b, 0x7b]) // [ {
const CLOSE = new Set([0x5d, 0x7d]) // ] }

/** Deepest nesting of arrays and objects in a JSON text (stops counting once over `limit`). */
export function jsonDepth(buf: Uint8Array, limit = Infinity): number {
  let depth = 0
  let max = 0
  let inString = false
  for (let i = 0; i < buf.length; i++) {
    const c = buf[i]
    if (inString) {
      if (c === BACKSLASH) i++
      else if (c === QUOTE) inString = false
    } else if (c === QUOTE) inString = true
    else if (OPEN.has(c)) {
      if (++depth > max) {
        max = depth
        if (max > limit) return max
      }
    } else if (CLOSE.has(c)) depth--
  }
  return max
}

/** `express.json({ verify })`: refuse a body nested deeper than MAX_JSON_DEPTH with a 400. */
export function refuseDeepJson(_req: unknown, _res: unknown, buf: Buffer): void {
  if (jsonDepth(buf, MAX_JSON_DEPTH) > MAX_JSON_DEPTH) {
    throw Object.assign(
      new Error(
        `The request body is nested too deeply: at most ${MAX_JSON_DEPTH} levels of arrays and objects are accepted.`,
      ),
      { status: 400, expose: true },
    )
  }
}
