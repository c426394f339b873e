import { Readable } from 'node:stream'
import ExcelJS from 'exceljs'
import { fieldError } from '../../errors'
import { ZIP_LIMITS, ZipRefusal, checkZip } from '../files/zip-guard'
import { IMPORT_SHEETS, type ImportMessage, type ImportSheetName } from '../../../shared/excel'
import {
  EXPORT_ONLY,
  IMPORT_COLUMNS,
  dimensionColumn,
  dimensionKey,
  matchesColumn,
  normHeader,
  type ColumnSpec,
} from './excel-columns'
import { unguardText } from './excel-style'
import { orderedPackage } from './excel-package'

/**
 * Reading an uploaded workbook: check it IS an .xlsx (ZIP magic bytes, then exceljs must load it),
 * map each sheet's header row to the known columns, and turn every cell into a typed value or a
 * message naming the column. Rules: a formula counts by its saved result (none saved: error);
 * text in a number column is an error (a number typed as text, "12.5", is accepted).
 * Hostile files: before exceljs unpacks the ZIP in memory, its directory and real content are
 * checked against `maxExpandedBytes` and `maxParts` (zip-guard.ts); each sheet may hold `maxRows`.
 * Only the visible Wafers, Chips and Arrays sheets are read; other and hidden sheets get a warning.
 */
export interface ImportLimits {
  /** Bytes the workbook may unpack to (all its XML and media together). */
  maxExpandedBytes: number
  /** Parts (files) inside the workbook's ZIP. */
  maxParts: number
  /** Data rows per sheet (the header not counted). */
  maxRows: number
}
export const IMPORT_LIMITS: ImportLimits = {
  maxExpandedBytes: ZIP_LIMITS.maxBytes,
  maxParts: ZIP_LIMITS.maxEntries,
  maxRows: 100_000,
}
const NOT_XLSX = 'This is not an Excel .xlsx file'

export type CellOut = string | number | null
export interface ReadRow {
  row: number
  values: Record<string, CellOut>
  messages: ImportMessage[]
  /** First cell is EXAMPLE (template example) or the row marks a retired record. */
  skip: string | null
  skipKind?: 'example' | 'retired'
}
export interface ReadSheet {
  name: ImportSheetName
  isPresent: boolean
  messages: ImportMessage[]
  rows: ReadRow[]
  /** Keys of the columns the sheet has (a record updated from a sheet without a column keeps that field). */
  columns: Set<string>
}

/** An upload that passed the package checks, ready to be read sheet by sheet. */
export interface LoadedWorkbook {
  buffer: Buffer
}

/**
 * Check the upload is an .xlsx within the limits (a 400 on `file` when not); its sheets are read, streamed, by
 * readImportSheets.
 */
export async function loadWorkbook(
  buf: Buffer | undefined,
  limits: Partial<ImportLimits> = {},
): Promise<LoadedWorkbook> {
  const { maxExpandedBytes, maxParts } = { ...IMPORT_LIMITS, ...limits }
  if (!buf) throw fieldError('file', 'Choose an .xlsx file to upload')
  if (buf.length === 0) throw fieldError('file', `${NOT_XLSX}: the file is empty`)
  if (buf.subarray(0, 4).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0]))) {
    // Excel saves a password-protected .xlsx inside the same container as an old .xls.
    if (buf.includes(Buffer.from('EncryptedPackage', 'utf16le')))
      throw fieldError(
        'file',
        'The workbook is protected by a password: remove the password in Excel (File → Info → Protect Workbook), save, and upload again',
      )
    throw fieldError('file', `${NOT_XLSX}: it is an old .xls workbook; save it as .xlsx in Excel first`)
  }
  if (!buf.subarray(0, 4).equals(Buffer.from([0x50, 0x4b, 0x03, 0x04])))
    throw fieldError('file', `${NOT_XLSX} (its content is not a ZIP-packed workbook)`)
  try {
    await checkZip(buf, { maxBytes: maxExpandedBytes, maxEntries: maxParts })
  } catch (e) {
    if (!(e instanceof ZipRefusal)) throw e
    if (e.problem === 'too-big') throw fieldError('file', e.message)
    if (e.problem === 'too-many')
      throw fieldError(
        'file',
        `The workbook is packed from ${e.message}; at most ${maxParts.toLocaleString('en')} can be read: it is not a workbook as Excel saves it`,
      )
    throw fieldError('file', `${NOT_XLSX}, or it is damaged (${e.message})`)
  }
  return { buffer: buf }
}
const damaged = () => fieldError('file', `${NOT_XLSX}, or it is damaged (it could not be opened as a workbook)`)

