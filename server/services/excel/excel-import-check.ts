import { eq, inArray } from 'drizzle-orm'
import type { z } from 'zod'
import { arrays, chips, locations, materials, wafers } from '../../db/schema/index'
import type { AuditChanges } from '../../db/schema/index'
import type { Db } from '../../db/client'
import {
  arraySchema,
  CHIP_STATUSES,
  diceSchema,
  waferSchema,
  type ArrayInput,
  type WaferInput,
} from '../../../shared/schemas/records'
import type { ImportFieldChange, ImportMessage, ImportRowReport, ImportSheetName } from '../../../shared/excel'
import { AppError } from '../../errors'
import { IMPORT_COLUMNS, dimensionHeader } from './excel-columns'
import type { ReadRow, ReadSheet } from './excel-import-read'
import { MAX_CHIP_INDEX, arrayCode, chipCode, codeNumber, peekCodeNumber, waferCode } from '../inventory/codes'
import { deriveChannels } from '../inventory/array-channels'

/**
 * Check every row against the database and the shared zod schemas, and decide what it does:
 * - Code empty, or a key of your own (W1, an old code): a NEW record; other sheets may refer to it.
 * - Code is an Overtone code (W-0003, C-0003-01, A-0003-01-B2): that record. Equal to the record:
 *   unchanged; different: an update (field before → after), unless the record changed in Overtone
 *   after the export the row comes from (its Version differs): then a conflict, shown side by side
 *   and never written. A code that names no record is an error, and so is the same code twice.
 * References between the sheets (a chip's Wafer, an array's Chip) are a Code of the other sheet,
 * else an Overtone code. New records get preview codes. The result is the plan the import carries out.
 */
type Frame = { pointGroup: string; cutNormal: [number, number, number]; flatDirection: [number, number, number] }
type Change = { audit: AuditChanges; report: ImportFieldChange[] }

export interface WaferPlan {
  report: ImportRowReport
  input: WaferInput
  number: number
  frame: Frame
  id?: number
  existing?: ExistingWafer
  change?: Change
}
type WaferTarget = { plan: WaferPlan } | { existing: { id: number; code: string; frame: Frame } }
export interface ChipPlan {
  report: ImportRowReport
  wafer: WaferTarget
  index: number | null
  values: {
    rotationDeg: number
    widthMm: number
    heightMm: number
    locationId: number | null
    status: (typeof CHIP_STATUSES)[number]
    notes: string | null
  }
  existing?: ExistingChip
  change?: Change
}
type ChipTarget = { plan: ChipPlan } | { existing: { id: number; code: string; rotationDeg: number; frame: Frame } }
export interface ArrayPlan {
  report: ImportRowReport
  chip: ChipTarget
  input: Omit<ArrayInput, 'chipId'>
  derived: ReturnType<typeof deriveChannels> | null
  existing?: ExistingArray
  change?: Change
}
export interface ImportPlan {
  wafers: WaferPlan[]
  chips: ChipPlan[]
  arrays: ArrayPlan[]
  reports: ImportRowReport[]
}

const key = (s: unknown) =>
  String(s ?? '')
    .trim()
    .toUpperCase()
const err = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'error' })
const warn = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'warning' })
const headerOf = (sheet: ImportSheetName, k: string) =>
  k.startsWith('dim:') ? dimensionHeader(k.slice(4)) : (IMPORT_COLUMNS[sheet].find((c) => c.key === k)?.header ?? null)
const vec = (s: unknown) => String(s).split(' ').map(Number) as [number, number, number]
const orUndef = <T>(v: T | null | undefined) => (v === null ? undefined : v)
/** Overtone codes of each sheet (a Code cell that is not one is the row's own key for a new record). */
const CODE = { Wafers: /^W-\d{4,}$/, Chips: /^C-\d{4,}-\d{2}$/, Arrays: /^A-\d{4,}-\d{2}-[A-Z0-9]{1,6}$/ }
const today = () => new Date().toISOString().slice(0, 10)

