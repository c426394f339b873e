import { CHIP_STATUSES, LATTICES, SHAPES, WAFER_STATUSES } from '../../shared/schemas/records'
import type { ImportSheetName } from '../../shared/excel'

/**
 * Columns of the importable sheets (Wafers, Chips, Arrays). One table drives the template (headers,
 * notes, lists), the importer (header matching, cell types) and the first columns of the export, so
 * an exported workbook can be imported again. Headers match case- and space-insensitively, with or
 * without the unit in brackets ("diameter" matches "Diameter (mm)").
 */
export type CellKind = 'text' | 'number' | 'integer' | 'date' | 'vector' | 'list'

export interface ColumnSpec {
  /** Key in the parsed row. */
  key: string
  header: string
  aliases?: string[]
  kind: CellKind
  isRequired?: boolean
  /** Allowed values of a list column (also the template's drop-down). */
  values?: readonly string[]
  width: number
  /** Shown as a cell comment on the template's header: meaning and unit. */
  note: string
  example: string | number | Date | null
}

const REF_NOTE = 'Your key for this row within the file (e.g. W1, or an old code). Other sheets refer to it. Overtone gives the record a new code.'

export const WAFER_COLUMNS: ColumnSpec[] = [
  { key: 'ref', header: 'Ref', aliases: ['Code'], kind: 'text', isRequired: true, width: 12, note: REF_NOTE, example: 'EXAMPLE' },
  { key: 'material', header: 'Material', kind: 'text', isRequired: true, width: 22, note: 'Name of a material already registered in Overtone (see the drop-down).', example: 'GaAs' },
  { key: 'cutNormal', header: 'Cut normal', kind: 'vector', isRequired: true, width: 12, note: 'Crystal direction of the wafer normal: three numbers, e.g. 0 0 1.', example: '0 0 1' },
  { key: 'flatDirection', header: 'Flat direction', kind: 'vector', isRequired: true, width: 14, note: 'Crystal direction of the primary flat, in the surface: three numbers, e.g. 1 -1 0.', example: '1 -1 0' },
  { key: 'diameterMm', header: 'Diameter (mm)', kind: 'number', isRequired: true, width: 14, note: 'Wafer diameter in millimetres (2–450).', example: 50.8 },
  { key: 'thicknessUm', header: 'Thickness (µm)', aliases: ['Thickness (um)'], kind: 'number', isRequired: true, width: 14, note: 'Wafer thickness in micrometres (1–5000).', example: 350 },
  { key: 'lot', header: 'Lot', kind: 'text', isRequired: true, width: 16, note: 'Supplier lot number.', example: 'KX-2291' },
  { key: 'supplier', header: 'Supplier', kind: 'text', width: 24, note: 'Supplier name (optional).', example: 'Norrvik Semiconductor Supply' },
  { key: 'receivedOn', header: 'Received on', kind: 'date', width: 13, note: 'Date received: a date cell, or text YYYY-MM-DD (optional).', example: new Date(Date.UTC(2024, 2, 14)) },
  { key: 'location', header: 'Location', kind: 'text', width: 12, note: 'Code of an existing location, e.g. L-0003 (optional).', example: null },
  { key: 'status', header: 'Status', kind: 'list', values: WAFER_STATUSES, width: 12, note: 'in_stock (default), in_process or used_up. Rows marked retired are skipped.', example: 'in_stock' },
  { key: 'notes', header: 'Notes', kind: 'text', width: 30, note: 'Free text (optional).', example: 'Example row: rows whose first cell is EXAMPLE are skipped.' },
]

export const CHIP_COLUMNS: ColumnSpec[] = [
  { key: 'ref', header: 'Ref', aliases: ['Code'], kind: 'text', width: 14, note: `${REF_NOTE} Needed when arrays refer to the chip.`, example: 'EXAMPLE' },
  { key: 'wafer', header: 'Wafer', kind: 'text', isRequired: true, width: 12, note: 'Ref of a row on the Wafers sheet, or the code of a wafer already in Overtone (e.g. W-0003).', example: 'W1' },
  { key: 'index', header: 'Index', kind: 'integer', width: 8, note: 'Chip number on the wafer, 1–99 (the last part of the code). Empty: the next free number.', example: 1 },
  { key: 'rotationDeg', header: 'Rotation (°)', aliases: ['Rotation (deg)'], kind: 'number', width: 12, note: 'Angle of the chip reference edge from the wafer primary flat, degrees, counter-clockwise seen from the front (default 0).', example: 0 },
  { key: 'widthMm', header: 'Width (mm)', kind: 'number', isRequired: true, width: 11, note: 'Chip width in millimetres.', example: 5 },
  { key: 'heightMm', header: 'Height (mm)', kind: 'number', isRequired: true, width: 11, note: 'Chip height in millimetres.', example: 5 },
  { key: 'location', header: 'Location', kind: 'text', width: 12, note: 'Code of an existing location, e.g. L-0003 (optional).', example: null },
  { key: 'status', header: 'Status', kind: 'list', values: CHIP_STATUSES, width: 12, note: 'in_stock (default), in_process, measured or used_up. Rows marked retired are skipped.', example: 'in_stock' },
  { key: 'notes', header: 'Notes', kind: 'text', width: 30, note: 'Free text (optional).', example: null },
]

