import { fieldError } from '../../errors'
import { AnalysisError, parseTable, type ParsedTable } from '../../../shared/analysis'

/**
 * What an uploaded file is, decided from its bytes, never from its name or the browser's type:
 * magic numbers for images and PDF; strict UTF-8 without NUL/control bytes plus a table of numbers
 * for CSV/TXT spectra and sweeps, read by the analysis's own table parser. Also: original-name clean-up.
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
  try {
    s = new TextDecoder('utf-8', { fatal: true }).decode(b)
  } catch {
    return null
  }
  // eslint-disable-next-line no-control-regex -- finding control characters is the point
  if (/[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]/.test(s)) return null
  return s.replace(/^\uFEFF/, '')
}

/**
 * The table in an upload, read by the same parser as the analysis (`parseTable` of shared/analysis),
 * so a file that passes the upload check as a table is one the analysis can read, and the reverse.
 * Null when the text is not a table of at least two rows of two columns.
 */
export function readDataTable(text: string): ParsedTable | null {
  try {
    const table = parseTable(text)
    return table.columns.length >= 2 && table.rows.length >= 2 ? table : null
  } catch (err) {
    if (err instanceof AnalysisError) return null
    throw err
  }
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
    slice.forEach((p, i) => {
      if (p[1] < slice[lo][1]) lo = i
      if (p[1] > slice[hi][1]) hi = i
    })
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
    throw fieldError(
      'file',
      'This is not an image: SEM and camera files must be PNG, JPEG, TIFF, GIF or WebP (checked by content, not by name)',
    )
  }
  if (binary) {
    if (kind === 'other') return binary
    throw fieldError(
      'file',
      `This file is ${binary}, not a text table: spectra and sweeps must be CSV or TXT with columns of numbers`,
    )
  }
  const text = decodeText(b)
  if (text === null)
    throw fieldError(
      'file',
      'The file type is not accepted: use PNG, JPEG, TIFF, GIF, WebP, PDF, or UTF-8 text (CSV/TXT)',
    )
  if (readDataTable(text)) return 'text/csv'
  if (TEXT_KINDS.includes(kind))
    throw fieldError(
      'file',
      'This does not look like a data table: expected rows of numbers separated by commas, semicolons or tabs',
    )
  return 'text/plain'
}

/**
 * A safe display name from a client's file name: the last path segment only (so `../../etc/passwd`
 * becomes `passwd`), control and bidi-override characters removed, at most 255 characters. The name
 * is only ever shown or sent back in Content-Disposition; storage paths come from the hash.
 */
export function sanitizeFileName(name: string | undefined): string {
  const base = (name ?? '').normalize('NFC').split(/[\\/]/).pop() ?? ''
  const clean = base
    // eslint-disable-next-line no-control-regex -- removing control characters is the point
    .replace(/[\x00-\x1f\x7f\u202a-\u202e\u2066-\u2069]/g, '')
    .replace(/^[.\s]+/, '')
    .trim()
  if (!clean) return 'file'
  if (clean.length <= 255) return clean
  const dot = clean.lastIndexOf('.')
  const ext = dot > 0 && clean.length - dot <= 16 ? clean.slice(dot) : ''
  return clean.slice(0, 255 - ext.length) + ext
}
