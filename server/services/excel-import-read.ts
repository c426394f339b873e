import ExcelJS from 'exceljs'
import { fieldError } from '../errors'
import { IMPORT_SHEETS, type ImportMessage, type ImportSheetName } from '../../shared/excel'
import { EXPORT_ONLY, IMPORT_COLUMNS, matchesColumn, normHeader, type ColumnSpec } from './excel-columns'

/**
 * Reading an uploaded workbook: check it IS an .xlsx (ZIP magic bytes, then exceljs must load it),
 * map each sheet's header row to the known columns, and turn every cell into a typed value or a
 * message naming the column. Rules: a formula counts by its saved result (none saved: error);
 * text in a number column is an error (a number typed as text, "12.5", is accepted).
 */
export const MAX_ROWS = 100_000
const NOT_XLSX = 'This is not an Excel .xlsx file'

export type CellOut = string | number | null
export interface ReadRow {
  row: number
  values: Record<string, CellOut>
  messages: ImportMessage[]
  /** First cell is EXAMPLE (template example) or the row marks a retired record. */
  skip: string | null
}
export interface ReadSheet { name: ImportSheetName; isPresent: boolean; messages: ImportMessage[]; rows: ReadRow[] }

/** Load the workbook, or a 400 on `file` when the bytes are not an .xlsx. */
export async function loadWorkbook(buf: Buffer | undefined): Promise<ExcelJS.Workbook> {
  if (!buf) throw fieldError('file', 'Choose an .xlsx file to upload')
  if (buf.length === 0) throw fieldError('file', `${NOT_XLSX}: the file is empty`)
  if (buf.subarray(0, 4).equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0]))) throw fieldError('file', `${NOT_XLSX}: it is an old .xls workbook; save it as .xlsx in Excel first`)
  if (!buf.subarray(0, 4).equals(Buffer.from([0x50, 0x4b, 0x03, 0x04]))) throw fieldError('file', `${NOT_XLSX} (its content is not a ZIP-packed workbook)`)
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
  if (typeof v === 'string') return { value: v.trim() === '' ? null : v.trim() }
  if (typeof v === 'number' || typeof v === 'boolean' || v instanceof Date) return { value: v }
  if ('formula' in v || 'sharedFormula' in v) {
    const result = (v as { result?: unknown }).result
    if (result === undefined || result === null) return { value: null, error: 'formula without a value (Excel did not save its result): type the value, or open and save the file in Excel' }
    return plainValue(result as ExcelJS.CellValue)
  }
  if ('error' in v) return { value: null, error: `the cell holds the error ${v.error}` }
  if ('richText' in v) return plainValue(v.richText.map((t) => t.text).join(''))
  if ('text' in v) return plainValue((v as { text: ExcelJS.CellValue }).text)
  return { value: null, error: 'this kind of cell cannot be read' }
}

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i
const describe = (v: Plain) => (typeof v === 'string' ? `text "${v.length > 30 ? v.slice(0, 30) + '…' : v}"` : v instanceof Date ? 'a date' : typeof v === 'boolean' ? `TRUE/FALSE` : String(v))

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
      if (v instanceof Date) return { value: v.toISOString().slice(0, 10) }
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
      if (!hit) return { value: null, error: `"${String(v)}" is not one of: ${spec.values!.join(', ')}` }
      return { value: hit }
    }
    default:
      if (typeof v === 'boolean') return { value: null, error: `expected text, found ${describe(v)}` }
      return { value: v instanceof Date ? v.toISOString().slice(0, 10) : String(v) }
  }
}

const err = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'error' })

/** Read one sheet: header mapping (missing/unknown columns once per sheet), then every non-empty row. */
function readSheet(name: ImportSheetName, ws: ExcelJS.Worksheet | undefined): ReadSheet {
  const out: ReadSheet = { name, isPresent: !!ws, messages: [], rows: [] }
  if (!ws) return out
  const specs = IMPORT_COLUMNS[name]
  const byCol = new Map<number, ColumnSpec>()
  const unknown: string[] = []
  let retiredCol = 0
  ws.getRow(1).eachCell((cell, col) => {
    const header = String(plainValue(cell.value).value ?? '').trim()
    if (!header) return
    const spec = specs.find((s) => matchesColumn(s, header))
    if (spec && [...byCol.values()].includes(spec)) out.messages.push(err(header, `The column ${spec.header} appears twice`))
    else if (spec) byCol.set(col, spec)
    else if (normHeader(header) === 'retired(utc)') retiredCol = col
    else if (!EXPORT_ONLY[name].test(normHeader(header))) unknown.push(header)
  })
  if (unknown.length) out.messages.push({ column: null, message: `Unknown column(s) ignored: ${unknown.join(', ')}`, level: 'warning' })
  const missing = specs.filter((s) => s.isRequired && ![...byCol.values()].includes(s))
  for (const s of missing) out.messages.push(err(s.header, `The required column ${s.header} is missing`))
  if (ws.actualRowCount - 1 > MAX_ROWS) out.messages.push(err(null, `The sheet has ${ws.actualRowCount - 1} rows; at most ${MAX_ROWS.toLocaleString('en')} can be imported at once: split the file`))
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
    if (typeof first === 'string' && first.toUpperCase() === 'EXAMPLE') r.skip = 'Example row (first cell EXAMPLE): skipped'
    else if (r.values.status === 'retired') r.skip = 'Retired record: not imported'
    else if (retiredCol && plainValue(row.getCell(retiredCol).value).value !== null) r.skip = 'Retired array: not imported'
    out.rows.push(r)
  })
  return out
}

/** Read the Wafers, Chips and Arrays sheets (names matched case-insensitively). */
export function readImportSheets(book: ExcelJS.Workbook): { sheets: ReadSheet[]; fileMessages: ImportMessage[] } {
  const find = (name: string) => book.worksheets.find((w) => w.name.trim().toLowerCase() === name.toLowerCase())
  const sheets = IMPORT_SHEETS.map((name) => readSheet(name, find(name)))
  const fileMessages: ImportMessage[] = []
  if (!sheets.some((s) => s.isPresent)) {
    fileMessages.push(err(null, `The workbook has no sheet named Wafers, Chips or Arrays (it has: ${book.worksheets.map((w) => w.name).join(', ') || 'no sheets'}). Start from the template.`))
  }
  return { sheets, fileMessages }
}