function reportOf(sheet: ImportSheetName, r: ReadRow, summary: string): ImportRowReport {
  const ref = r.values.ref != null ? String(r.values.ref) : null
  return {
    sheet,
    row: r.row,
    status: r.skip ? 'skip' : r.messages.length ? 'error' : 'create',
    ref,
    code: null,
    summary,
    changes: [],
    messages: r.skip ? [{ column: null, message: r.skip, level: 'warning' }] : [...r.messages],
  }
}
/** An exported retired record's row (skipped by the reader): compared with its record like any other. */
function reopen(rep: ImportRowReport, r: ReadRow) {
  rep.messages = [...r.messages]
  rep.status = r.messages.length ? 'error' : 'create'
}
/** An error on the row; a skipped row (an example, a retired row) shows none. */
function fail(rep: ImportRowReport, column: string | null, message: string) {
  if (rep.status === 'skip') return
  rep.messages.push(err(column, message))
  rep.status = 'error'
}
/** Zod issues → messages on the column the field comes from. */
function zodInto(rep: ImportRowReport, sheet: ImportSheetName, error: z.ZodError) {
  const flagged = new Set(rep.messages.map((m) => m.column))
  for (const i of error.issues) {
    const path = String(i.path[0] ?? '')
    const column = path === 'dimensionsNm' && i.path[1] ? dimensionHeader(String(i.path[1])) : headerOf(sheet, path)
    if (!flagged.has(column)) fail(rep, column, i.message)
  }
}
/** An engine or service error (field-level 400) on the row. */
function appErrorInto(rep: ImportRowReport, sheet: ImportSheetName, e: unknown) {
  if (!(e instanceof AppError)) throw e
  const fields = Object.entries(e.fields ?? { _: [e.message] })
  for (const [f, msgs] of fields) for (const m of msgs) fail(rep, headerOf(sheet, f), m)
}

/** Values compared as the spreadsheet shows them: text trimmed, empty text = empty, object keys sorted. */
function norm(v: unknown): unknown {
  if (v === undefined || v === '') return null
  if (typeof v === 'string') return v.trim() === '' ? null : v.trim()
  if (v && typeof v === 'object' && !Array.isArray(v))
    return Object.fromEntries(Object.entries(v).sort(([a], [b]) => a.localeCompare(b)))
  return v
}
const same = (a: unknown, b: unknown) => JSON.stringify(norm(a)) === JSON.stringify(norm(b))

/**
 * The fields of `next` that differ from the record `prev`: for the audit trail (stored values) and
 * for the report (as the sheet shows them, under the sheet's column headers).
 */
function changesOf(
  sheet: ImportSheetName,
  prev: Record<string, unknown>,
  next: Record<string, unknown>,
  show: (k: string, v: unknown) => string | number | null,
): Change {
  const audit: AuditChanges = {}
  const report: ImportFieldChange[] = []
  for (const [k, to] of Object.entries(next)) {
    if (to === undefined || same(prev[k], to)) continue
    audit[k] = { from: prev[k] ?? null, to }
    if (k === 'dimensionsNm') {
      const a = (prev[k] ?? {}) as Record<string, number>,
        b = (to ?? {}) as Record<string, number>
      for (const d of [...new Set([...Object.keys(a), ...Object.keys(b)])])
        if (a[d] !== b[d]) report.push({ column: dimensionHeader(d), before: a[d] ?? null, after: b[d] ?? null })
    } else
      report.push({
        column: headerOf(sheet, k === 'materialId' ? 'material' : k === 'locationId' ? 'location' : k) ?? k,
        before: show(k, prev[k]),
        after: show(k, to),
      })
  }
  return { audit, report }
}

/** Decide update / unchanged / conflict for a row that names an existing record. */
function compareExisting(
  rep: ImportRowReport,
  change: Change,
  fileVersion: unknown,
  current: Date,
  isRetired: boolean,
  what: string,
) {
  rep.changes = change.report
  if (rep.status === 'error') return
  const hasChanges = change.report.length > 0
  if (isRetired) {
    if (hasChanges) fail(rep, null, `${rep.code} is retired in Overtone: a retired ${what} is not changed`)
    else rep.status = 'unchanged'
    return
  }
  if (!hasChanges) {
    rep.status = 'unchanged'
    return
  }
  const file = fileVersion == null ? null : String(fileVersion)
  if (file === null) {
    rep.messages.push(
      warn(
        'Version',
        'No Version in the row (it is not from an export): the changes are made over the record as it is now',
      ),
    )
    rep.status = 'update'
  } else if (file !== current.toISOString()) {
    rep.status = 'conflict'
    rep.versions = { file, current: current.toISOString() }
    rep.messages.push(
      err(
        'Version',
        `${rep.code} changed in Overtone (${current.toISOString().replace('T', ' ').slice(0, 19)} UTC) after this file was exported (${file.replace('T', ' ').slice(0, 19)}): ` +
          "compare the record with the row, then export again or make the change on the record's page",
      ),
    )
  } else rep.status = 'update'
}

const IN_CHUNK = 1000
/** SELECT … WHERE col IN (values), in chunks. */
async function inChunks<T>(
  values: (string | number)[],
  read: (part: (string | number)[]) => Promise<T[]>,
): Promise<T[]> {
  const out: T[] = []
  for (let k = 0; k < values.length; k += IN_CHUNK) out.push(...(await read(values.slice(k, k + IN_CHUNK))))
  return out
}

