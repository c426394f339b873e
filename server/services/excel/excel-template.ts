import ExcelJS from 'exceljs'
import { asc, isNull } from 'drizzle-orm'
import { materials } from '../../db/schema/index'
import type { Db } from '../../db/client'
import { FORM_DIMENSIONS, IMPORT_COLUMNS, dimensionColumn, type ColumnSpec } from './excel-columns'
import { DATE_FMT, addStyledSheet, columnLetter } from './excel-style'
import { IMPORT_SHEETS } from '../../../shared/excel'

/**
 * The import template: an Instructions sheet, then Wafers, Chips and Arrays with the header row
 * (each header cell carries a comment with the meaning and unit), drop-down lists for materials,
 * statuses, shapes and lattices, and ONE example row per sheet whose first cell is "EXAMPLE" —
 * the importer skips such rows, so the example may stay in the file. A hidden Lists sheet holds
 * the material names for the drop-down.
 */
const LIST_ROWS = 2000

const INSTRUCTIONS = [
  'How to fill this workbook',
  '1. Wafers: one row per wafer. "Code" is empty or your own key for the row (e.g. W1, or the code from the old spreadsheet); Overtone gives each new wafer a code W-NNNN.',
  '2. Chips: one row per chip. "Wafer" is a Code from the Wafers sheet (W1), or the code of a wafer already in Overtone (e.g. W-0003) to add chips to it.',
  '3. Arrays: one row per nanostructure array. "Chip" is a Code from the Chips sheet, or the code of a chip already in Overtone (e.g. C-0003-02). Fill the dimension columns (nm) the shape has, as in the array form.',
  'Updating: export the inventory, change cells, and import that workbook again. A row whose Code is an Overtone code updates that record; the dry run shows every change (before → after), and a row whose record was changed in Overtone after the export is a conflict and is not written.',
  'Rows whose first cell is EXAMPLE are skipped. Rows with status "retired" are skipped. Empty rows are ignored.',
  'Units are in the column headers; hover a header to read what it means. Dates: a date cell or text YYYY-MM-DD. Directions: three numbers, e.g. 0 0 1.',
  'Formulas are allowed only where Excel saved their result. Text in a number column is an error.',
  'Upload the file under Admin → Export & import: a dry run checks every row first; the import runs only when there is no error, all rows in one go.',
]

function addSheet(book: ExcelJS.Workbook, name: string, cols: ColumnSpec[], materialCount: number) {
  const ws = addStyledSheet(
    book,
    name,
    cols.map((c) => ({
      header: c.header,
      key: c.key,
      width: c.width,
      numFmt: c.kind === 'date' ? DATE_FMT : undefined,
    })),
  )
  // exceljs has worksheet.dataValidations (address may be a range) but its typings lack it.
  const validations = (ws as unknown as { dataValidations: { add(address: string, v: ExcelJS.DataValidation): void } })
    .dataValidations
  cols.forEach((c, i) => {
    ws.getRow(1).getCell(i + 1).note = `${c.isRequired ? 'Required. ' : ''}${c.note}`
    const range = `${columnLetter(i + 1)}2:${columnLetter(i + 1)}${LIST_ROWS}`
    if (c.values) {
      validations.add(range, {
        type: 'list',
        allowBlank: !c.isRequired,
        formulae: [`"${c.values.join(',')}"`],
        showErrorMessage: true,
        errorTitle: c.header,
        error: `Pick one of: ${c.values.join(', ')}`,
      })
    } else if (c.key === 'material' && materialCount > 0) {
      validations.add(range, {
        type: 'list',
        allowBlank: false,
        formulae: [`Lists!$A$2:$A$${materialCount + 1}`],
        showErrorMessage: true,
        errorTitle: 'Material',
        error: 'Pick a material registered in Overtone',
      })
    } else if (c.kind === 'number' || c.kind === 'integer') {
      validations.add(range, {
        type: c.kind === 'integer' ? 'whole' : 'decimal',
        operator: 'between',
        allowBlank: true,
        formulae: [-1e9, 1e9],
        showErrorMessage: true,
        errorTitle: c.header,
        error: 'Enter a number',
      })
    }
  })
  const example = ws.addRow(Object.fromEntries(cols.map((c) => [c.key, c.example])))
  example.font = { italic: true, color: { argb: 'FF7A7A7A' } }
  return ws
}

/**
 * The template's columns: the form's fields (no Version, which only an export writes, and no old
 * text column of dimensions); on Arrays one numeric column per dimension the array form asks for,
 * over all shapes, after Shape.
 */
function templateColumns(name: (typeof IMPORT_SHEETS)[number]): ColumnSpec[] {
  const cols = IMPORT_COLUMNS[name].filter((c) => c.inTemplate !== false && !c.isLegacy)
  if (name !== 'Arrays') return cols
  const at = cols.findIndex((c) => c.key === 'shape') + 1
  return [
    ...cols.slice(0, at),
    ...FORM_DIMENSIONS.map((k) => dimensionColumn(k, k === 'diameterNm' ? 450 : null)),
    ...cols.slice(at),
  ]
}

/** Build the template workbook (material names from the database for the drop-down). */
export async function buildTemplate(db: Db): Promise<Buffer> {
  const names = (
    await db
      .select({ name: materials.name })
      .from(materials)
      .where(isNull(materials.retiredAt))
      .orderBy(asc(materials.name))
  ).map((m) => m.name)
  const book = new ExcelJS.Workbook()
  book.creator = 'Overtone'
  book.created = new Date()
  const info = book.addWorksheet('Instructions')
  info.getColumn(1).width = 120
  INSTRUCTIONS.forEach((line, i) => {
    const cell = info.getCell(i + 1, 1)
    cell.value = line
    cell.alignment = { wrapText: true }
    if (i === 0) cell.font = { bold: true, size: 14 }
  })
  for (const name of IMPORT_SHEETS) addSheet(book, name, templateColumns(name), names.length)
  const lists = book.addWorksheet('Lists', { state: 'hidden' })
  lists.getCell('A1').value = 'Materials'
  names.forEach((n, i) => {
    lists.getCell(i + 2, 1).value = n
  })
  return Buffer.from(await book.xlsx.writeBuffer())
}
