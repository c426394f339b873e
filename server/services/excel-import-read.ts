import ExcelJS from 'exceljs'
import { fieldError } from '../errors'
import { ZIP_LIMITS, ZipRefusal, checkZip } from './zip-guard'
import { IMPORT_SHEETS, type ImportMessage, type ImportSheetName } from '../../shared/excel'
import { EXPORT_ONLY, IMPORT_COLUMNS, dimensionColumn, dimensionKey, matchesColumn, normHeader, type ColumnSpec } from './excel-columns'
import { unguardText } from './excel-style'

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
export const IMPORT_LIMITS: ImportLimits = { maxExpandedBytes: ZIP_LIMITS.maxBytes, maxParts: ZIP_LIMITS.maxEntries, maxRows: 100_000 }
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
  name: ImportSheetName; isPresent: boolean; messages: ImportMessage[]; rows: ReadRow[]
  /** Keys of the columns the sheet has (a record updated from a sheet without a column keeps that field). */
  columns: Set<string>
}

/** Load the workbook, or a 400 on `file` when the bytes are not an .xlsx. */
export async function loadWorkbook(buf: Buffer | undefined, limits: Partial<ImportLimits> = {}): Promise<ExcelJS.Workbook> {
  const { maxExpandedBytes, maxParts } = { ...IMPORT_LIMITS, ...limits }
  if (!buf) throw fieldError('file', 'Choose an .xlsx file to upload')
  if (buf.length === 0) throw fieldError('file', `${NOT_XLSX}: the file is empty`)
  if (buf.subarray(0, 4).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0]))) {
    // Excel saves a password-protected .xlsx inside the same container as an old .xls.
    if (buf.includes(Buffer.from('EncryptedPackage', 'utf16le'))) throw fieldError('file', 'The workbook is protected by a password: remove the password in Excel (File → Info → Protect Workbook), save, and upload again')
    throw fieldError('file', `${NOT_XLSX}: it is an old .xls workbook; save it as .xlsx in Excel first`)
  }
  if (!buf.subarray(0, 4).equals(Buffer.from([0x50, 0x4b, 0x03, 0x04]))) throw fieldError('file', `${NOT_XLSX} (its content is not a ZIP-packed workbook)`)
  try {
    await checkZip(buf, { maxBytes: maxExpandedBytes, maxEntries: maxParts })
  } catch (e) {
    if (!(e instanceof ZipRefusal)) throw e
    if (e.problem === 'too-big') throw fieldError('file', e.message)
    if (e.problem === 'too-many') throw fieldError('file', `The workbook is packed from ${e.message}; at most ${maxParts.toLocaleString('en')} can be read: it is not a workbook as Excel saves it`)
    throw fieldError('file', `${NOT_XLSX}, or it is damaged (${e.message})`)
  }
  const book = new ExcelJS.Workbook()
  try {
    await book.xlsx.load(buf as unknown as ArrayBuffer)
  } catch {
    throw fieldError('file', `${NOT_XLSX}, or it is damaged (it could not be opened as a workbook)`)
  }
  return book
}