async function existingWafers(db: Db, codes: string[]) {
  return inChunks(codes, (part) =>
    db
      .select({ w: wafers, pointGroup: materials.pointGroup })
      .from(wafers)
      .innerJoin(materials, eq(materials.id, wafers.materialId))
      .where(inArray(wafers.code, part as string[])),
  )
}
type ExistingWafer = Awaited<ReturnType<typeof existingWafers>>[number]
async function existingChips(db: Db, codes: string[]) {
  return inChunks(codes, (part) =>
    db
      .select({
        c: chips,
        waferCode: wafers.code,
        cutNormal: wafers.cutNormal,
        flatDirection: wafers.flatDirection,
        pointGroup: materials.pointGroup,
      })
      .from(chips)
      .innerJoin(wafers, eq(wafers.id, chips.waferId))
      .innerJoin(materials, eq(materials.id, wafers.materialId))
      .where(inArray(chips.code, part as string[])),
  )
}
type ExistingChip = Awaited<ReturnType<typeof existingChips>>[number]
async function existingArrays(db: Db, codes: string[]) {
  return inChunks(codes, (part) =>
    db
      .select({ a: arrays, chipCode: chips.code })
      .from(arrays)
      .innerJoin(chips, eq(chips.id, arrays.chipId))
      .where(inArray(arrays.code, part as string[])),
  )
}
type ExistingArray = Awaited<ReturnType<typeof existingArrays>>[number]

async function lookups(db: Db, sheets: Record<ImportSheetName, ReadSheet>) {
  const mats = await db
    .select({
      id: materials.id,
      name: materials.name,
      pointGroup: materials.pointGroup,
      retiredAt: materials.retiredAt,
    })
    .from(materials)
  const locs = await db
    .select({ id: locations.id, code: locations.code, retiredAt: locations.retiredAt })
    .from(locations)
  const codes = (rows: ReadRow[], col: string, re: RegExp) =>
    rows.map((r) => key(r.values[col])).filter((c) => re.test(c))
  const waferCodes = [
    ...new Set([...codes(sheets.Wafers.rows, 'ref', CODE.Wafers), ...codes(sheets.Chips.rows, 'wafer', CODE.Wafers)]),
  ]
  const chipCodes = [
    ...new Set([...codes(sheets.Chips.rows, 'ref', CODE.Chips), ...codes(sheets.Arrays.rows, 'chip', CODE.Chips)]),
  ]
  const arrayCodes = [...new Set(codes(sheets.Arrays.rows, 'ref', CODE.Arrays))]
  const ws = await existingWafers(db, waferCodes)
  const cs = await existingChips(db, chipCodes)
  const as = await existingArrays(db, arrayCodes)
  const usedIdx = await inChunks(
    ws.map((w) => w.w.id),
    (part) =>
      db
        .select({ waferId: chips.waferId, index: chips.index })
        .from(chips)
        .where(inArray(chips.waferId, part as number[])),
  )
  const usedPos = await inChunks(
    cs.map((c) => c.c.id),
    (part) =>
      db
        .select({ chipId: arrays.chipId, position: arrays.position })
        .from(arrays)
        .where(inArray(arrays.chipId, part as number[])),
  )
  return {
    material: new Map(mats.filter((m) => !m.retiredAt).map((m) => [m.name.trim().toLowerCase(), m])),
    materialName: new Map(mats.map((m) => [m.id, m.name])),
    location: new Map(locs.filter((l) => !l.retiredAt).map((l) => [l.code, l.id])),
    locationCode: new Map(locs.map((l) => [l.id, l.code])),
    wafer: new Map(ws.map((w) => [w.w.code, w])),
    chip: new Map(cs.map((c) => [c.c.code, c])),
    array: new Map(as.map((a) => [a.a.code, a])),
    nextWafer: await peekCodeNumber(db, 'wafers', 'W'),
    usedIdx: new Set(usedIdx.map((u) => `${u.waferId}|${u.index}`)),
    usedPos: new Set(usedPos.map((u) => `${u.chipId}|${u.position}`)),
  }
}
type Lookups = Awaited<ReturnType<typeof lookups>>

function locationId(l: Lookups, rep: ImportRowReport, v: unknown): number | null {
  if (v == null) return null
  const id = l.location.get(key(v))
  if (!id) fail(rep, 'Location', `No location ${key(v)} in Overtone (give a location code such as L-0003)`)
  return id ?? null
}

/** How a stored value shows in the report. */
function shower(l: Lookups) {
  return (k: string, v: unknown): string | number | null => {
    if (v === null || v === undefined) return null
    if (k === 'materialId') return l.materialName.get(v as number) ?? String(v)
    if (k === 'locationId') return l.locationCode.get(v as number) ?? String(v)
    if (Array.isArray(v)) return v.join(k === 'customMirrors' ? ', ' : ' ')
    return typeof v === 'number' ? v : String(v)
  }
}

