import { CHIP_STATUSES, LATTICES, SHAPES, SHAPE_DIMENSIONS, WAFER_STATUSES } from '../../../shared/schemas/records'
import type { ImportSheetName } from '../../../shared/excel'

/**
 * Columns of the importable sheets (Wafers, Chips, Arrays). One table drives the template (headers,
 * notes, lists), the importer (header matching, cell types) and the first columns of the export, so
 * an exported workbook can be imported again. Headers match case- and space-insensitively, with or
 * without the unit in brackets ("diameter" matches "Diameter (mm)").
 *
 * Round trip: the first column, Code, holds the record's Overtone code in an export (that row then
 * updates the record) or is empty / your own key for a new record. The export adds Version (the
 * record's last change) so a row whose record changed after the export is a conflict, not an
 * overwrite. Array dimensions are one numeric column per dimension ("Diameter (nm)").
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
  /** In the template (the export writes every column but legacy ones). Default true. */
  inTemplate?: boolean
  /** Read from old files only: neither in the template nor in the export. */
  isLegacy?: boolean
}

const REF_NOTE =
  'Empty, or your own key for a NEW record (e.g. W1, or an old code); other sheets can refer to it and Overtone gives the record a new code. An Overtone code (as in an export) updates that record.'
const VERSION: ColumnSpec = {
  key: 'version',
  header: 'Version',
  kind: 'text',
  width: 24,
  inTemplate: false,
  note: 'Written by the export: when the record last changed (UTC). Leave it as it is: if the record changes in Overtone after the export, its row is shown as a conflict instead of overwriting that change.',
  example: null,
}

export const WAFER_COLUMNS: ColumnSpec[] = [
  { key: 'ref', header: 'Code', aliases: ['Ref'], kind: 'text', width: 12, note: REF_NOTE, example: 'EXAMPLE' },
  {
    key: 'material',
    header: 'Material',
    kind: 'text',
    isRequired: true,
    width: 22,
    note: 'Name of a material already registered in Overtone (see the drop-down).',
    example: 'GaAs',
  },
  {
    key: 'cutNormal',
    header: 'Cut normal',
    kind: 'vector',
    isRequired: true,
    width: 12,
    note: 'Crystal direction of the wafer normal: three numbers, e.g. 0 0 1.',
    example: '0 0 1',
  },
  {
    key: 'flatDirection',
    header: 'Flat direction',
    kind: 'vector',
    isRequired: true,
    width: 14,
    note: 'Crystal direction of the primary flat, in the surface: three numbers, e.g. 1 -1 0.',
    example: '1 -1 0',
  },
  {
    key: 'diameterMm',
    header: 'Diameter (mm)',
    kind: 'number',
    isRequired: true,
    width: 14,
    note: 'Wafer diameter in millimetres (2–450).',
    example: 50.8,
  },
  {
    key: 'thicknessUm',
    header: 'Thickness (µm)',
    aliases: ['Thickness (um)'],
    kind: 'number',
    isRequired: true,
    width: 14,
    note: 'Wafer thickness in micrometres (1–5000).',
    example: 350,
  },
  {
    key: 'lot',
    header: 'Lot',
    kind: 'text',
    isRequired: true,
    width: 16,
    note: 'Supplier lot number.',
    example: 'KX-2291',
  },
  {
    key: 'supplier',
    header: 'Supplier',
    kind: 'text',
    width: 24,
    note: 'Supplier name (optional).',
    example: 'Norrvik Semiconductor Supply',
  },
  {
    key: 'receivedOn',
    header: 'Received on',
    kind: 'date',
    width: 13,
    note: 'Date received: a date cell, or text YYYY-MM-DD (optional).',
    example: new Date(Date.UTC(2024, 2, 14)),
  },
  {
    key: 'location',
    header: 'Location',
    kind: 'text',
    width: 12,
    note: 'Code of an existing location, e.g. L-0003 (optional).',
    example: null,
  },
  {
    key: 'status',
    header: 'Status',
    kind: 'list',
    values: WAFER_STATUSES,
    width: 12,
    note: 'in_stock (default), in_process or used_up. Rows marked retired are skipped.',
    example: 'in_stock',
  },
  {
    key: 'notes',
    header: 'Notes',
    kind: 'text',
    width: 30,
    note: 'Free text (optional).',
    example: 'Example row: rows whose first cell is EXAMPLE are skipped.',
  },
  VERSION,
]