type Plain = string | number | boolean | Date | null
/** The plain value of a cell: formulas by their saved result, rich text and links as text. */
function plainValue(v: ExcelJS.CellValue): { value: Plain; error?: string } {
  if (v === null || v === undefined) return { value: null }
  if (typeof v === 'string') {
    const t = unguardText(v).trim()
    return { value: t === '' ? null : t }
  }
  // A number in a date-formatted cell that no calendar date matches (e.g. 1E+20) reads as an invalid Date.
  if (v instanceof Date)
    return Number.isNaN(v.getTime())
      ? { value: null, error: 'the cell is formatted as a date but its number is not a date Excel can show' }
      : { value: v }
  if (typeof v === 'number' || typeof v === 'boolean') return { value: v }
  if ('formula' in v || 'sharedFormula' in v) {
    const result = (v as { result?: unknown }).result
    // exceljs also drops a saved result that is empty text (=IF(A2="","",…)): say so, as re-saving will not help then.
    if (result === undefined || result === null)
      return {
        value: null,
        error:
          'formula without a value (Excel did not save its result, the result is empty text, or it is an error such as #DIV/0!): type the value or clear the cell, or open and save the file in Excel',
      }
    return plainValue(result as ExcelJS.CellValue)
  }
  if ('error' in v) return { value: null, error: `the cell holds the error ${v.error}` }
  if ('richText' in v) return plainValue(v.richText.map((t) => t.text).join(''))
  if ('text' in v) return plainValue((v as { text: ExcelJS.CellValue }).text)
  return { value: null, error: 'this kind of cell cannot be read' }
}

/** Is this number format a date (y, m, d or h outside quotes and brackets, as Excel decides)? */
const isDateFormat = (fmt: string | undefined) => !!fmt && /[ymdh]/i.test(fmt.replace(/"[^"]*"|\[[^\]]*\]/g, ''))
/** An Excel serial day number (1900 system) as a Date at UTC, or an invalid Date outside what Excel shows. */
const serialDate = (n: number) =>
  n > 0 && n < 2958466 ? new Date(Math.round((n - 25569) * 86_400_000)) : new Date(NaN)

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i
const clip = (s: string, n = 30) => (s.length > n ? s.slice(0, n) + '…' : s)
const describe = (v: Plain) =>
  typeof v === 'string'
    ? `text "${clip(v)}"`
    : v instanceof Date
      ? 'a date'
      : typeof v === 'boolean'
        ? `TRUE/FALSE`
        : String(v)
/** YYYY-MM-DD of a date cell, or null outside the years Excel shows (1900–9999). */
const isoDay = (d: Date) =>
  d.getUTCFullYear() >= 1900 && d.getUTCFullYear() <= 9999 ? d.toISOString().slice(0, 10) : null
const OUT_OF_RANGE = 'the date is outside the years 1900–9999'
/** Longest text read from a cell (the longest text field, Notes, takes 2000). */
const MAX_TEXT = 2000

/** Convert a plain value to the column's kind, or say why it cannot be. */
function typed(spec: ColumnSpec, v: Plain): { value: CellOut; error?: string } {
  if (v === null) return { value: null }
  const unit = /\(([^)]*)\)/.exec(spec.header)?.[1]
  switch (spec.kind) {
    case 'number':
    case 'integer': {
      const n =
        typeof v === 'number'
          ? v
          : typeof v === 'string' && NUMBER_TEXT.test(v.replace(',', '.'))
            ? Number(v.replace(',', '.'))
            : NaN
      if (!Number.isFinite(n))
        return { value: null, error: `expected a number${unit ? ` in ${unit}` : ''}, found ${describe(v)}` }
      if (spec.kind === 'integer' && !Number.isInteger(n))
        return { value: null, error: `expected a whole number, found ${n}` }
      return { value: n }
    }
    case 'date': {
      if (v instanceof Date)
        return isoDay(v) ? { value: isoDay(v) } : { value: null, error: `expected a date, found ${OUT_OF_RANGE}` }
      if (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(v))) return { value: v }
      return { value: null, error: `expected a date (a date cell or YYYY-MM-DD), found ${describe(v)}` }
    }
    case 'vector': {
      const parts = typeof v === 'string' ? v.split(/[\s,;[\]()]+/).filter(Boolean) : []
      if (parts.length !== 3 || !parts.every((p) => NUMBER_TEXT.test(p)))
        return { value: null, error: `expected three numbers such as 0 0 1, found ${describe(v)}` }
      return { value: parts.map(Number).join(' ') }
    }
    case 'list': {
      const s = String(v).trim().toLowerCase()
      const hit = [s, s.replace(/[\s-]+/g, '_'), s.replace(/[\s_]+/g, '-')].find((x) => spec.values!.includes(x))
      if (!hit) return { value: null, error: `"${clip(String(v), 60)}" is not one of: ${spec.values!.join(', ')}` }
      return { value: hit }
    }
    default:
      if (typeof v === 'boolean') return { value: null, error: `expected text, found ${describe(v)}` }
      if (typeof v === 'string' && v.length > MAX_TEXT)
        return {
          value: null,
          error: `the text has ${v.length.toLocaleString('en')} characters; at most ${MAX_TEXT.toLocaleString('en')} are read`,
        }
      if (v instanceof Date)
        return isoDay(v)
          ? { value: isoDay(v) }
          : { value: null, error: `expected text, found a date cell and ${OUT_OF_RANGE}` }
      return { value: String(v) }
  }
}