/** The Code cell: an existing record's code, a key of the row's own, or nothing; the same code twice is an error. */
function codeCell(
  sheet: ImportSheetName,
  rep: ImportRowReport,
  r: ReadRow,
  seen: Map<string, number>,
): { code: string | null; isOvertone: boolean } {
  const k = key(r.values.ref)
  if (!k) return { code: null, isOvertone: false }
  if (seen.has(k) && rep.status !== 'skip')
    fail(rep, 'Code', `Code ${r.values.ref} is used twice in the sheet (also row ${seen.get(k)})`)
  else if (!seen.has(k)) seen.set(k, r.row)
  return { code: k, isOvertone: CODE[sheet].test(k) }
}

const WAFER_FIELDS = [
  'materialId',
  'cutNormal',
  'flatDirection',
  'diameterMm',
  'thicknessUm',
  'lot',
  'supplier',
  'receivedOn',
  'locationId',
  'status',
  'notes',
] as const
/** Optional columns: absent from the sheet, the record keeps its value. */
const WAFER_OPTIONAL: Record<string, string> = {
  supplier: 'supplier',
  receivedOn: 'receivedOn',
  locationId: 'location',
  status: 'status',
  notes: 'notes',
}

function checkWafers(sheet: ReadSheet, l: Lookups): WaferPlan[] {
  const plans: WaferPlan[] = []
  const seen = new Map<string, number>()
  const show = shower(l)
  let next = l.nextWafer
  for (const r of consume(sheet)) {
    const v = r.values
    const rep = reportOf(
      'Wafers',
      r,
      `${v.material ?? '?'} ${v.cutNormal ?? ''}, lot ${v.lot ?? '?'}, ${v.diameterMm ?? '?'} mm`,
    )
    const { code, isOvertone } = codeCell('Wafers', rep, r, seen)
    const existing = isOvertone ? l.wafer.get(code!) : undefined
    const isRetired = existing?.w.status === 'retired'
    if (isOvertone && !existing)
      fail(
        rep,
        'Code',
        `No wafer ${code} in Overtone: leave Code empty (or give your own key, e.g. W1) to register a new wafer`,
      )
    if (existing && r.skipKind === 'retired') reopen(rep, r) // an exported retired wafer: compared below
    const mat = v.material != null ? l.material.get(String(v.material).trim().toLowerCase()) : undefined
    const sameMaterial =
      existing &&
      v.material != null &&
      l.materialName.get(existing.w.materialId)?.trim().toLowerCase() === String(v.material).trim().toLowerCase()
    if (v.material != null && !mat && !sameMaterial)
      fail(
        rep,
        'Material',
        `No material named "${v.material}" in Overtone (register it first, or pick one from the template's list)`,
      )
    const raw = {
      materialId: sameMaterial ? existing!.w.materialId : (mat?.id ?? 1),
      cutNormal: v.cutNormal != null ? vec(v.cutNormal) : undefined,
      flatDirection: v.flatDirection != null ? vec(v.flatDirection) : undefined,
      diameterMm: orUndef(v.diameterMm),
      thicknessUm: orUndef(v.thicknessUm),
      lot: orUndef(v.lot),
      supplier: v.supplier,
      receivedOn: v.receivedOn,
      locationId:
        v.location != null && existing && l.locationCode.get(existing.w.locationId ?? -1) === key(v.location)
          ? existing.w.locationId
          : locationId(l, rep, v.location),
      status: orUndef(v.status) ?? (existing ? existing.w.status : undefined),
      notes: v.notes,
    }
    if (existing)
      for (const [field, col] of Object.entries(WAFER_OPTIONAL))
        if (!sheet.columns.has(col))
          (raw as Record<string, unknown>)[field] = existing.w[field as keyof typeof existing.w]
    const parsed = waferSchema.safeParse(raw)
    if (!parsed.success) zodInto(rep, 'Wafers', parsed.error)
    const input = parsed.data!
    const plan: WaferPlan = {
      report: rep,
      input,
      number: 0,
      frame: {
        pointGroup: mat?.pointGroup ?? existing?.pointGroup ?? '1',
        cutNormal: input?.cutNormal as Frame['cutNormal'],
        flatDirection: input?.flatDirection as Frame['flatDirection'],
      },
    }
    if (existing) {
      rep.code = existing.w.code
      plan.existing = existing
      const prev = Object.fromEntries(WAFER_FIELDS.map((f) => [f, existing.w[f]]))
      const change = input
        ? changesOf('Wafers', prev, Object.fromEntries(WAFER_FIELDS.map((f) => [f, input[f]])), show)
        : { audit: {}, report: [] }
      if (input?.status === 'retired' && !isRetired)
        fail(rep, 'Status', 'The import does not retire records: retire the wafer on its page (with a reason)')
      if (input?.receivedOn && input.receivedOn > today() && 'receivedOn' in change.audit)
        fail(rep, 'Received on', `${input.receivedOn} is in the future`)
      plan.change = change
      compareExisting(rep, change, v.version, existing.w.updatedAt, isRetired, 'wafer')
    } else {
      if (input?.receivedOn && input.receivedOn > today())
        fail(rep, 'Received on', `${input.receivedOn} is in the future`)
      if (rep.status === 'create') {
        plan.number = next++
        rep.code = waferCode(plan.number)
      }
    }
    plans.push(plan)
  }
  return plans
}

