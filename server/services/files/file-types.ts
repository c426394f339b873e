import { fieldError } from '../../errors'

/**
 * What an uploaded file is, decided from its bytes, never from its name or the browser's type:
 * magic numbers for images and PDF; strict UTF-8 without NUL/control bytes plus a table of numbers
 * for CSV/TXT spectra and sweeps. Also: original-name clean-up and the lenient table parser used by
 * the spectrum preview.
 */

export type FileKind = 'sem' | 'spectrum' | 'sweep' | 'camera' | 'other'

const IMAGE_MIMES = ['image/png', 'image/jpeg', 'image/tiff', 'image/gif', 'image/webp'] as const
/** Image types a browser shows itself (TIFF is not among them). */
export const BROWSER_IMAGES = new Set(['image/png', 'image/jpeg', 'image/gif', 'image/webp'])
export const isImageMime = (mime: string) => (IMAGE_MIMES as readonly string[]).includes(mime)

const startsWith = (b: Buffer, bytes: number[], at = 0) => bytes.every((x, i) => b[at + i] === x)
const ascii = (s: string) => [...s].map((c) => c.charCodeAt(0))

/** Sniff a binary type by its magic number (PNG, JPEG, TIFF, GIF, WebP, PDF); null when none matches. */
export function sniffBinary(b: Buffer): string | null {
  if (startsWith(b, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'image/png'
  if (startsWith(b, [0xff, 0xd8, 0xff])) return 'image/jpeg'
  if (startsWith(b, [0x49, 0x49, 0x2a, 0x00]) || startsWith(b, [0x4d, 0x4d, 0x00, 0x2a])) return 'image/tiff'
  if (startsWith(b, ascii('GIF87a')) || startsWith(b, ascii('GIF89a'))) return 'image/gif'
  if (startsWith(b, ascii('RIFF')) && startsWith(b, ascii('WEBP'), 8)) return 'image/webp'
  if (startsWith(b, ascii('%PDF-'))) return 'application/pdf'
  return null
}

/** The bytes as text when they are valid UTF-8 with no NUL or other control bytes (tab, CR, LF allowed). */
export function decodeText(b: Buffer): string | null {
  let s: string
  try { s = new TextDecoder('utf-8', { fatal: true }).decode(b) } catch { return null }
  if (/[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]/.test(s)) return null
  return s.replace(/^\uFEFF/, '')
}

export interface DataTable { columns: string[]; rows: number[][]; skipped: number; separator: string }

const SEPARATORS = [';', '\t', ','] as const

function toNumber(cell: string, decimalComma: boolean): number {
  const t = cell.trim().replace(/^"(.*)"$/, '$1')
  if (t === '') return Number.NaN
  return Number(decimalComma ? t.replace(',', '.') : t)
}

/** Pick the separator that splits most sample lines into the same number (≥ 2) of fields. */
function pickSeparator(lines: string[]): string {
  const sample = lines.slice(0, 50)
  for (const sep of SEPARATORS) {
    const freq = new Map<number, number>()
    for (const l of sample) { const c = l.split(sep).length; if (c >= 2) freq.set(c, (freq.get(c) ?? 0) + 1) }
    if (Math.max(0, ...freq.values()) >= Math.ceil(sample.length / 2)) return sep
  }
  return 'whitespace'
}

/**
 * Parse a CSV/TXT table leniently: comma, semicolon, tab or whitespace separators; `#`/`%` comment
 * lines ignored; leading non-numeric lines taken as the header (its last line names the columns);
 * decimal commas accepted when the separator is `;` (or tab/whitespace) as spreadsheets in many
 * locales write them. Rows whose first two cells are not numbers are counted in `skipped`.
 */
export function parseDataTable(text: string): DataTable {
  const lines = text.split(/\r\n|\n|\r/).map((l) => l.trim()).filter((l) => l && !/^[#%]/.test(l))
  const separator = pickSeparator(lines)
  const split = (l: string) => (separator === 'whitespace' ? l.split(/\s+/) : l.split(separator))
  const decimalComma = separator !== ','
  let header: string[] | null = null
  const rows: number[][] = []
  let skipped = 0
  for (const line of lines) {
    const cells = split(line)
    const nums = cells.map((c) => toNumber(c, decimalComma))
    const ok = cells.length >= 2 && Number.isFinite(nums[0]) && Number.isFinite(nums[1])
    if (ok) rows.push(nums.filter((n) => Number.isFinite(n)))
    else if (rows.length === 0) header = cells.map((c) => c.trim().replace(/^"(.*)"$/, '$1').slice(0, 60))
    else skipped++
  }
  const width = rows[0]?.length ?? 2
  const columns = header && header.length >= 2 ? header : Array.from({ length: width }, (_, i) => (i === 0 ? 'x' : i === 1 ? 'y' : `c${i + 1}`))
  return { columns, rows, skipped, separator }
}

/** Keep at most `max` points of a curve: the lowest and highest point of each bucket, in order (peaks survive). */
export function downsample(points: [number, number][], max = 2000): [number, number][] {
  if (points.length <= max) return points
  const buckets = Math.floor(max / 2)
  const size = points.length / buckets
  const out: [number, number][] = []
  for (let b = 0; b < buckets; b++) {
    const slice = points.slice(Math.floor(b * size), Math.floor((b + 1) * size))
    if (!slice.length) continue
    let lo = 0
    let hi = 0
    slice.forEach((p, i) => { if (p[1] < slice[lo][1]) lo = i; if (p[1] > slice[hi][1]) hi = i })
    for (const i of lo === hi ? [lo] : [Math.min(lo, hi), Math.max(lo, hi)]) out.push(slice[i])
  }
  return out
}

const TEXT_KINDS: FileKind[] = ['spectrum', 'sweep']
const IMAGE_KINDS: FileKind[] = ['sem', 'camera']

/**
 * The checked MIME type of an upload of `kind`, or a field-level 400 on `file`.
 * sem/camera: images; spectrum/sweep: CSV/TXT tables of numbers; other: any of these or PDF/plain text.
 */
export function checkContent(b: Buffer, kind: FileKind): string {
  if (b.length === 0) throw fieldError('file', 'The file is empty')
  const binary = sniffBinary(b)
  if (IMAGE_KINDS.includes(kind)) {
    if (binary && isImageMime(binary)) return binary
    throw fieldError('file', 'This is not an image: SEM and camera files must be PNG, JPEG, TIFF, GIF or WebP (checked by content, not by name)')
  }
  if (binary) {
    if (kind === 'other') return binary
    throw fieldError('file', `This file is ${binary}, not a text table: spectra and sweeps must be CSV or TXT with columns of numbers`)
  }
  const text = decodeText(b)
  if (text === null) throw fieldError('file', 'The file type is not accepted: use PNG, JPEG, TIFF, GIF, WebP, PDF, or UTF-8 text (CSV/TXT)')
  const table = parseDataTable(text)
  if (table.rows.length >= 2) return 'text/csv'
  if (TEXT_KINDS.includes(kind)) throw fieldError('file', 'This does not look like a data table: expected rows of numbers separated by commas, semicolons or tabs')
  return 'text/plain'
}

/**
 * A safe display name from a client's file name: the last path segment only (so `../../etc/passwd`
 * becomes `passwd`), control and bidi-override characters removed, at most 255 characters. The name
 * is only ever shown or sent back in Content-Disposition; storage paths come from the hash.
 */
export function sanitizeFileName(name: string | undefined): string {
  const base = (name ?? '').normalize('NFC').split(/[\\/]/).pop() ?? ''
  const clean = base.replace(/[\x00-\x1f\x7f\u202a-\u202e\u2066-\u2069]/g, '').replace(/^[.\s]+/, '').trim()
  if (!clean) return 'file'
  if (clean.length <= 255) return clean
  const dot = clean.lastIndexOf('.')
  const ext = dot > 0 && clean.length - dot <= 16 ? clean.slice(dot) : ''
  return clean.slice(0, 255 - ext.length) + ext
}
