/**
 * API shapes of the Excel export and import (/api/excel). Dates are ISO strings.
 */

/** Where an export job is: counting rows, writing one sheet, done (file ready) or failed. */
export const EXPORT_PHASES = [
  'queued',
  'counting',
  'About',
  'Materials',
  'Wafers',
  'Chips',
  'Arrays',
  'Sessions',
  'Locations',
  'Fabrication',
  'Laser setups',
  'Moves',
  'Files',
  'done',
  'failed',
] as const
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

/**
 * What a row does: create a record (no Code, or your own key), update the record its Code names,
 * leave it unchanged, conflict (the record changed in Overtone after the export the row comes from:
 * never written until resolved), error, or skip (example rows, retired rows without a record).
 */
export type ImportRowStatus = 'create' | 'update' | 'unchanged' | 'conflict' | 'error' | 'skip'

/** Counts of rows by what the import does with them (skipped rows are counted apart). */
export interface ImportSummary {
  create: number
  update: number
  unchanged: number
  conflict: number
  error: number
}

/** One field of an update or conflict: the record as it is in Overtone now, and the file's value. */
export interface ImportFieldChange {
  column: string
  before: string | number | null
  after: string | number | null
}

export interface ImportRowReport {
  sheet: ImportSheetName
  /** Row number as Excel shows it (the header is row 1). */
  row: number
  status: ImportRowStatus
  /** The row's own key in the file (Code column), used by the rows that refer to it. */
  ref: string | null
  /**
   * The record's code: the existing one, or the one a new record would get (preview in a dry run; final after the
   * import).
   */
  code: string | null
  /** One line describing the record, e.g. "GaAs (001), lot KX-1, 50.8 mm". */
  summary: string
  messages: ImportMessage[]
  /** update: the fields that change; conflict: the fields where the file and the record differ. */
  changes: ImportFieldChange[]
  /** conflict: the version the file was exported at and the record's version now (UTC ISO). */
  versions?: { file: string | null; current: string }
}

export interface ImportSheetReport {
  name: ImportSheetName
  isPresent: boolean
  rows: number
  summary: ImportSummary
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
  /** Over all sheets. */
  summary: ImportSummary
  /** Errors of rows, sheets and the file; conflicts are counted in summary.conflict. Either blocks the import. */
  errorCount: number
  /**
   * Fingerprint of what the import would do (every row's status and changes, not the preview codes
   * of new records). The import is sent with the dry run's value and refused (409) if the file or
   * the records changed in between, so it applies exactly what the dry run showed.
   */
  planHash: string
  /** True only after a successful import (dryRun=false, no errors or conflicts, transaction committed). */
  imported: boolean
  created: { wafers: { id: number; code: string }[]; chips: number; arrays: number } | null
  updated: { wafers: number; chips: number; arrays: number } | null
}

/** Can this dry run be imported, and how many records would it write? */
export function importableCount(r: Pick<ImportReport, 'summary' | 'errorCount'>): number {
  return r.errorCount > 0 || r.summary.conflict > 0 ? 0 : r.summary.create + r.summary.update
}