/** Row key → the FIRST plan with it (a later duplicate is itself the error). */
function byCode<P extends { report: ImportRowReport }>(plans: P[]): Map<string, P> {
  const m = new Map<string, P>()
  for (const p of plans) if (p.report.ref && !m.has(key(p.report.ref))) m.set(key(p.report.ref), p)
  return m
}

const CHIP_FIELDS = ['rotationDeg', 'widthMm', 'heightMm', 'locationId', 'status', 'notes'] as const
function checkChips(sheet: ReadSheet, l: Lookups, waferPlans: WaferPlan[]): ChipPlan[] {
  const waferRows = byCode(waferPlans)
  const seen = new Map<string, number>(),
    seenIdx = new Map<string, number>()
  const plans: ChipPlan[] = []
  const show = shower(l)
  for (const r of consume(sheet)) {
    const v = r.values
    const rep = reportOf(
      'Chips',
      r,
      `chip ${v.index ?? '(next)'} of ${v.wafer ?? '?'}, ${v.widthMm ?? '?'} × ${v.heightMm ?? '?'} mm`,
    )
    const { code, isOvertone } = codeCell('Chips', rep, r, seen)
    const existing = isOvertone ? l.chip.get(code!) : undefined
    if (isOvertone && !existing)
      fail(rep, 'Code', `No chip ${code} in Overtone: leave Code empty (or give your own key) to add a new chip`)
    if (existing && r.skipKind === 'retired') reopen(rep, r)
    const raw: Record<string, unknown> = {
      rotationDeg: orUndef(v.rotationDeg),
      widthMm: orUndef(v.widthMm),
      heightMm: orUndef(v.heightMm),
      notes: v.notes,
    }
    if (existing) for (const f of ['rotationDeg', 'notes']) if (!sheet.columns.has(f)) raw[f] = existing.c[f as 'notes']
    const parsed = diceSchema.pick({ rotationDeg: true, widthMm: true, heightMm: true, notes: true }).safeParse(raw)
    if (!parsed.success) zodInto(rep, 'Chips', parsed.error)
    const w = key(v.wafer)
    const local = waferRows.get(w)
    const onWafer = local?.existing ?? (local ? undefined : l.wafer.get(w))
    let wafer: WaferTarget | null = null
    if (local && !local.existing) {
      wafer = { plan: local }
      if (local.report.status === 'skip' && rep.status !== 'skip') {
        rep.status = 'skip'
        rep.messages.push(warn('Wafer', `Its wafer (Wafers row ${local.report.row}) is skipped`))
      } else if (local.report.status === 'error')
        fail(rep, 'Wafer', `Its wafer (Wafers row ${local.report.row}) has errors`)
    } else if (onWafer) {
      wafer = {
        existing: {
          id: onWafer.w.id,
          code: onWafer.w.code,
          frame: {
            pointGroup: onWafer.pointGroup,
            cutNormal: onWafer.w.cutNormal,
            flatDirection: onWafer.w.flatDirection,
          },
        },
      }
      if (onWafer.w.status === 'retired' && !existing)
        fail(rep, 'Wafer', `${onWafer.w.code} is retired; chips cannot be added to it`)
    } else if (w) fail(rep, 'Wafer', `No wafer ${v.wafer}: neither a Code on the Wafers sheet nor a wafer in Overtone`)
    const index = typeof v.index === 'number' ? v.index : existing ? existing.c.index : null
    const values = {
      rotationDeg: parsed.data?.rotationDeg ?? 0,
      widthMm: parsed.data?.widthMm ?? 0,
      heightMm: parsed.data?.heightMm ?? 0,
      locationId:
        existing &&
        (!sheet.columns.has('location') ||
          (v.location != null && l.locationCode.get(existing.c.locationId ?? -1) === key(v.location)))
          ? existing.c.locationId
          : locationId(l, rep, v.location),
      status: (v.status ?? existing?.c.status ?? 'in_stock') as ChipPlan['values']['status'],
      notes: parsed.data?.notes ?? null,
    }
    const plan: ChipPlan = { report: rep, wafer: wafer!, index, values }
    if (existing) {
      rep.code = existing.c.code
      plan.existing = existing
      if (w && w !== existing.waferCode)
        fail(rep, 'Wafer', `${existing.c.code} is a chip of ${existing.waferCode}: a chip stays on its wafer`)
      if (index !== existing.c.index)
        fail(
          rep,
          'Index',
          `${existing.c.code} is chip ${existing.c.index} of its wafer: the number is part of the code and stays`,
        )
      if (values.status === 'retired' && existing.c.status !== 'retired')
        fail(rep, 'Status', 'The import does not retire records: retire the chip on its page (with a reason)')
      const change = changesOf('Chips', Object.fromEntries(CHIP_FIELDS.map((f) => [f, existing.c[f]])), values, show)
      plan.change = change
      compareExisting(rep, change, v.version, existing.c.updatedAt, existing.c.status === 'retired', 'chip')
    } else {
      if (index !== null && (index < 1 || index > MAX_CHIP_INDEX))
        fail(rep, 'Index', `The chip number must be 1–${MAX_CHIP_INDEX}`)
      if (index !== null && wafer && rep.status !== 'skip') {
        const slot = `${w}|${index}`
        if (seenIdx.has(slot))
          fail(rep, 'Index', `Chip ${index} of wafer ${v.wafer} appears twice (also row ${seenIdx.get(slot)})`)
        else seenIdx.set(slot, r.row)
        if ('existing' in wafer && l.usedIdx.has(`${wafer.existing.id}|${index}`))
          fail(rep, 'Index', `${chipCode(codeNumber(wafer.existing.code), index)} already exists`)
      }
    }
    plans.push(plan)
  }
  assignChipIndices(plans, l)
  return plans
}

