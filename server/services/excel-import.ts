import { inArray, sql } from 'drizzle-orm'
import { arrays, auditLog, chips, wafers, type User } from '../db/schema/index'
import type { Db } from '../db/client'
import type { ImportReport, ImportSheetReport } from '../../shared/excel'
import { ENGINE_VERSION } from '../../shared/engine'
import { ConflictError } from '../errors'
import { diffFields, writeAudit, type DbOrTx } from './audit'
import { saveChannelSets } from './channel-sets'
import { arrayCode, chipCode, codeNumber, nextCodeNumber, waferCode } from './codes'
import { loadWorkbook, readImportSheets, type ImportLimits, type ReadSheet } from './excel-import-read'
import { checkImport, type ImportPlan } from './excel-import-check'

/**
 * Import of a legacy spreadsheet (Wafers, Chips, Arrays). `dryRun` only reads and checks, and
 * answers the row-by-row report. A real import first runs the same checks; with any error it
 * writes nothing. Otherwise every record and its audit row is written in ONE transaction (the
 * importing person is the author); any failure inside rolls everything back.
 */
const CHUNK = 500

function summarise(fileName: string, dryRun: boolean, sheets: ReadSheet[], fileMessages: ImportReport['fileMessages'], plan: ImportPlan): ImportReport {
  const sheetReports: ImportSheetReport[] = sheets.map((s) => {
    const rows = plan.reports.filter((r) => r.sheet === s.name)
    return {
      name: s.name, isPresent: s.isPresent, rows: rows.length, messages: s.messages,
      create: rows.filter((r) => r.status === 'create').length, errors: rows.filter((r) => r.status === 'error').length, skipped: rows.filter((r) => r.status === 'skip').length,
    }
  })
  const sheetErrors = sheets.reduce((n, s) => n + s.messages.filter((m) => m.level === 'error').length, 0)
  const errorCount = fileMessages.filter((m) => m.level === 'error').length + sheetErrors + sheetReports.reduce((n, s) => n + s.errors, 0)
  return {
    dryRun, fileName, fileMessages, sheets: sheetReports, rows: plan.reports, errorCount,
    createCount: sheetReports.reduce((n, s) => n + s.create, 0), imported: false, created: null,
  }
}

/** Read, check and (unless dryRun, and only without errors) import the workbook; `limits` guard against hostile files. */
export async function importWorkbook(
  db: Db, actor: User, file: { buffer: Buffer; originalName: string } | undefined, dryRun: boolean, limits: Partial<ImportLimits> = {},
): Promise<ImportReport> {
  const book = await loadWorkbook(file?.buffer, limits)
  const { sheets, fileMessages } = readImportSheets(book, limits)
  const plan = await checkImport(db, sheets)
  const report = summarise(file!.originalName, dryRun, sheets, fileMessages, plan)
  if (dryRun || report.errorCount > 0) return report
  if (report.createCount === 0) {
    report.fileMessages.push({ column: null, message: 'Nothing to import: the file has no rows to create.', level: 'error' })
    report.errorCount++
    return report
  }
  try {
    report.created = await db.transaction((tx) => writePlan(tx, actor, plan, report.fileName))
  } catch (e) {
    const isDup = (e as { code?: string; cause?: { code?: string } }).code === 'ER_DUP_ENTRY' || (e as { cause?: { code?: string } }).cause?.code === 'ER_DUP_ENTRY'
    if (isDup || e instanceof ConflictError) throw new ConflictError(`Nothing was imported: ${isDup ? 'a code or position was taken by someone else meanwhile' : (e as Error).message}. Run the dry run again.`)
    throw e
  }
  report.imported = true
  return report
}