export const CHIP_COLUMNS: ColumnSpec[] = [
  {
    key: 'ref',
    header: 'Code',
    aliases: ['Ref'],
    kind: 'text',
    width: 14,
    note: `${REF_NOTE} Needed when arrays refer to the chip.`,
    example: 'EXAMPLE',
  },
  {
    key: 'wafer',
    header: 'Wafer',
    kind: 'text',
    isRequired: true,
    width: 12,
    note: 'Ref of a row on the Wafers sheet, or the code of a wafer already in Overtone (e.g. W-0003).',
    example: 'W1',
  },
  {
    key: 'index',
    header: 'Index',
    kind: 'integer',
    width: 8,
    note: 'Chip number on the wafer, 1–99 (the last part of the code). Empty: the next free number.',
    example: 1,
  },
  {
    key: 'rotationDeg',
    header: 'Rotation (°)',
    aliases: ['Rotation (deg)'],
    kind: 'number',
    width: 12,
    note: 'Angle of the chip reference edge from the wafer primary flat, degrees, counter-clockwise seen from the front (default 0).',
    example: 0,
  },
  {
    key: 'widthMm',
    header: 'Width (mm)',
    kind: 'number',
    isRequired: true,
    width: 11,
    note: 'Chip width in millimetres.',
    example: 5,
  },
  {
    key: 'heightMm',
    header: 'Height (mm)',
    kind: 'number',
    isRequired: true,
    width: 11,
    note: 'Chip height in millimetres.',
    example: 5,
  },
  {
    key: 'location',
    header: 'Location',
    kind: 'text',
    width: 12,
    note: 'Code of an existing location, e.g. L-0003 (optional).',
    example: null,
  },
  {
    key: 'status',
    header: 'Status',
    kind: 'list',
    values: CHIP_STATUSES,
    width: 12,
    note: 'in_stock (default), in_process, measured or used_up. Rows marked retired are skipped.',
    example: 'in_stock',
  },
  { key: 'notes', header: 'Notes', kind: 'text', width: 30, note: 'Free text (optional).', example: null },
  VERSION,
]

export const ARRAY_COLUMNS: ColumnSpec[] = [
  {
    key: 'ref',
    header: 'Code',
    aliases: ['Ref'],
    kind: 'text',
    width: 16,
    note: 'Empty for a new array (its code is made from the chip and position). An Overtone code (as in an export) updates that array.',
    example: 'EXAMPLE',
  },
  {
    key: 'chip',
    header: 'Chip',
    kind: 'text',
    isRequired: true,
    width: 14,
    note: 'Ref of a row on the Chips sheet, or the code of a chip already in Overtone (e.g. C-0003-02).',
    example: 'W1-01',
  },
  {
    key: 'position',
    header: 'Position',
    kind: 'text',
    isRequired: true,
    width: 10,
    note: 'Position on the chip: 1–6 letters or digits, e.g. B2. Unique per chip.',
    example: 'A1',
  },
  {
    key: 'shape',
    header: 'Shape',
    kind: 'list',
    values: SHAPES,
    isRequired: true,
    width: 12,
    note: 'Meta-atom shape (drop-down).',
    example: 'disk',
  },
  {
    key: 'dimensionsNm',
    header: 'Dimensions (nm)',
    kind: 'text',
    width: 28,
    isLegacy: true,
    note: 'Old files: dimensions as name=value pairs, e.g. diameterNm=450; gapNm=50.',
    example: null,
  },
  {
    key: 'shapeAzimuthDeg',
    header: 'Shape azimuth (°)',
    aliases: ['Shape azimuth (deg)'],
    kind: 'number',
    width: 16,
    note: 'Meta-atom rotation in the lattice, degrees (default 0).',
    example: 0,
  },
  {
    key: 'lattice',
    header: 'Lattice',
    kind: 'list',
    values: LATTICES,
    isRequired: true,
    width: 12,
    note: 'Lattice (drop-down).',
    example: 'square',
  },
  {
    key: 'periodXNm',
    header: 'Period X (nm)',
    kind: 'number',
    width: 13,
    note: 'Lattice period along x, nanometres (needed for square, hexagonal and rectangular lattices).',
    example: 900,
  },
  {
    key: 'periodYNm',
    header: 'Period Y (nm)',
    kind: 'number',
    width: 13,
    note: 'Lattice period along y, nanometres (needed for rectangular lattices).',
    example: 900,
  },
  {
    key: 'azimuthDeg',
    header: 'Azimuth (°)',
    aliases: ['Azimuth (deg)'],
    kind: 'number',
    width: 11,
    note: 'Array rotation from the chip reference edge, degrees (default 0).',
    example: 0,
  },
  {
    key: 'count',
    header: 'Count',
    kind: 'integer',
    width: 9,
    note: 'Number of meta-atoms in the array (default 1).',
    example: 400,
  },
  {
    key: 'customRotationOrder',
    header: 'Custom rotation order',
    kind: 'integer',
    width: 12,
    note: 'Only for custom shapes or lattices: the rotation order n of the structure.',
    example: null,
  },
  {
    key: 'customMirrors',
    header: 'Custom mirrors (°)',
    aliases: ['Custom mirrors (deg)'],
    kind: 'text',
    width: 14,
    note: 'Only for custom shapes or lattices: mirror angles in degrees, e.g. 0, 90.',
    example: null,
  },
  { key: 'notes', header: 'Notes', kind: 'text', width: 30, note: 'Free text (optional).', example: null },
  VERSION,
]