/** New chips without an Index get the next free number of their wafer, after the taken ones. */
function assignChipIndices(plans: ChipPlan[], l: Lookups) {
  const last = new Map<string, number>()
  const waferKey = (p: ChipPlan) => ('plan' in p.wafer ? `row${p.wafer.plan.report.row}` : p.wafer.existing.code)
  for (const p of plans)
    if (p.wafer && p.index !== null) last.set(waferKey(p), Math.max(last.get(waferKey(p)) ?? 0, p.index))
  const codeOf = new Map([...l.wafer.values()].map((x) => [x.w.id, x.w.code]))
  for (const u of l.usedIdx) {
    const [id, idx] = u.split('|').map(Number)
    const c = codeOf.get(id)
    if (c) last.set(c, Math.max(last.get(c) ?? 0, idx))
  }
  for (const p of plans) {
    if (!p.wafer || p.report.status === 'skip' || p.existing) continue
    if (p.index === null) {
      const n = (last.get(waferKey(p)) ?? 0) + 1
      if (n > MAX_CHIP_INDEX) {
        fail(p.report, 'Index', `The wafer has no free chip number left (they stop at ${MAX_CHIP_INDEX})`)
        continue
      }
      last.set(waferKey(p), n)
      p.index = n
    }
    const number = 'plan' in p.wafer ? p.wafer.plan.number : codeNumber(p.wafer.existing.code)
    if (p.report.status === 'create') p.report.code = chipCode(number, p.index)
  }
}

/** Old files: "diameterNm=450; gapNm=50" → { diameterNm: 450, gapNm: 50 }. */
function parseDimensionText(rep: ImportRowReport, s: unknown): Record<string, number> {
  const out: Record<string, number> = {}
  if (s == null) return out
  for (const part of String(s)
    .split(/[;,\n]+/)
    .map((p) => p.trim())
    .filter(Boolean)) {
    const m = /^([A-Za-z]+)\s*[=:]\s*([+-]?[\d.]+(?:e[+-]?\d+)?)$/i.exec(part)
    if (!m) {
      fail(rep, 'Dimensions (nm)', `Cannot read "${part}": write name=value pairs such as diameterNm=450; gapNm=50`)
      continue
    }
    out[m[1]] = Number(m[2])
  }
  return out
}

/**
 * Dimensions of a row: the record's (an update), then the old text column, then the dimension columns (an empty cell
 * removes it).
 */
function dimensionsOfRow(
  rep: ImportRowReport,
  sheet: ReadSheet,
  v: ReadRow['values'],
  prev: Record<string, number> | undefined,
): Record<string, number> {
  const hasColumns = [...sheet.columns].some((c) => c.startsWith('dim:')) || sheet.columns.has('dimensionsNm')
  const out: Record<string, number> = { ...(prev && (!hasColumns || !sheet.columns.has('dimensionsNm')) ? prev : {}) }
  Object.assign(out, parseDimensionText(rep, v.dimensionsNm))
  for (const col of sheet.columns) {
    if (!col.startsWith('dim:')) continue
    const value = v[col]
    if (value == null) delete out[col.slice(4)]
    else out[col.slice(4)] = value as number
  }
  return out
}

