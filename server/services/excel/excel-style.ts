import type ExcelJS from 'exceljs'

/**
 * Look of every Overtone sheet: a bold header row on a tinted fill, frozen (it stays while
 * scrolling), an auto-filter over the header, set column widths, and date columns with a date
 * format. Works on a normal Workbook and on the streaming WorkbookWriter alike.
 */
export interface SheetColumn {
  header: string
  key: string
  width: number
  /** Excel number format, e.g. DATE_FMT for Date cells. */
  numFmt?: string
}

export const DATE_FMT = 'yyyy-mm-dd'
export const DATE_TIME_FMT = 'yyyy-mm-dd hh:mm'
export const XLSX_MIME = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet'

const HEADER_FILL: ExcelJS.Fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FF1F3A5F' } }
const HEADER_FONT: Partial<ExcelJS.Font> = { bold: true, color: { argb: 'FFFFFFFF' } }

type AnyBook = Pick<ExcelJS.Workbook, 'addWorksheet'>

/** Excel column letters of a 1-based index (1 → A, 27 → AA). */
export function columnLetter(n: number): string {
  let s = ''
  for (let k = n; k > 0; k = Math.floor((k - 1) / 26)) s = String.fromCharCode(65 + ((k - 1) % 26)) + s
  return s
}

/** Add a sheet with the header row styled, frozen and filtered (the header row is committed when streaming). */
export function addStyledSheet(book: AnyBook, name: string, columns: SheetColumn[]): ExcelJS.Worksheet {
  const ws = book.addWorksheet(name, { views: [{ state: 'frozen', ySplit: 1, xSplit: 0 }] })
  ws.columns = columns.map((c) => ({
    header: c.header,
    key: c.key,
    width: c.width,
    style: c.numFmt ? { numFmt: c.numFmt } : {},
  }))
  ws.autoFilter = `A1:${columnLetter(columns.length)}1`
  const header = ws.getRow(1)
  header.height = 20
  header.eachCell((cell) => {
    cell.font = HEADER_FONT
    cell.fill = HEADER_FILL
    cell.alignment = { vertical: 'middle' }
    cell.numFmt = 'General'
  })
  const maybeCommit = header as ExcelJS.Row & { commit?: () => void }
  if (typeof maybeCommit.commit === 'function' && 'commit' in ws) maybeCommit.commit()
  return ws
}

/** A `YYYY-MM-DD` date as a Date at midnight UTC (Excel has no time zone; Overtone writes UTC). */
export const dateOnly = (s: string | null | undefined): Date | null => (s ? new Date(`${s}T00:00:00Z`) : null)

/** A vector as the text the importer reads back: "0 0 1". */
export const vectorText = (v: readonly number[] | null | undefined) => (v ? v.join(' ') : '')

type StyleModel = Partial<ExcelJS.Style> | undefined
interface StyleRegistry {
  addStyleModel(model: StyleModel, cellType?: number): number
}

/**
 * Speed up style lookups of a streaming WorkbookWriter (`useStyles: true`); the styles written stay
 * the same. exceljs gives every new cell a fresh style object copied from its column, and registers
 * it by rendering it to XML and looking the text up, unless it has seen that very object before,
 * which it never has: that lookup was a third of a large export's time. A cell whose style is
 * "plain" (at most a number format, as every data cell of an export is) gets a style id that
 * depends on nothing but that format and the cell's value type, so remember the id per (format,
 * type) after the first lookup. Any other style (fonts, fills, …) goes through exceljs unchanged.
 */
export function rememberPlainStyles(book: object): void {
  const registry = (book as { styles?: Partial<StyleRegistry> }).styles
  const lookup = registry?.addStyleModel
  if (!registry || typeof lookup !== 'function') return
  const ids = new Map<string, number>()
  registry.addStyleModel = function (model: StyleModel, cellType?: number): number {
    if (!model) return lookup.call(this, model, cellType)
    for (const k in model) if (k !== 'numFmt') return lookup.call(this, model, cellType)
    const key = `${model.numFmt ?? ''}\u0000${cellType ?? ''}`
    let id = ids.get(key)
    if (id === undefined) ids.set(key, (id = lookup.call(this, model, cellType)))
    return id
  }
}

/**
 * Text that a spreadsheet program could take for a formula once the workbook is saved as CSV and
 * opened again: it begins with =, +, - or @ (or a tab / carriage return, which some programs strip
 * before looking). Such text is written with a leading apostrophe, the usual defence against
 * formula injection (OWASP, "CSV Injection"), so it stays text in any program; the importer takes
 * that one apostrophe off again (`unguardText`), so a round trip leaves the value unchanged.
 */
const FORMULA_START = /^[=+\-@\t\r]/
export const guardText = (s: string): string => (FORMULA_START.test(s) ? `'${s}` : s)
/** The text as it was before `guardText`. */
export const unguardText = (s: string): string =>
  s.length > 1 && s.charCodeAt(0) === 39 && FORMULA_START.test(s.slice(1)) ? s.slice(1) : s

/** Add a row of values, with every text guarded against formula injection, and commit it when streaming. */
export function addSafeRow(ws: ExcelJS.Worksheet, values: Record<string, unknown>): ExcelJS.Row {
  const safe: Record<string, unknown> = {}
  for (const k in values) {
    const v = values[k]
    safe[k] = typeof v === 'string' ? guardText(v) : v
  }
  const row = ws.addRow(safe)
  ;(row as ExcelJS.Row & { commit?: () => void }).commit?.()
  return row
}