/** Every dimension the array form asks for, over all shapes, in form order (diameterNm, innerDiameterNm, …). */
export const FORM_DIMENSIONS: string[] = [
  ...new Set(Object.values(SHAPE_DIMENSIONS).flatMap((ds) => ds.map((d) => d.key))),
]
/** The dimensions of these shapes, in form order. */
export const dimensionsOf = (shapes: Iterable<string>): string[] => {
  const want = new Set(
    [...shapes].flatMap((s) => (SHAPE_DIMENSIONS as Record<string, { key: string }[]>)[s]?.map((d) => d.key) ?? []),
  )
  return FORM_DIMENSIONS.filter((k) => want.has(k))
}
/** Column header of a dimension: innerDiameterNm → "Inner diameter (nm)". */
export function dimensionHeader(key: string): string {
  const words = key
    .replace(/Nm$/, '')
    .replace(/([A-Z])/g, ' $1')
    .toLowerCase()
    .trim()
  return `${words.charAt(0).toUpperCase()}${words.slice(1)} (nm)`
}
/** The dimension a header names ("Inner diameter (nm)" → innerDiameterNm), or null when it is not "<words> (nm)". */
export function dimensionKey(header: string): string | null {
  const m = /^([A-Za-z][A-Za-z ]{0,40}?)\s*\(\s*nm\s*\)$/.exec(header.trim())
  if (!m) return null
  const words = m[1].trim().toLowerCase().split(/\s+/)
  return (
    words[0] +
    words
      .slice(1)
      .map((w) => w.charAt(0).toUpperCase() + w.slice(1))
      .join('') +
    'Nm'
  )
}
/** Spec of a dimension column (numbers in nm; the key in the parsed row is `dim:<name>`). */
export const dimensionColumn = (key: string, example: number | null = null): ColumnSpec => ({
  key: `dim:${key}`,
  header: dimensionHeader(key),
  kind: 'number',
  width: 13,
  example,
  note: `Meta-atom ${dimensionHeader(key).replace(' (nm)', '').toLowerCase()} in nanometres. Fill the dimensions the shape has (as in the array form); leave the others empty.`,
})

/** Columns the export adds after the importable ones; the importer ignores them (computed or kept by Overtone). */
export const EXPORT_ONLY: Record<ImportSheetName, RegExp> = {
  Wafers: /^(pointgroup|cut|chips|createdby|created\(utc\)|updated\(utc\))$/,
  Chips: /^(material|arrays|holder|created\(utc\)|updated\(utc\))$/,
  Arrays: /^(symmetry|engineversion|stale|channelscomputed\(utc\)|retired\(utc\)|created\(utc\)|(shg|thg).*)$/,
}

export const IMPORT_COLUMNS: Record<ImportSheetName, ColumnSpec[]> = {
  Wafers: WAFER_COLUMNS,
  Chips: CHIP_COLUMNS,
  Arrays: ARRAY_COLUMNS,
}

/** Header text → comparison key: lower case, no spaces. */
export const normHeader = (h: string) => h.toLowerCase().replace(/\s+/g, '')
const withoutUnit = (h: string) => normHeader(h.replace(/\s*\([^)]*\)\s*$/, ''))

/** Does a sheet header name this column? */
export function matchesColumn(spec: ColumnSpec, header: string): boolean {
  const h = normHeader(header)
  return [spec.header, ...(spec.aliases ?? [])].some((name) => normHeader(name) === h || withoutUnit(name) === h)
}
