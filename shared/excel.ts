/**
 * API shapes of the Excel export and import (/api/excel). Dates are ISO strings.
 */

/** Where an export job is: counting rows, writing one sheet, done (file ready) or failed. */
export const EXPORT_PHASES = ['queued', 'counting', 'About', 'Materials', 'Wafers', 'Chips', 'Arrays', 'Sessions', 'Locations', 'done', 'failed'] as const
export type ExportPhase = (typeof EXPORT_PHASES)[number]

export interface ExportJob {
  id: string
  phase: ExportPhase
  /** Rows written so far, over all sheets, and the rows to write (counted when the job starts). */
  done: number
  total: number
  startedAt: string
  finishedAt: string | null
  /** File name of the finished workbook (inventory-YYYYMMDD-HHmm.xlsx). */
  fileName: string
  sizeBytes: number | null
  error: string | null
}

/** The sheets the importer reads, in the order they are checked. */
export const IMPORT_SHEETS = ['Wafers', 'Chips', 'Arrays'] as const
export type ImportSheetName = (typeof IMPORT_SHEETS)[number]

export interface ImportMessage {
  /** The column header the message is about (null: the row or sheet as a whole). */
  column: string | null
  message: string
  level: 'error' | 'warning'
}

export interface ImportRowReport {
  sheet: ImportSheetName
  /** Row number as Excel shows it (the header is row 1). */
  row: number
  /** create: would be (or was) created; error: something is wrong; skip: example or retired row. */
  status: 'create' | 'error' | 'skip'
  /** The row's own key in the file (Ref / Code column), used by the rows that refer to it. */
  ref: string | null
  /** The code the record would get (preview in a dry run; final after the import). */
  code: string | null
  /** One line describing the record, e.g. "GaAs (001), lot KX-1, 50.8 mm". */
  summary: string
  messages: ImportMessage[]
}

export interface ImportSheetReport {
  name: ImportSheetName
  isPresent: boolean
  rows: number
  create: number
  errors: number
  skipped: number
  /** Sheet-level messages: missing or unknown columns, too many rows. */
  messages: ImportMessage[]
}

export interface ImportReport {
  dryRun: boolean
  fileName: string
  /** Workbook-level problems (no known sheet at all …). */
  fileMessages: ImportMessage[]
  sheets: ImportSheetReport[]
  rows: ImportRowReport[]
  createCount: number
  errorCount: number
  /** True only after a successful import (dryRun=false, no errors, transaction committed). */
  imported: boolean
  created: { wafers: { id: number; code: string }[]; chips: number; arrays: number } | null
}
