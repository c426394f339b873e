import { eq, inArray, isNull, sql } from 'drizzle-orm'
import type { z } from 'zod'
import { arrays, chips, locations, materials, wafers } from '../db/schema/index'
import type { Db } from '../db/client'
import { arraySchema, CHIP_STATUSES, diceSchema, waferSchema, type ArrayInput, type WaferInput } from '../../shared/schemas/records'
import type { ImportMessage, ImportRowReport, ImportSheetName } from '../../shared/excel'
import { AppError } from '../errors'
import { IMPORT_COLUMNS } from './excel-columns'
import type { ReadRow, ReadSheet } from './excel-import-read'
import { MAX_CHIP_INDEX, arrayCode, chipCode, codeNumber, waferCode } from './codes'
import { deriveChannels } from './array-channels'

/**
 * Check every row against the database and the shared zod schemas, resolve references between the
 * sheets (a chip's Wafer is a Ref on the Wafers sheet, else an existing wafer code; an array's Chip
 * likewise), find duplicates, and preview the codes. The result is the plan the import carries out.
 */
type Frame = { pointGroup: string; cutNormal: [number, number, number]; flatDirection: [number, number, number] }
export interface WaferPlan { report: ImportRowReport; input: WaferInput; number: number; frame: Frame; id?: number }
type WaferTarget = { plan: WaferPlan } | { existing: { id: number; code: string; frame: Frame } }
export interface ChipPlan {
  report: ImportRowReport; wafer: WaferTarget; index: number | null
  values: { rotationDeg: number; widthMm: number; heightMm: number; locationId: number | null; status: (typeof CHIP_STATUSES)[number]; notes: string | null }
}
type ChipTarget = { plan: ChipPlan } | { existing: { id: number; code: string; rotationDeg: number; frame: Frame } }
export interface ArrayPlan { report: ImportRowReport; chip: ChipTarget; input: Omit<ArrayInput, 'chipId'>; derived: ReturnType<typeof deriveChannels> | null }
export interface ImportPlan { wafers: WaferPlan[]; chips: ChipPlan[]; arrays: ArrayPlan[]; reports: ImportRowReport[] }

const key = (s: unknown) => String(s ?? '').trim().toUpperCase()
const err = (column: string | null, message: string): ImportMessage => ({ column, message, level: 'error' })
const headerOf = (sheet: ImportSheetName, k: string) => IMPORT_COLUMNS[sheet].find((c) => c.key === k)?.header ?? null
const vec = (s: unknown) => String(s).split(' ').map(Number) as [number, number, number]
const orUndef = <T>(v: T | null | undefined) => (v === null ? undefined : v)

function reportOf(sheet: ImportSheetName, r: ReadRow, summary: string): ImportRowReport {
  const ref = r.values.ref != null ? String(r.values.ref) : null
  return { sheet, row: r.row, status: r.skip ? 'skip' : r.messages.length ? 'error' : 'create', ref, code: null, summary, messages: r.skip ? [{ column: null, message: r.skip, level: 'warning' }] : [...r.messages] }
}
function fail(rep: ImportRowReport, column: string | null, message: string) {
  rep.messages.push(err(column, message))
  if (rep.status !== 'skip') rep.status = 'error'
}
/** Zod issues → messages on the column the field comes from. */
function zodInto(rep: ImportRowReport, sheet: ImportSheetName, error: z.ZodError) {
  const flagged = new Set(rep.messages.map((m) => m.column))
  for (const i of error.issues) {
    const column = headerOf(sheet, String(i.path[0] ?? ''))
    if (!flagged.has(column)) fail(rep, column, i.message)
  }
}
/** An engine or service error (field-level 400) on the row. */
function appErrorInto(rep: ImportRowReport, sheet: ImportSheetName, e: unknown) {
  if (!(e instanceof AppError)) throw e
  const fields = Object.entries(e.fields ?? { _: [e.message] })
  for (const [f, msgs] of fields) for (const m of msgs) fail(rep, headerOf(sheet, f), m)
}