type Plain = string | number | boolean | Date | null
/** The plain value of a cell: formulas by their saved result, rich text and links as text. */
function plainValue(v: ExcelJS.CellValue): { value: Plain; error?: string } {
  if (v === null || v === undefined) return { value: null }
  if (typeof v === 'string') { const t = unguardText(v).trim(); return { value: t === '' ? null : t } }
  // A number in a date-formatted cell that no calendar date matches (e.g. 1E+20) reads as an invalid Date.
  if (v instanceof Date) return Number.isNaN(v.getTime()) ? { value: null, error: 'the cell is formatted as a date but its number is not a date Excel can show' } : { value: v }
  if (typeof v === 'number' || typeof v === 'boolean') return { value: v }
  if ('formula' in v || 'sharedFormula' in v) {
    const result = (v as { result?: unknown }).result
    // exceljs also drops a saved result that is empty text (=IF(A2="","",…)): say so, as re-saving will not help then.
    if (result === undefined || result === null) return { value: null, error: 'formula without a value (Excel did not save its result, or the result is empty text): type the value or clear the cell, or open and save the file in Excel' }
    return plainValue(result as ExcelJS.CellValue)
  }
  if ('error' in v) return { value: null, error: `the cell holds the error ${v.error}` }
  if ('richText' in v) return plainValue(v.richText.map((t) => t.text).join(''))
  if ('text' in v) return plainValue((v as { text: ExcelJS.CellValue }).text)
  return { value: null, error: 'this kind of cell cannot be read' }
}

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i
const clip = (s: string, n = 30) => (s.length > n ? s.slice(0, n) + '…' : s)
const describe = (v: Plain) => (typeof v === 'string' ? `text "${clip(v)}"` : v instanceof Date ? 'a date' : typeof v === 'boolean' ? `TRUE/FALSE` : String(v))
/** YYYY-MM-DD of a date cell, or null outside the years Excel shows (1900–9999). */
const isoDay = (d: Date) => (d.getUTCFullYear() >= 1900 && d.getUTCFullYear() <= 9999 ? d.toISOString().slice(0, 10) : null)
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
      const n = typeof v === 'number' ? v : typeof v === 'string' && NUMBER_TEXT.test(v.replace(',', '.')) ? Number(v.replace(',', '.')) : NaN
      if (!Number.isFinite(n)) return { value: null, error: `expected a number${unit ? ` in ${unit}` : ''}, found ${describe(v)}` }
      if (spec.kind === 'integer' && !Number.isInteger(n)) return { value: null, error: `expected a whole number, found ${n}` }
      return { value: n }
    }
    case 'date': {
      if (v instanceof Date) return isoDay(v) ? { value: isoDay(v) } : { value: null, error: `expected a date, found ${OUT_OF_RANGE}` }
      if (typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(v))) return { value: v }
      return { value: null, error: `expected a date (a date cell or YYYY-MM-DD), found ${describe(v)}` }
    }
    case 'vector': {
      const parts = typeof v === 'string' ? v.split(/[\s,;[\]()]+/).filter(Boolean) : []
      if (parts.length !== 3 || !parts.every((p) => NUMBER_TEXT.test(p))) return { value: null, error: `expected three numbers such as 0 0 1, found ${describe(v)}` }
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
      if (typeof v === 'string' && v.length > MAX_TEXT) return { value: null, error: `the text has ${v.length.toLocaleString('en')} characters; at most ${MAX_TEXT.toLocaleString('en')} are read` }
      if (v instanceof Date) return isoDay(v) ? { value: isoDay(v) } : { value: null, error: `expected text, found a date cell and ${OUT_OF_RANGE}` }
      return { value: String(v) }
  }
}

const err = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'error' })

/** Read one sheet: header mapping (missing/unknown columns once per sheet), then every non-empty row. */
function readSheet(name: ImportSheetName, ws: ExcelJS.Worksheet | undefined, maxRows: number): ReadSheet {
  const out: ReadSheet = { name, isPresent: !!ws, messages: [], rows: [], columns: new Set() }
  if (!ws) return out
  const specs = IMPORT_COLUMNS[name]
  const byCol = new Map<number, ColumnSpec>()
  const unknown: string[] = []
  let retiredCol = 0
  ws.getRow(1).eachCell((cell, col) => {
    const header = String(plainValue(cell.value).value ?? '').trim()
    if (!header) return
    const dim = name === 'Arrays' && !specs.some((s) => matchesColumn(s, header)) ? dimensionKey(header) : null
    const spec = dim ? ([...byCol.values()].find((s) => s.key === `dim:${dim}`) ?? dimensionColumn(dim)) : specs.find((s) => matchesColumn(s, header))
    if (spec && [...byCol.values()].includes(spec)) out.messages.push(err(header, `The column ${spec.header} appears twice`))
    else if (spec) byCol.set(col, spec)
    else if (normHeader(header) === 'retired(utc)') retiredCol = col
    else if (!EXPORT_ONLY[name].test(normHeader(header))) unknown.push(header)
  })
  for (const spec of byCol.values()) out.columns.add(spec.key)
  if (unknown.length) out.messages.push({ column: null, message: `Unknown column(s) ignored: ${listOf(unknown)}`, level: 'warning' })
  const missing = specs.filter((s) => s.isRequired && ![...byCol.values()].includes(s))
  for (const s of missing) out.messages.push(err(s.header, `The required column ${s.header} is missing`))
  // Rows holding a value: formatted but empty rows (a format dragged down the sheet), and rows of
  // blank text only, do not count.
  let dataRows = 0
  ws.eachRow((row, n) => {
    if (n > 1 && (row.values as ExcelJS.CellValue[]).some((v) => { const p = plainValue(v); return p.value !== null || !!p.error })) dataRows++
  })
  if (dataRows > maxRows) out.messages.push(err(null, `The sheet has ${dataRows.toLocaleString('en')} rows; at most ${maxRows.toLocaleString('en')} can be imported at once: split the file`))
  if (missing.length || out.messages.some((m) => m.level === 'error')) return out

  ws.eachRow({ includeEmpty: false }, (row, rowNumber) => {
    if (rowNumber === 1) return
    const r: ReadRow = { row: rowNumber, values: {}, messages: [], skip: null }
    let hasValue = false
    for (const [col, spec] of byCol) {
      const p = plainValue(row.getCell(col).value)
      if (p.error) { r.messages.push(err(spec.header, p.error)); hasValue = true; continue }
      if (p.value !== null) hasValue = true
      const t = typed(spec, p.value)
      if (t.error) r.messages.push(err(spec.header, t.error))
      r.values[spec.key] = t.value
    }
    if (!hasValue) return
    for (const spec of byCol.values()) {
      if (spec.isRequired && r.values[spec.key] == null && !r.messages.some((m) => m.column === spec.header)) r.messages.push(err(spec.header, `${spec.header} is required`))
    }
    const first = plainValue(row.getCell(1).value).value
    if (typeof first === 'string' && first.toUpperCase() === 'EXAMPLE') {
      // The template's example rows: skipped, and not checked (their messages would only confuse).
      r.skip = 'Example row (first cell EXAMPLE): skipped'
      r.skipKind = 'example'
      r.messages = []
    } else if (r.values.status === 'retired') { r.skip = 'Retired record: not imported'; r.skipKind = 'retired' }
    else if (retiredCol && plainValue(row.getCell(retiredCol).value).value !== null) { r.skip = 'Retired array: not imported'; r.skipKind = 'retired' }
    out.rows.push(r)
  })
  return out
}