export const ARRAY_COLUMNS: ColumnSpec[] = [
  { key: 'ref', header: 'Ref', aliases: ['Code'], kind: 'text', width: 16, note: 'Your key for this row (optional; the code is made from the chip and position).', example: 'EXAMPLE' },
  { key: 'chip', header: 'Chip', kind: 'text', isRequired: true, width: 14, note: 'Ref of a row on the Chips sheet, or the code of a chip already in Overtone (e.g. C-0003-02).', example: 'W1-01' },
  { key: 'position', header: 'Position', kind: 'text', isRequired: true, width: 10, note: 'Position on the chip: 1–6 letters or digits, e.g. B2. Unique per chip.', example: 'A1' },
  { key: 'shape', header: 'Shape', kind: 'list', values: SHAPES, isRequired: true, width: 12, note: 'Meta-atom shape (drop-down).', example: 'disk' },
  { key: 'dimensionsNm', header: 'Dimensions (nm)', kind: 'text', width: 28, note: 'Meta-atom dimensions in nanometres as name=value pairs; names end in Nm, e.g. diameterNm=450; heightNm=300.', example: 'diameterNm=450; heightNm=300' },
  { key: 'shapeAzimuthDeg', header: 'Shape azimuth (°)', aliases: ['Shape azimuth (deg)'], kind: 'number', width: 16, note: 'Meta-atom rotation in the lattice, degrees (default 0).', example: 0 },
  { key: 'lattice', header: 'Lattice', kind: 'list', values: LATTICES, isRequired: true, width: 12, note: 'Lattice (drop-down).', example: 'square' },
  { key: 'periodXNm', header: 'Period X (nm)', kind: 'number', width: 13, note: 'Lattice period along x, nanometres (optional).', example: 900 },
  { key: 'periodYNm', header: 'Period Y (nm)', kind: 'number', width: 13, note: 'Lattice period along y, nanometres (optional).', example: 900 },
  { key: 'azimuthDeg', header: 'Azimuth (°)', aliases: ['Azimuth (deg)'], kind: 'number', width: 11, note: 'Array rotation from the chip reference edge, degrees (default 0).', example: 0 },
  { key: 'count', header: 'Count', kind: 'integer', width: 9, note: 'Number of meta-atoms in the array (default 1).', example: 400 },
  { key: 'customRotationOrder', header: 'Custom rotation order', kind: 'integer', width: 12, note: 'Only for custom shapes or lattices: the rotation order n of the structure.', example: null },
  { key: 'customMirrors', header: 'Custom mirrors (°)', aliases: ['Custom mirrors (deg)'], kind: 'text', width: 14, note: 'Only for custom shapes or lattices: mirror angles in degrees, e.g. 0, 90.', example: null },
  { key: 'notes', header: 'Notes', kind: 'text', width: 30, note: 'Free text (optional).', example: null },
]

/** Columns the export adds after the importable ones; the importer ignores them (computed or kept by Overtone). */
export const EXPORT_ONLY: Record<ImportSheetName, RegExp> = {
  Wafers: /^(pointgroup|cut|chips|createdby|created\(utc\)|updated\(utc\))$/,
  Chips: /^(material|arrays|holder|created\(utc\)|updated\(utc\))$/,
  Arrays: /^(symmetry|engineversion|stale|channelscomputed\(utc\)|retired\(utc\)|created\(utc\)|(shg|thg).*)$/,
}

export const IMPORT_COLUMNS: Record<ImportSheetName, ColumnSpec[]> = { Wafers: WAFER_COLUMNS, Chips: CHIP_COLUMNS, Arrays: ARRAY_COLUMNS }

/** Header text → comparison key: lower case, no spaces. */
export const normHeader = (h: string) => h.toLowerCase().replace(/\s+/g, '')
const withoutUnit = (h: string) => normHeader(h.replace(/\s*\([^)]*\)\s*$/, ''))

/** Does a sheet header name this column? */
export function matchesColumn(spec: ColumnSpec, header: string): boolean {
  const h = normHeader(header)
  return [spec.header, ...(spec.aliases ?? [])].some((name) => normHeader(name) === h || withoutUnit(name) === h)
}