/** Ref → the FIRST row with it (a later duplicate is itself the error). */
function firstByRef<P extends { report: ImportRowReport }>(plans: P[]): Map<string, P> {
  const m = new Map<string, P>()
  for (const p of plans) if (p.report.ref && !m.has(key(p.report.ref))) m.set(key(p.report.ref), p)
  return m
}

async function lookups(db: Db, sheets: Record<ImportSheetName, ReadSheet>) {
  const mats = await db.select({ id: materials.id, name: materials.name, pointGroup: materials.pointGroup }).from(materials).where(isNull(materials.retiredAt))
  const locs = await db.select({ id: locations.id, code: locations.code }).from(locations).where(isNull(locations.retiredAt))
  const waferCodes = [...new Set(sheets.Chips.rows.map((r) => key(r.values.wafer)).filter((c) => /^W-\d+$/.test(c)))]
  const chipCodes = [...new Set(sheets.Arrays.rows.map((r) => key(r.values.chip)).filter((c) => /^C-\d+-\d+$/.test(c)))]
  const ws = waferCodes.length ? await db.select({ id: wafers.id, code: wafers.code, status: wafers.status, cutNormal: wafers.cutNormal, flatDirection: wafers.flatDirection, pointGroup: materials.pointGroup })
    .from(wafers).innerJoin(materials, eq(materials.id, wafers.materialId)).where(inArray(wafers.code, waferCodes)) : []
  const usedIdx = ws.length ? await db.select({ waferId: chips.waferId, index: chips.index }).from(chips).where(inArray(chips.waferId, ws.map((w) => w.id))) : []
  const cs = chipCodes.length ? await db.select({ id: chips.id, code: chips.code, status: chips.status, rotationDeg: chips.rotationDeg, cutNormal: wafers.cutNormal, flatDirection: wafers.flatDirection, pointGroup: materials.pointGroup })
    .from(chips).innerJoin(wafers, eq(wafers.id, chips.waferId)).innerJoin(materials, eq(materials.id, wafers.materialId)).where(inArray(chips.code, chipCodes)) : []
  const usedPos = cs.length ? await db.select({ chipId: arrays.chipId, position: arrays.position }).from(arrays).where(inArray(arrays.chipId, cs.map((c) => c.id))) : []
  const [[{ n }]] = (await db.execute(sql`SELECT MAX(CAST(SUBSTRING(code, 3) AS UNSIGNED)) AS n FROM wafers WHERE code LIKE 'W-%'`)) as unknown as [{ n: number | null }[]]
  return {
    material: new Map(mats.map((m) => [m.name.trim().toLowerCase(), m])), location: new Map(locs.map((l) => [l.code, l.id])),
    wafer: new Map(ws.map((w) => [w.code, w])), chip: new Map(cs.map((c) => [c.code, c])), nextWafer: Number(n ?? 0) + 1,
    usedIdx: new Set(usedIdx.map((u) => `${u.waferId}|${u.index}`)), usedPos: new Set(usedPos.map((u) => `${u.chipId}|${u.position}`)),
  }
}
type Lookups = Awaited<ReturnType<typeof lookups>>

function locationId(l: Lookups, rep: ImportRowReport, v: unknown): number | null {
  if (v == null) return null
  const id = l.location.get(key(v))
  if (!id) fail(rep, 'Location', `No location ${key(v)} in Overtone (give a location code such as L-0003)`)
  return id ?? null
}

