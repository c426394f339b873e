/**
 * A polarisation sweep read from a table: the pump polarisation angle and one or two harmonic
 * intensity columns. Columns are found by their header names (angle/theta/…, parallel/perp/…) or
 * by position (angle first, then intensities). Angle unit: radians when max |angle| ≤ 2π + 0.01,
 * degrees otherwise, unless overridden. Angles are returned in degrees, measured in the lab frame
 * from the chip's reference edge (as recorded by the instrument).
 */
import type { ParsedTable, SkippedRow } from './csv'
import { parseTable } from './csv'
import { AnalysisError } from './errors'

/** Analyser setting of an intensity channel. */
export type Analyser = 'parallel' | 'perpendicular' | 'none'

/** One intensity channel of a sweep. */
export interface SweepChannel {
  column: string
  analyser: Analyser
  /** Intensity per accepted row (same length as `anglesDeg`). */
  intensity: number[]
}

/** A polarisation sweep ready for fitting. */
export interface PolarSweep {
  anglesDeg: number[]
  channels: SweepChannel[]
  angleColumn: string
  angleUnit: 'deg' | 'rad'
  /** Why this unit was chosen (shown to the user). */
  angleUnitReason: string
  /** Rows not used, with the reason (1-based line numbers). */
  skipped: SkippedRow[]
  /** Assumptions made while reading (column roles), for display. */
  notes: string[]
}

/** Options of {@link readSweep}: override any detection. */
export interface ReadSweepOptions {
  angleColumn?: string | number
  /** Intensity columns with their analyser; default: detected. */
  intensityColumns?: { column: string | number; analyser: Analyser }[]
  angleUnit?: 'deg' | 'rad' | 'auto'
}

const ANGLE_NAME = /angle|theta|θ|phi|φ|pol|deg|rad|hwp|azim/i
const PERP_NAME = /perp|⊥|cross|orth|\bxy\b|\bvh\b|\bs\b/i
const PAR_NAME = /par|∥|\|\||\bco\b|\bxx\b|\bhh\b|\bp\b/i
const NONE_NAME = /total|none|no.?analy[sz]er|sum/i

/** Parse the text of a sweep file and pick its columns. Throws AnalysisError (see {@link parseTable}). */
export function readSweepText(text: string, options: ReadSweepOptions = {}): PolarSweep {
  return readSweep(parseTable(text), options)
}

/** Pick the angle and intensity columns of a parsed table and convert the angles to degrees. */
export function readSweep(table: ParsedTable, options: ReadSweepOptions = {}): PolarSweep {
  if (table.columns.length < 2)
    throw new AnalysisError({
      code: 'TOO_FEW_COLUMNS',
      field: 'file',
      value: table.columns,
      message: `a sweep needs an angle column and at least one intensity column; the file has ${table.columns.length} column`,
      hint: 'export "angle, intensity" (and optionally a second intensity column)',
    })
  const notes: string[] = []
  const angleIndex =
    options.angleColumn !== undefined
      ? columnIndex(table, options.angleColumn, 'angleColumn')
      : detectAngle(table, notes)
  const picks = options.intensityColumns
    ? options.intensityColumns.map((c) => ({
        index: columnIndex(table, c.column, 'intensityColumns'),
        analyser: c.analyser,
      }))
    : detectIntensities(table, angleIndex, notes)
  const used = [angleIndex, ...picks.map((p) => p.index)]
  const skipped = [...table.skipped]
  const keep: number[] = []
  table.rows.forEach((row, r) => {
    const bad = used.filter((c) => !Number.isFinite(row[c]))
    if (bad.length === 0) return void keep.push(r)
    const texts = table.cellIssues
      .filter((i) => i.line === table.lines[r] && bad.includes(i.column))
      .map((i) => `"${i.text}" in ${table.columns[i.column]}`)
    skipped.push({ line: table.lines[r], reason: `not a finite number: ${texts.join(', ') || 'empty cell'}` })
  })
  skipped.sort((a, b) => a.line - b.line)
  if (keep.length < 3)
    throw new AnalysisError({
      code: 'TOO_FEW_POINTS',
      field: 'file',
      value: keep.length,
      message: `only ${keep.length} readable rows; a sweep needs at least 3`,
      hint: skipped[0] ? `line ${skipped[0].line}: ${skipped[0].reason}` : undefined,
    })
  const raw = keep.map((r) => table.rows[r][angleIndex])
  const { unit, reason } = chooseUnit(raw, options.angleUnit ?? 'auto')
  return {
    anglesDeg: raw.map((a) => (unit === 'rad' ? (a * 180) / Math.PI : a)),
    channels: picks.map((p) => ({
      column: table.columns[p.index],
      analyser: p.analyser,
      intensity: keep.map((r) => table.rows[r][p.index]),
    })),
    angleColumn: table.columns[angleIndex],
    angleUnit: unit,
    angleUnitReason: reason,
    skipped,
    notes,
  }
}

