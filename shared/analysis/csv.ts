/**
 * Lenient parsing of instrument tables (polarisation sweeps, spectra). Accepts separators `,`,
 * `;`, tab and runs of spaces; an optional header row; a UTF-8 BOM; comment lines starting with
 * `#`; decimal commas where they cannot be confused with the separator (`;`, tab or space
 * separated files). Rows that cannot be read are reported with their 1-based line numbers instead
 * of being dropped silently. Limits: {@link MAX_TABLE_ROWS} rows and {@link MAX_TABLE_CHARS}
 * characters of text, with a clear error beyond them.
 */
import { AnalysisError } from './errors'

/** Largest number of data rows accepted (a 0.01° sweep over 360° has 36 000). */
export const MAX_TABLE_ROWS = 200_000
/** Largest text accepted, in characters (about 20 MB of ASCII). */
export const MAX_TABLE_CHARS = 20_000_000

/** Column separator found in a table. */
export type Separator = ',' | ';' | '\t' | 'whitespace'

/** A row that could not be read (whole row or single cells), 1-based line number. */
export interface SkippedRow {
  line: number
  reason: string
}

/** A parsed numeric table. Cells that could not be read are `NaN` and listed in `cellIssues`. */
export interface ParsedTable {
  columns: string[]
  rows: number[][]
  /** 1-based source line of each row. */
  lines: number[]
  hasHeader: boolean
  separator: Separator
  isDecimalComma: boolean
  /** Rows left out entirely (wrong number of fields, no number at all). */
  skipped: SkippedRow[]
  /** Cells that are not finite numbers, per line: `column → raw text`. */
  cellIssues: { line: number; column: number; text: string }[]
}

/** Options of {@link parseTable}. */
export interface ParseTableOptions {
  maxRows?: number
  maxChars?: number
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/

/** Read one cell as a finite number (`NaN` when it is not one). */
export function parseCell(raw: string, isDecimalComma: boolean): number {
  let t = raw
    .trim()
    .replace(/^"(.*)"$/, '$1')
    .trim()
  if (isDecimalComma && /^[^.]*,[^.,]*$/.test(t)) t = t.replace(',', '.')
  return NUMBER.test(t) ? Number(t) : Number.NaN
}

function splitLine(line: string, sep: Separator): string[] {
  if (sep === 'whitespace') return line.trim().split(/\s+/)
  return line.split(sep)
}

/**
 * The separator under which most sampled lines split into the same number (> 1) of numeric cells;
 * ties go to tab, `;`, `,`, whitespace in that order (so `1,5 2,5` is read as two decimal-comma
 * numbers, not as three fields).
 */
function detectSeparator(lines: readonly string[]): Separator {
  const sample = lines.slice(1, 51).length ? lines.slice(1, 51) : lines.slice(0, 1)
  let best: Separator = 'whitespace'
  let bestScore = 0
  for (const sep of ['\t', ';', ',', 'whitespace'] as const) {
    const split = sample.map((l) => splitLine(l, sep))
    const width = modalWidth(split.map((c) => c.length)) ?? 0
    if (width < 2) continue
    const score = split.filter(
      (c) => c.length === width && c.every((x) => !Number.isNaN(parseCell(x, sep !== ','))),
    ).length
    if (score > bestScore) [best, bestScore] = [sep, score]
  }
  return best
}

/** Parse the text of a table. Throws AnalysisError EMPTY, TOO_LARGE or NO_NUMBERS. */
export function parseTable(text: string, options: ParseTableOptions = {}): ParsedTable {
  const maxChars = options.maxChars ?? MAX_TABLE_CHARS
  const maxRows = options.maxRows ?? MAX_TABLE_ROWS
  if (text.length > maxChars)
    throw new AnalysisError({
      code: 'TOO_LARGE',
      field: 'file',
      value: text.length,
      message: `the file is too large: ${text.length} characters, the limit is ${maxChars}`,
      hint: 'decimate the sweep or split the file',
    })
  const all = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/)
  const content: { text: string; line: number }[] = []
  all.forEach((l, i) => {
    const t = l.trim()
    if (t !== '' && t[0] !== '#') content.push({ text: l, line: i + 1 })
  })
  if (content.length === 0)
    throw new AnalysisError({
      code: 'EMPTY',
      field: 'file',
      value: '',
      message: 'the file is empty (no data rows, only blank or # comment lines)',
    })
  if (content.length > maxRows + 1)
    throw new AnalysisError({
      code: 'TOO_LARGE',
      field: 'file',
      value: content.length,
      message: `the file is too large: ${content.length} rows, the limit is ${maxRows} rows`,
      hint: 'decimate the sweep or split the file',
    })
  const separator = detectSeparator(content.map((l) => l.text))
  const isDecimalComma = separator !== ',' && content.some((l) => /\d,\d/.test(l.text))
  const cells = content.map((l) => splitLine(l.text, separator))
  const numeric = cells.map((c) => c.map((x) => parseCell(x, isDecimalComma)))
  const hasHeader = numeric[0].filter((v) => Number.isNaN(v)).length > numeric[0].length / 2
  const width = modalWidth(cells.slice(hasHeader ? 1 : 0).map((c) => c.length)) ?? cells[0].length
  const columns = Array.from(
    { length: width },
    (_, i) => (hasHeader ? cells[0][i]?.trim().replace(/^"(.*)"$/, '$1') : undefined) || `column ${i + 1}`,
  )
  const table: ParsedTable = {
    columns,
    rows: [],
    lines: [],
    hasHeader,
    separator,
    isDecimalComma,
    skipped: [],
    cellIssues: [],
  }
  for (let r = hasHeader ? 1 : 0; r < cells.length; r++) collectRow(table, cells[r], numeric[r], content[r].line, width)
  if (table.rows.length === 0)
    throw new AnalysisError({
      code: 'NO_NUMBERS',
      field: 'file',
      value: table.skipped.slice(0, 3),
      message: `no row of the file could be read as numbers (${table.skipped.length} rows skipped${table.skipped[0] ? `, e.g. line ${table.skipped[0].line}: ${table.skipped[0].reason}` : ''})`,
      hint: 'export the data as text columns of numbers, e.g. "angle,intensity"',
    })
  return table
}

function collectRow(table: ParsedTable, raw: string[], values: number[], line: number, width: number): void {
  if (raw.length !== width) {
    const commaHint =
      table.separator === ',' && /\d,\d/.test(raw.join(','))
        ? ' (a decimal comma in a comma-separated file? use ";" as separator or "." as decimal mark)'
        : ''
    table.skipped.push({ line, reason: `has ${raw.length} fields, expected ${width}${commaHint}` })
    return
  }
  if (values.every((v) => Number.isNaN(v))) {
    table.skipped.push({ line, reason: `no number in "${raw.join(' ').slice(0, 40)}"` })
    return
  }
  values.forEach((v, c) => {
    if (Number.isNaN(v)) table.cellIssues.push({ line, column: c, text: raw[c].trim().slice(0, 20) })
  })
  table.rows.push(values)
  table.lines.push(line)
}

function modalWidth(widths: readonly number[]): number | undefined {
  const counts = new Map<number, number>()
  for (const w of widths) counts.set(w, (counts.get(w) ?? 0) + 1)
  let best: number | undefined
  for (const [w, c] of counts)
    if (best === undefined || c > (counts.get(best) ?? 0) || (c === counts.get(best) && w > best)) best = w
  return best
}