function checkWafers(sheet: ReadSheet, l: Lookups): WaferPlan[] {
  const plans: WaferPlan[] = []
  const seen = new Map<string, number>()
  let next = l.nextWafer
  for (const r of sheet.rows) {
    const v = r.values
    const rep = reportOf('Wafers', r, `${v.material ?? '?'} ${v.cutNormal ?? ''}, lot ${v.lot ?? '?'}, ${v.diameterMm ?? '?'} mm`)
    const mat = v.material != null ? l.material.get(String(v.material).trim().toLowerCase()) : undefined
    if (v.material != null && !mat) fail(rep, 'Material', `No material named "${v.material}" in Overtone (register it first, or pick one from the template's list)`)
    const parsed = waferSchema.safeParse({
      materialId: mat?.id ?? 1, cutNormal: v.cutNormal != null ? vec(v.cutNormal) : undefined, flatDirection: v.flatDirection != null ? vec(v.flatDirection) : undefined,
      diameterMm: orUndef(v.diameterMm), thicknessUm: orUndef(v.thicknessUm), lot: orUndef(v.lot), supplier: v.supplier, receivedOn: v.receivedOn,
      locationId: locationId(l, rep, v.location), status: orUndef(v.status), notes: v.notes,
    })
    if (!parsed.success) zodInto(rep, 'Wafers', parsed.error)
    const k = key(v.ref)
    if (k && seen.has(k) && rep.status !== 'skip') fail(rep, 'Ref', `Ref ${v.ref} is used twice (also row ${seen.get(k)})`)
    else if (k) seen.set(k, r.row)
    const plan: WaferPlan = { report: rep, input: parsed.data!, number: 0, frame: { pointGroup: mat?.pointGroup ?? '1', cutNormal: parsed.data?.cutNormal as Frame['cutNormal'], flatDirection: parsed.data?.flatDirection as Frame['flatDirection'] } }
    if (rep.status === 'create') { plan.number = next++; rep.code = waferCode(plan.number) }
    plans.push(plan)
  }
  return plans
}

function checkChips(sheet: ReadSheet, l: Lookups, waferPlans: WaferPlan[]): ChipPlan[] {
  const byRef = firstByRef(waferPlans)
  const seenRef = new Map<string, number>(), seenIdx = new Map<string, number>()
  const plans: ChipPlan[] = []
  for (const r of sheet.rows) {
    const v = r.values
    const rep = reportOf('Chips', r, `chip ${v.index ?? '(next)'} of ${v.wafer ?? '?'}, ${v.widthMm ?? '?'} × ${v.heightMm ?? '?'} mm`)
    const parsed = diceSchema.pick({ rotationDeg: true, widthMm: true, heightMm: true, notes: true }).safeParse({ rotationDeg: orUndef(v.rotationDeg), widthMm: orUndef(v.widthMm), heightMm: orUndef(v.heightMm), notes: v.notes })
    if (!parsed.success) zodInto(rep, 'Chips', parsed.error)
    const w = key(v.wafer)
    const local = byRef.get(w)
    const existing = local ? undefined : l.wafer.get(w)
    let wafer: WaferTarget | null = null
    if (local) {
      wafer = { plan: local }
      if (local.report.status === 'skip' && rep.status !== 'skip') { rep.status = 'skip'; rep.messages.push({ column: 'Wafer', message: `Its wafer (Wafers row ${local.report.row}) is skipped`, level: 'warning' }) }
      else if (local.report.status === 'error') fail(rep, 'Wafer', `Its wafer (Wafers row ${local.report.row}) has errors`)
    } else if (existing) {
      wafer = { existing: { id: existing.id, code: existing.code, frame: existing } }
      if (existing.status === 'retired') fail(rep, 'Wafer', `${existing.code} is retired; chips cannot be added to it`)
    } else if (w) fail(rep, 'Wafer', `No wafer ${v.wafer} on the Wafers sheet (Ref) or in Overtone (code)`)
    const index = typeof v.index === 'number' ? v.index : null
    if (index !== null && (index < 1 || index > MAX_CHIP_INDEX)) fail(rep, 'Index', `The chip number must be 1–${MAX_CHIP_INDEX}`)
    if (index !== null && wafer && rep.status !== 'skip') {
      const slot = `${w}|${index}`
      if (seenIdx.has(slot)) fail(rep, 'Index', `Chip ${index} of wafer ${v.wafer} appears twice (also row ${seenIdx.get(slot)})`)
      else seenIdx.set(slot, r.row)
      if ('existing' in wafer && l.usedIdx.has(`${wafer.existing.id}|${index}`)) fail(rep, 'Index', `${chipCode(codeNumber(wafer.existing.code), index)} already exists`)
    }
    const k = key(v.ref)
    if (k && seenRef.has(k) && rep.status !== 'skip') fail(rep, 'Ref', `Ref ${v.ref} is used twice (also row ${seenRef.get(k)})`)
    else if (k) seenRef.set(k, r.row)
    const values = { rotationDeg: parsed.data?.rotationDeg ?? 0, widthMm: parsed.data?.widthMm ?? 0, heightMm: parsed.data?.heightMm ?? 0, locationId: locationId(l, rep, v.location), status: (v.status ?? 'in_stock') as ChipPlan['values']['status'], notes: parsed.data?.notes ?? null }
    plans.push({ report: rep, wafer: wafer!, index, values })
  }
  assignChipIndices(plans, l)
  return plans
}