const err = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'error' })

/**
 * Read one sheet as it streams by: the header row gives the column mapping (missing/unknown
 * columns once per sheet), then every row holding a value. Only compact typed values are kept, not
 * exceljs's cell objects, so 100 000 rows fit in a few tens of MB. Rows over `maxRows` are counted,
 * not kept, and the sheet is refused with one message.
 */
async function readSheet(name: ImportSheetName, ws: AsyncIterable<ExcelJS.Row>, maxRows: number): Promise<ReadSheet> {
  const out: ReadSheet = { name, isPresent: true, messages: [], rows: [], columns: new Set() }
  const specs = IMPORT_COLUMNS[name]
  const byCol = new Map<number, ColumnSpec>()
  let retiredCol = 0
  let isUsable = false
  let dataRows = 0
  const header = (row: ExcelJS.Row | null) => {
    const unknown: string[] = []
    row?.eachCell((cell, col) => {
      const text = String(plainValue(cell.value).value ?? '').trim()
      if (!text) return
      const dim = name === 'Arrays' && !specs.some((s) => matchesColumn(s, text)) ? dimensionKey(text) : null
      const spec = dim
        ? ([...byCol.values()].find((s) => s.key === `dim:${dim}`) ?? dimensionColumn(dim))
        : specs.find((s) => matchesColumn(s, text))
      if (spec && [...byCol.values()].includes(spec))
        out.messages.push(err(text, `The column ${spec.header} appears twice`))
      else if (spec) byCol.set(col, spec)
      else if (normHeader(text) === 'retired(utc)') retiredCol = col
      else if (!EXPORT_ONLY[name].test(normHeader(text))) unknown.push(text)
    })
    for (const spec of byCol.values()) out.columns.add(spec.key)
    if (unknown.length)
      out.messages.push({ column: null, message: `Unknown column(s) ignored: ${listOf(unknown)}`, level: 'warning' })
    const missing = specs.filter((s) => s.isRequired && ![...byCol.values()].includes(s))
    for (const s of missing) out.messages.push(err(s.header, `The required column ${s.header} is missing`))
    isUsable = !out.messages.some((m) => m.level === 'error')
  }
  let seenHeader = false
  for await (const row of ws) {
    if (!seenHeader) {
      seenHeader = true
      header(row.number === 1 ? row : null)
      if (row.number === 1) continue
    }
    // Rows holding a value: formatted but empty rows (a format dragged down the sheet), and rows of
    // blank text only, do not count.
    const cells = row.values as ExcelJS.CellValue[]
    if (
      !cells.some((v) => {
        const p = plainValue(v)
        return p.value !== null || !!p.error
      })
    )
      continue
    if (++dataRows > maxRows || !isUsable) {
      out.rows.length = 0
      continue
    }
    const r: ReadRow = { row: row.number, values: {}, messages: [], skip: null }
    for (const [col, spec] of byCol) {
      const p = plainValue(cells[col])
      // The streaming reader gives a formula's saved result as a plain number even in a date-formatted cell.
      if (spec.kind === 'date' && typeof p.value === 'number' && isDateFormat(row.getCell(col).numFmt))
        p.value = serialDate(p.value)
      if (p.error) {
        r.messages.push(err(spec.header, p.error))
        continue
      }
      const t = typed(spec, p.value)
      if (t.error) r.messages.push(err(spec.header, t.error))
      r.values[spec.key] = t.value
    }
    // values only in unread columns
    if (!Object.values(r.values).some((v) => v !== null) && !r.messages.length) continue
    for (const spec of byCol.values()) {
      if (spec.isRequired && r.values[spec.key] == null && !r.messages.some((m) => m.column === spec.header))
        r.messages.push(err(spec.header, `${spec.header} is required`))
    }
    const first = plainValue(cells[1]).value
    if (typeof first === 'string' && first.toUpperCase() === 'EXAMPLE') {
      // The template's example rows: skipped, and not checked (their messages would only confuse).
      r.skip = 'Example row (first cell EXAMPLE): skipped'
      r.skipKind = 'example'
      r.messages = []
    } else if (r.values.status === 'retired') {
      r.skip = 'Retired record: not imported'
      r.skipKind = 'retired'
    } else if (retiredCol && plainValue(cells[retiredCol]).value !== null) {
      r.skip = 'Retired array: not imported'
      r.skipKind = 'retired'
    }
    out.rows.push(r)
  }
  if (!seenHeader) header(null)
  if (dataRows > maxRows) {
    out.rows = []
    out.messages.push(
      err(
        null,
        `The sheet has ${dataRows.toLocaleString('en')} rows; at most ${maxRows.toLocaleString('en')} can be imported at once: split the file`,
      ),
    )
  }
  return out
}

