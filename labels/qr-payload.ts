/**
 * What a label's QR code holds, and how a scan turns back into a record code. Pure functions used
 * by the server renderer, the scan page and the keyboard-wedge listener.
 *
 * Payload: `<PUBLIC_URL>/S/<CODE>`, all upper case, e.g. `HTTPS://LAB.EXAMPLE/S/W-0001`. Upper
 * case keeps every character in QR alphanumeric mode (0–9 A–Z space $ % * + - . / :), which needs
 * a smaller version than byte mode (ISO/IEC 18004; docs/labels.md §2). Scheme and host are case-insensitive, so
 * phones still open the page; the client answers both `/s/<code>` and `/S/<code>`.
 */

/** The characters of QR alphanumeric mode (ISO/IEC 18004, alphanumeric mode). */
export const QR_ALPHANUMERIC = /^[0-9A-Z $%*+\-./:]*$/

/** A record code as printed: letters, digits and hyphens, e.g. W-0001, C-0001-01, A-0001-01-B2, LS-001. */
export const CODE_PATTERN = /^[A-Z]{1,3}-[0-9A-Z]+(?:-[0-9A-Z]+)*$/

/**
 * The QR text for a code. Scheme and host are upper-cased (case-insensitive by RFC 3986); a path
 * in the public URL is kept as written (paths are case-sensitive), at the cost of a byte segment.
 */
export function qrPayload(publicUrl: string, code: string): string {
  const base = publicUrl.replace(/\/+$/, '')
  const m = /^([a-z][a-z0-9+.-]*:\/\/[^/]*)(.*)$/i.exec(base)
  const origin = m ? m[1].toUpperCase() : base
  const path = m ? m[2] : ''
  return `${origin}${path}/S/${code.trim().toUpperCase()}`
}

/**
 * The record code in a scanned text: a resolver URL (`…/s/<code>` in any case, with or without
 * query or fragment) or a bare code. Returns null when nothing code-like is found.
 */
export function extractCode(scanned: string): string | null {
  const text = scanned.trim()
  if (!text) return null
  const fromUrl = /\/s\/([^/?#\s]+)\/?(?:[?#].*)?$/i.exec(text)
  const candidate = decodeSafe(fromUrl ? fromUrl[1] : text)
    .trim()
    .toUpperCase()
  return CODE_PATTERN.test(candidate) ? candidate : null
}

function decodeSafe(s: string): string {
  try {
    return decodeURIComponent(s)
  } catch {
    return s
  }
}