/** "a, b, c" of at most `n` names, then "and N more". */
function listOf(names: string[], n = 10): string {
  const shown = names.slice(0, n).map((x) => clip(x, 40)).join(', ')
  return names.length > n ? `${shown} and ${names.length - n} more` : shown
}

/**
 * Read the visible Wafers, Chips and Arrays sheets (names matched case-insensitively). Every other
 * sheet, and a hidden sheet even when it bears one of those names (its rows are not on screen for
 * whoever checks the file), is left unread with one warning.
 */
export function readImportSheets(book: ExcelJS.Workbook, limits: Partial<ImportLimits> = {}): { sheets: ReadSheet[]; fileMessages: ImportMessage[] } {
  const { maxRows } = { ...IMPORT_LIMITS, ...limits }
  const isHidden = (w: ExcelJS.Worksheet) => w.state === 'hidden' || w.state === 'veryHidden'
  const used = new Set<ExcelJS.Worksheet>()
  const find = (name: string) => {
    const ws = book.worksheets.find((w) => !isHidden(w) && !used.has(w) && w.name.trim().toLowerCase() === name.toLowerCase())
    if (ws) used.add(ws)
    return ws
  }
  const sheets = IMPORT_SHEETS.map((name) => readSheet(name, find(name), maxRows))
  const fileMessages: ImportMessage[] = []
  const hidden = book.worksheets.filter((w) => isHidden(w) && IMPORT_SHEETS.some((n) => w.name.trim().toLowerCase() === n.toLowerCase()))
  for (const w of hidden) fileMessages.push({ column: null, message: `The sheet ${w.name} is hidden in Excel and was not read: unhide it (right-click a sheet tab → Unhide) to import its rows`, level: 'warning' })
  const others = book.worksheets.filter((w) => !used.has(w) && !hidden.includes(w)).map((w) => (isHidden(w) ? `${w.name} (hidden)` : w.name))
  if (others.length && sheets.some((s) => s.isPresent)) fileMessages.push({ column: null, message: `Sheets not read (only Wafers, Chips and Arrays are imported): ${listOf(others)}`, level: 'warning' })
  if (!sheets.some((s) => s.isPresent)) {
    fileMessages.push(err(null, `The workbook has no sheet named Wafers, Chips or Arrays (it has: ${listOf(book.worksheets.map((w) => (isHidden(w) ? `${w.name} (hidden)` : w.name))) || 'no sheets'}). Start from the template.`))
  }
  return { sheets, fileMessages }
}