/** Radians iff max |angle| ≤ 2π + 0.01 (unless forced). */
export function chooseUnit(
  angles: readonly number[],
  requested: 'deg' | 'rad' | 'auto',
): { unit: 'deg' | 'rad'; reason: string } {
  if (requested !== 'auto')
    return { unit: requested, reason: `set by the user (${requested === 'deg' ? 'degrees' : 'radians'})` }
  const max = Math.max(...angles.map(Math.abs))
  return max <= 2 * Math.PI + 0.01
    ? {
        unit: 'rad',
        reason: `read as radians: the largest |angle| is ${max.toPrecision(4)} ≤ 2π (override if these are degrees)`,
      }
    : { unit: 'deg', reason: `read as degrees: the largest |angle| is ${max.toPrecision(4)} > 2π` }
}

function columnIndex(table: ParsedTable, column: string | number, field: string): number {
  const i = typeof column === 'number' ? column : table.columns.findIndex((c) => c === column)
  if (i < 0 || i >= table.columns.length)
    throw new AnalysisError({
      code: 'UNKNOWN_COLUMN',
      field,
      value: column,
      message: `no column ${JSON.stringify(column)}; the file has ${table.columns.map((c) => JSON.stringify(c)).join(', ')}`,
    })
  return i
}

function detectAngle(table: ParsedTable, notes: string[]): number {
  const named = table.hasHeader
    ? table.columns.findIndex(
        (c) => ANGLE_NAME.test(c) && !PAR_NAME.test(c) && !PERP_NAME.test(c) && !NONE_NAME.test(c),
      )
    : -1
  if (named >= 0) return named
  notes.push(`angle column assumed to be the first column ("${table.columns[0]}")`)
  return 0
}

function detectIntensities(
  table: ParsedTable,
  angleIndex: number,
  notes: string[],
): { index: number; analyser: Analyser }[] {
  const rest = table.columns.map((_, i) => i).filter((i) => i !== angleIndex)
  const byName = (re: RegExp) => (table.hasHeader ? rest.find((i) => re.test(table.columns[i])) : undefined)
  const par = byName(PAR_NAME)
  const perp = byName(PERP_NAME)
  const none = byName(NONE_NAME)
  const named = [
    ...(par !== undefined ? [{ index: par, analyser: 'parallel' as const }] : []),
    ...(perp !== undefined && perp !== par ? [{ index: perp, analyser: 'perpendicular' as const }] : []),
  ]
  if (named.length > 0) return named
  if (none !== undefined) return [{ index: none, analyser: 'none' }]
  const picks = rest
    .slice(0, 2)
    .map((index, k) => ({ index, analyser: (k === 0 ? 'parallel' : 'perpendicular') as Analyser }))
  notes.push(
    picks.length === 1
      ? `analyser of "${table.columns[picks[0].index]}" not named in the header: assumed parallel (override if not)`
      : `analysers not named in the header: "${table.columns[picks[0].index]}" assumed parallel, "${table.columns[picks[1].index]}" perpendicular`,
  )
  if (rest.length > 2)
    notes.push(
      `columns ignored: ${rest
        .slice(2)
        .map((i) => `"${table.columns[i]}"`)
        .join(', ')}`,
    )
  return picks
}