/** Chips without an Index get the next free number of their wafer, after the taken ones. */
function assignChipIndices(plans: ChipPlan[], l: Lookups) {
  const last = new Map<string, number>()
  const waferKey = (p: ChipPlan) => ('plan' in p.wafer ? `row${p.wafer.plan.report.row}` : p.wafer.existing.code)
  for (const p of plans) if (p.wafer && p.index !== null) last.set(waferKey(p), Math.max(last.get(waferKey(p)) ?? 0, p.index))
  for (const u of l.usedIdx) {
    const [id, idx] = u.split('|').map(Number)
    const w = [...l.wafer.values()].find((x) => x.id === id)
    if (w) last.set(w.code, Math.max(last.get(w.code) ?? 0, idx))
  }
  for (const p of plans) {
    if (!p.wafer || p.report.status === 'skip') continue
    if (p.index === null) {
      const n = (last.get(waferKey(p)) ?? 0) + 1
      if (n > MAX_CHIP_INDEX) { fail(p.report, 'Index', `The wafer has no free chip number left (they stop at ${MAX_CHIP_INDEX})`); continue }
      last.set(waferKey(p), n)
      p.index = n
    }
    const number = 'plan' in p.wafer ? p.wafer.plan.number : codeNumber(p.wafer.existing.code)
    if (p.report.status === 'create') p.report.code = chipCode(number, p.index)
  }
}

/** "diameterNm=450; heightNm=300" → { diameterNm: 450, heightNm: 300 }. */
function parseDimensions(rep: ImportRowReport, s: unknown): Record<string, number> | undefined {
  if (s == null) return undefined
  const out: Record<string, number> = {}
  for (const part of String(s).split(/[;,\n]+/).map((p) => p.trim()).filter(Boolean)) {
    const m = /^([A-Za-z]+)\s*[=:]\s*([+-]?[\d.]+(?:e[+-]?\d+)?)$/i.exec(part)
    if (!m) { fail(rep, 'Dimensions (nm)', `Cannot read "${part}": write name=value pairs such as diameterNm=450; heightNm=300`); continue }
    out[m[1]] = Number(m[2])
  }
  return out
}