/** Write every planned record in the caller's transaction, with one audit row each. */
async function writePlan(tx: DbOrTx, actor: User, plan: ImportPlan, fileName: string) {
  const reason = `Excel import: ${fileName}`.slice(0, 500)
  const created = { wafers: [] as { id: number; code: string }[], chips: 0, arrays: 0 }
  for (const w of plan.wafers.filter((p) => p.report.status === 'create')) {
    const code = waferCode(await nextCodeNumber(tx, 'wafers', 'W'))
    const i = w.input
    const v = { code, materialId: i.materialId, cutNormal: i.cutNormal as [number, number, number], flatDirection: i.flatDirection as [number, number, number], diameterMm: i.diameterMm, thicknessUm: i.thicknessUm, lot: i.lot, supplier: i.supplier, receivedOn: i.receivedOn, locationId: i.locationId, status: i.status, notes: i.notes, createdBy: actor.id }
    const [{ id }] = await tx.insert(wafers).values(v).$returningId()
    await writeAudit(tx, { userId: actor.id, entity: 'wafer', entityId: id, action: 'create', changes: diffFields({}, v), reason })
    w.id = id
    w.report.code = code
    created.wafers.push({ id, code })
  }
  const chipRows = plan.chips.filter((p) => p.report.status === 'create')
  const existingWafers = [...new Set(chipRows.flatMap((c) => ('existing' in c.wafer ? [c.wafer.existing.id] : [])))]
  if (existingWafers.length) await tx.execute(sql`SELECT id FROM wafers WHERE id IN (${sql.join(existingWafers.map((id) => sql`${id}`), sql`, `)}) FOR UPDATE`)
  const chipValues = chipRows.map((c) => {
    const waferId = 'plan' in c.wafer ? c.wafer.plan.id! : c.wafer.existing.id
    const number = 'plan' in c.wafer ? codeNumber(c.wafer.plan.report.code!) : codeNumber(c.wafer.existing.code)
    c.report.code = chipCode(number, c.index!)
    return { code: c.report.code, waferId, index: c.index!, ...c.values }
  })
  const chipIds = await insertWithAudit(tx, actor, 'chip', chips, chipValues, reason)
  created.chips = chipIds.size
  const arrayValues = plan.arrays.filter((p) => p.report.status === 'create').map((a) => {
    const chipId = 'plan' in a.chip ? chipIds.get(a.chip.plan.report.code!)! : a.chip.existing.id
    const code = arrayCode('plan' in a.chip ? a.chip.plan.report.code! : a.chip.existing.code, a.input.position)
    a.report.code = code
    const d = a.derived!
    return {
      code, chipId, ...a.input, symmetryName: d.symmetryName, channelSetKey: d.channelSetKey, engineVersion: ENGINE_VERSION,
      channelsInputHash: d.hash, channelsComputedAt: new Date(),
    }
  })
  await saveChannelSets(tx, plan.arrays.filter((p) => p.report.status === 'create').map((a) => ({ key: a.derived!.channelSetKey, channels: a.derived!.channels })))
  created.arrays = (await insertWithAudit(tx, actor, 'array', arrays, arrayValues, reason, (v) => ({ ...v, channelSetKey: undefined, channelsInputHash: undefined, channelsComputedAt: undefined }))).size
  return created
}

/** Insert rows in chunks, read their ids back by code (unique), and add one audit row per record. */
async function insertWithAudit<V extends { code: string }>(
  tx: DbOrTx, actor: User, entity: 'chip' | 'array', table: typeof chips | typeof arrays, values: V[], reason: string,
  auditView: (v: V) => Record<string, unknown> = (v) => v,
): Promise<Map<string, number>> {
  const ids = new Map<string, number>()
  for (let k = 0; k < values.length; k += CHUNK) {
    const part = values.slice(k, k + CHUNK)
    await tx.insert(table as typeof chips).values(part as never)
    const rows = await (tx as Db).select({ id: table.id, code: table.code }).from(table as typeof chips).where(inArray(table.code, part.map((v) => v.code)))
    for (const r of rows) ids.set(r.code, r.id)
    await tx.insert(auditLog).values(part.map((v) => ({ userId: actor.id, entity, entityId: ids.get(v.code)!, action: 'create' as const, changes: diffFields({}, auditView(v)), reason })))
  }
  return ids
}