const ARRAY_FIELDS = [
  'shape',
  'dimensionsNm',
  'shapeAzimuthDeg',
  'lattice',
  'periodXNm',
  'periodYNm',
  'azimuthDeg',
  'count',
  'customRotationOrder',
  'customMirrors',
  'notes',
] as const

async function checkArrays(sheet: ReadSheet, l: Lookups, chipPlans: ChipPlan[]): Promise<ArrayPlan[]> {
  const chipRows = byCode(chipPlans)
  const seen = new Map<string, number>(),
    seenPos = new Map<string, number>()
  const plans: ArrayPlan[] = []
  // Thousands of rows share a design on a wafer: derive each distinct one once per import (keyed
  // by its inputs as text, cheaper than the input hash deriveChannels computes for every call).
  const designs = new Map<string, ReturnType<typeof deriveChannels>>()
  const derive = (x: Parameters<typeof deriveChannels>[0]) => {
    const k = JSON.stringify([
      x.pointGroup,
      x.cutNormal,
      x.flatDirection,
      x.chipRotationDeg,
      x.shape,
      x.dimensionsNm,
      x.shapeAzimuthDeg,
      x.lattice,
      x.periodXNm,
      x.periodYNm,
      x.azimuthDeg,
      x.customRotationOrder,
      x.customMirrors,
    ])
    let d = designs.get(k)
    if (!d) designs.set(k, (d = deriveChannels(x)))
    return d
  }
  const show = shower(l)
  let nn = 0
  for (const r of consume(sheet)) {
    if (++nn % YIELD_EVERY === 0) await breathe()
    const v = r.values
    const rep = reportOf(
      'Arrays',
      r,
      `${v.shape ?? '?'} on ${v.lattice ?? '?'} lattice at ${v.position ?? '?'} of ${v.chip ?? '?'}`,
    )
    const { code, isOvertone } = codeCell('Arrays', rep, r, seen)
    const existing = isOvertone ? l.array.get(code!) : undefined
    if (isOvertone && !existing) fail(rep, 'Code', `No array ${code} in Overtone: leave Code empty to add a new array`)
    if (existing && r.skipKind === 'retired') reopen(rep, r)
    const dims = dimensionsOfRow(rep, sheet, v, existing?.a.dimensionsNm)
    const mirrors =
      v.customMirrors != null
        ? String(v.customMirrors)
            .split(/[,;\s]+/)
            .filter(Boolean)
            .map(Number)
        : undefined
    if (mirrors?.some((x) => !Number.isFinite(x)))
      fail(rep, 'Custom mirrors (°)', 'Give mirror angles as numbers in degrees, e.g. 0, 90')
    const raw: Record<string, unknown> = {
      chipId: 1,
      position: orUndef(v.position),
      shape: orUndef(v.shape),
      dimensionsNm: dims,
      shapeAzimuthDeg: orUndef(v.shapeAzimuthDeg),
      lattice: orUndef(v.lattice),
      periodXNm: v.periodXNm,
      periodYNm: v.periodYNm,
      azimuthDeg: orUndef(v.azimuthDeg),
      count: orUndef(v.count),
      customRotationOrder: v.customRotationOrder,
      customMirrors: mirrors?.every(Number.isFinite) ? mirrors : undefined,
      notes: v.notes,
    }
    if (existing) {
      for (const f of [
        'shapeAzimuthDeg',
        'periodXNm',
        'periodYNm',
        'azimuthDeg',
        'count',
        'customRotationOrder',
        'customMirrors',
        'notes',
      ])
        if (!sheet.columns.has(f)) raw[f] = existing.a[f as 'notes']
      if (mirrors === undefined && sheet.columns.has('customMirrors')) raw.customMirrors = null
    }
    const parsed = arraySchema.safeParse(raw)
    if (!parsed.success) zodInto(rep, 'Arrays', parsed.error)
    const c = key(v.chip)
    const local = chipRows.get(c)
    const onChip = local?.existing ?? (local ? undefined : l.chip.get(c))
    let chip: ChipTarget | null = null
    if (local && !local.existing) {
      chip = { plan: local }
      if (local.report.status === 'skip' && rep.status !== 'skip') {
        rep.status = 'skip'
        rep.messages.push(warn('Chip', `Its chip (Chips row ${local.report.row}) is skipped`))
      } else if (local.report.status === 'error')
        fail(rep, 'Chip', `Its chip (Chips row ${local.report.row}) has errors`)
    } else if (onChip) {
      // An existing chip updated by this file: its arrays are derived with the file's rotation.
      const rotation = local?.values.rotationDeg ?? onChip.c.rotationDeg
      chip = {
        existing: {
          id: onChip.c.id,
          code: onChip.c.code,
          rotationDeg: rotation,
          frame: { pointGroup: onChip.pointGroup, cutNormal: onChip.cutNormal, flatDirection: onChip.flatDirection },
        },
      }
      if (onChip.c.status === 'retired' && !existing)
        fail(rep, 'Chip', `${onChip.c.code} is retired; arrays cannot be added to it`)
    } else if (c) fail(rep, 'Chip', `No chip ${v.chip}: neither a Code on the Chips sheet nor a chip in Overtone`)
    const position = parsed.data?.position
    let derived: ArrayPlan['derived'] = null
    const plan: ArrayPlan = { report: rep, chip: chip!, input: undefined as never, derived }
    if (existing) {
      rep.code = existing.a.code
      plan.existing = existing
      if (c && c !== existing.chipCode)
        fail(rep, 'Chip', `${existing.a.code} is an array of ${existing.chipCode}: an array stays on its chip`)
      if (position && position !== existing.a.position)
        fail(
          rep,
          'Position',
          `${existing.a.code} is at ${existing.a.position}: the position is part of the code and stays`,
        )
      const change = parsed.data
        ? changesOf(
            'Arrays',
            Object.fromEntries(ARRAY_FIELDS.map((f) => [f, existing.a[f]])),
            Object.fromEntries(ARRAY_FIELDS.map((f) => [f, parsed.data[f]])),
            show,
          )
        : { audit: {}, report: [] }
      plan.change = change
      compareExisting(rep, change, v.version, existing.a.updatedAt, !!existing.a.retiredAt, 'array')
    } else if (chip && position && rep.status !== 'skip') {
      const slot = `${c}|${position}`
      if (seenPos.has(slot))
        fail(rep, 'Position', `Position ${position} of chip ${v.chip} appears twice (also row ${seenPos.get(slot)})`)
      else seenPos.set(slot, r.row)
      if ('existing' in chip && l.usedPos.has(`${chip.existing.id}|${position}`))
        fail(rep, 'Position', `${arrayCode(chip.existing.code, position)} already exists`)
    }
    if ((rep.status === 'create' || rep.status === 'update') && chip && parsed.data) {
      const frame =
        'plan' in chip
          ? 'plan' in chip.plan.wafer
            ? chip.plan.wafer.plan.frame
            : chip.plan.wafer.existing.frame
          : chip.existing.frame
      const rotation = 'plan' in chip ? chip.plan.values.rotationDeg : chip.existing.rotationDeg
      try {
        derived = derive({ ...frame, chipRotationDeg: rotation, ...parsed.data })
      } catch (e) {
        appErrorInto(rep, 'Arrays', e)
      }
      const chipCodeValue = 'plan' in chip ? chip.plan.report.code : chip.existing.code
      if (chipCodeValue && rep.status === 'create') rep.code = arrayCode(chipCodeValue, parsed.data.position)
    }
    const { chipId: _c, ...input } = parsed.data ?? ({} as ArrayInput)
    plan.input = input
    plan.derived = derived
    plans.push(plan)
  }
  return plans
}