function checkArrays(sheet: ReadSheet, l: Lookups, chipPlans: ChipPlan[]): ArrayPlan[] {
  const byRef = firstByRef(chipPlans)
  const seenPos = new Map<string, number>()
  const plans: ArrayPlan[] = []
  for (const r of sheet.rows) {
    const v = r.values
    const rep = reportOf('Arrays', r, `${v.shape ?? '?'} on ${v.lattice ?? '?'} lattice at ${v.position ?? '?'} of ${v.chip ?? '?'}`)
    const dims = parseDimensions(rep, v.dimensionsNm)
    const mirrors = v.customMirrors != null ? String(v.customMirrors).split(/[,;\s]+/).filter(Boolean).map(Number) : undefined
    if (mirrors?.some((x) => !Number.isFinite(x))) fail(rep, 'Custom mirrors (°)', 'Give mirror angles as numbers in degrees, e.g. 0, 90')
    const parsed = arraySchema.safeParse({
      chipId: 1, position: orUndef(v.position), shape: orUndef(v.shape), dimensionsNm: dims, shapeAzimuthDeg: orUndef(v.shapeAzimuthDeg), lattice: orUndef(v.lattice),
      periodXNm: v.periodXNm, periodYNm: v.periodYNm, azimuthDeg: orUndef(v.azimuthDeg), count: orUndef(v.count), customRotationOrder: v.customRotationOrder,
      customMirrors: mirrors?.every(Number.isFinite) ? mirrors : undefined, notes: v.notes,
    })
    if (!parsed.success) zodInto(rep, 'Arrays', parsed.error)
    const c = key(v.chip)
    const local = byRef.get(c)
    const existing = local ? undefined : l.chip.get(c)
    let chip: ChipTarget | null = null
    if (local) {
      chip = { plan: local }
      if (local.report.status === 'skip' && rep.status !== 'skip') { rep.status = 'skip'; rep.messages.push({ column: 'Chip', message: `Its chip (Chips row ${local.report.row}) is skipped`, level: 'warning' }) }
      else if (local.report.status === 'error') fail(rep, 'Chip', `Its chip (Chips row ${local.report.row}) has errors`)
    } else if (existing) {
      chip = { existing: { id: existing.id, code: existing.code, rotationDeg: existing.rotationDeg, frame: existing } }
      if (existing.status === 'retired') fail(rep, 'Chip', `${existing.code} is retired; arrays cannot be added to it`)
    } else if (c) fail(rep, 'Chip', `No chip ${v.chip} on the Chips sheet (Ref) or in Overtone (code)`)
    const position = parsed.data?.position
    if (chip && position && rep.status !== 'skip') {
      const slot = `${c}|${position}`
      if (seenPos.has(slot)) fail(rep, 'Position', `Position ${position} of chip ${v.chip} appears twice (also row ${seenPos.get(slot)})`)
      else seenPos.set(slot, r.row)
      if ('existing' in chip && l.usedPos.has(`${chip.existing.id}|${position}`)) fail(rep, 'Position', `${arrayCode(chip.existing.code, position)} already exists`)
    }
    let derived: ArrayPlan['derived'] = null
    if (rep.status === 'create' && chip && parsed.data) {
      const frame = 'plan' in chip ? ('plan' in chip.plan.wafer ? chip.plan.wafer.plan.frame : chip.plan.wafer.existing.frame) : chip.existing.frame
      const rotation = 'plan' in chip ? chip.plan.values.rotationDeg : chip.existing.rotationDeg
      try { derived = deriveChannels({ ...frame, chipRotationDeg: rotation, ...parsed.data }) } catch (e) { appErrorInto(rep, 'Arrays', e) }
      const chipCodeValue = 'plan' in chip ? chip.plan.report.code : chip.existing.code
      if (chipCodeValue && rep.status === 'create') rep.code = arrayCode(chipCodeValue, parsed.data.position)
    }
    const { chipId: _c, ...input } = parsed.data ?? ({} as ArrayInput)
    plans.push({ report: rep, chip: chip!, input, derived })
  }
  return plans
}

/** Check all sheets; reports keep the file's row order per sheet. */
export async function checkImport(db: Db, sheets: ReadSheet[]): Promise<ImportPlan> {
  const byName = Object.fromEntries(sheets.map((s) => [s.name, s])) as Record<ImportSheetName, ReadSheet>
  const l = await lookups(db, byName)
  const w = checkWafers(byName.Wafers, l)
  const c = checkChips(byName.Chips, l, w)
  const a = checkArrays(byName.Arrays, l, c)
  return { wafers: w, chips: c, arrays: a, reports: [...w, ...c, ...a].map((p) => p.report) }
}
