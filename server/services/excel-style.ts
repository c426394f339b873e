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
  ws.columns = columns.map((c) => ({ header: c.header, key: c.key, width: c.width, style: c.numFmt ? { numFmt: c.numFmt } : {} }))
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