/**
 * The sheet's rows, each let go as soon as it is taken (its plan keeps what it needs): the rows of
 * 100 000 arrays and their plans never sit in memory together.
 */
function* consume(sheet: ReadSheet): Generator<ReadRow> {
  const rows = sheet.rows
  sheet.rows = []
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i]
    ;(rows as (ReadRow | null)[])[i] = null
    yield r
  }
}

/**
 * A long check gives the event loop (other requests) and V8's incremental garbage collector a turn
 * every YIELD_EVERY rows: run in one go, 100 000 rows left ~350 MB of garbage in the old generation
 * before it was collected.
 */
const YIELD_EVERY = 1000
const breathe = () => new Promise<void>((resolve) => setImmediate(resolve))

/** Check all sheets; reports keep the file's row order per sheet. */
export async function checkImport(db: Db, sheets: ReadSheet[]): Promise<ImportPlan> {
  const byName = Object.fromEntries(sheets.map((s) => [s.name, s])) as Record<ImportSheetName, ReadSheet>
  const l = await lookups(db, byName)
  const w = checkWafers(byName.Wafers, l)
  const c = checkChips(byName.Chips, l, w)
  const a = await checkArrays(byName.Arrays, l, c)
  return { wafers: w, chips: c, arrays: a, reports: [...w, ...c, ...a].map((p) => p.report) }
}