/** "a, b, c" of at most `n` names, then "and N more". */
function listOf(names: string[], n = 10): string {
  const shown = names
    .slice(0, n)
    .map((x) => clip(x, 40))
    .join(', ')
  return names.length > n ? `${shown} and ${names.length - n} more` : shown
}

/**
 * Read the visible Wafers, Chips and Arrays sheets (names matched case-insensitively), streamed
 * (exceljs's WorkbookReader: the workbook is never held as cell objects). Every other sheet, and a
 * hidden sheet even when it bears one of those names (its rows are not on screen for whoever checks
 * the file), is left unread with one warning.
 */
export async function readImportSheets(
  book: LoadedWorkbook,
  limits: Partial<ImportLimits> = {},
): Promise<{ sheets: ReadSheet[]; fileMessages: ImportMessage[] }> {
  const { maxRows } = { ...IMPORT_LIMITS, ...limits }
  const read = new Map<ImportSheetName, ReadSheet>()
  const all: { name: string; isHidden: boolean; isRead: boolean }[] = []
  try {
    const reader = new ExcelJS.stream.xlsx.WorkbookReader(Readable.from(orderedPackage(book.buffer)), {
      sharedStrings: 'cache',
      styles: 'cache',
      hyperlinks: 'ignore',
      worksheets: 'emit',
      entries: 'ignore',
    })
    for await (const ws of reader) {
      const sheet = ws as unknown as AsyncIterable<ExcelJS.Row> & { name: string; state?: string }
      const isHidden = sheet.state === 'hidden' || sheet.state === 'veryHidden'
      const name = IMPORT_SHEETS.find((n) => n.toLowerCase() === sheet.name.trim().toLowerCase() && !read.has(n))
      all.push({ name: sheet.name, isHidden, isRead: !!name && !isHidden })
      if (name && !isHidden) read.set(name, await readSheet(name, sheet, maxRows))
      else
        for await (const _ of sheet) {
          /* not read: drained so the next sheet comes */
        }
    }
  } catch (e) {
    if ((e as { status?: number }).status) throw e
    throw damaged()
  }
  const sheets = IMPORT_SHEETS.map(
    (name) => read.get(name) ?? { name, isPresent: false, messages: [], rows: [], columns: new Set<string>() },
  )
  const fileMessages: ImportMessage[] = []
  const hidden = all.filter(
    (w) => w.isHidden && IMPORT_SHEETS.some((n) => w.name.trim().toLowerCase() === n.toLowerCase()),
  )
  for (const w of hidden)
    fileMessages.push({
      column: null,
      message: `The sheet ${w.name} is hidden in Excel and was not read: unhide it (right-click a sheet tab → Unhide) to import its rows`,
      level: 'warning',
    })
  const others = all
    .filter((w) => !w.isRead && !hidden.includes(w))
    .map((w) => (w.isHidden ? `${w.name} (hidden)` : w.name))
  if (others.length && sheets.some((s) => s.isPresent))
    fileMessages.push({
      column: null,
      message: `Sheets not read (only Wafers, Chips and Arrays are imported): ${listOf(others)}`,
      level: 'warning',
    })
  if (!sheets.some((s) => s.isPresent)) {
    fileMessages.push(
      err(
        null,
        `The workbook has no sheet named Wafers, Chips or Arrays (it has: ${listOf(all.map((w) => (w.isHidden ? `${w.name} (hidden)` : w.name))) || 'no sheets'}). Start from the template.`,
      ),
    )
  }
  return { sheets, fileMessages }
}
