import { createHash } from 'node:crypto'
import { getTableColumns, inArray, sql, type SQL } from 'drizzle-orm'
import { arrays, auditLog, chips, moves, wafers, type AuditChanges, type User } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { ImportReport, ImportRowReport, ImportSheetReport, ImportSummary } from '../../../shared/excel'
import { ENGINE_VERSION } from '../../../shared/engine'
import { ConflictError } from '../../errors'
import { diffFields } from '../audit/audit'
import { saveChannelSets } from '../inventory/channel-sets'
import { arrayCode, chipCode, codeNumber, reserveCodeNumbers, waferCode } from '../inventory/codes'
import { markArraysStale } from '../inventory/materials'
import { loadWorkbook, readImportSheets, type ImportLimits, type ReadSheet } from './excel-import-read'
import { checkImport, type ImportPlan } from './excel-import-check'

/**
 * Import of a spreadsheet of wafers, chips and arrays: new records (rows without an Overtone code)
 * and updates of existing ones (rows whose Code names them, see excel-import-check.ts). `dryRun`
 * only reads and checks, and answers the report. A real import runs the same checks; with any
 * error or conflict it writes nothing, and when it is sent with the dry run's `planHash` it is
 * refused unless it would do exactly what that dry run showed.
 *
 * Writing, so that nobody else waits for a long import: first, in short transactions of their own,
 * the wafer numbers are reserved (one locked read of the code series, numbers then handed out in
 * memory) and the channel sets stored (content-addressed and immutable: an unused one is
 * harmless). Then ONE transaction writes every update (each record's version checked under a row
 * lock: changed since the check means nothing is written) and every new record, as multi-row
 * statements in chunks, each change with its audit row carrying the import's reason. It takes no
 * range or gap locks: only the rows it writes, and shared locks on the parent rows it adds to.
 */
const CHUNK = 500

const emptySummary = (): ImportSummary => ({ create: 0, update: 0, unchanged: 0, conflict: 0, error: 0 })
function summaryOf(rows: ImportRowReport[]): { summary: ImportSummary; skipped: number } {
  const summary = emptySummary()
  let skipped = 0
  for (const r of rows)
    if (r.status === 'skip') skipped++
    else summary[r.status]++
  return { summary, skipped }
}

/** Fingerprint of the plan: the file's bytes and every row's outcome (not the preview codes of new records). */
async function planHashOf(fileSha: string, rows: ImportRowReport[]): Promise<string> {
  const h = createHash('sha256').update(fileSha)
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i]
    h.update(
      JSON.stringify([r.sheet, r.row, r.status, r.status === 'create' ? null : r.code, r.changes, r.versions ?? null]),
    )
    if (i % 5000 === 4999) await new Promise<void>((resolve) => setImmediate(resolve)) // other requests get a turn
  }
  return h.digest('hex')
}

async function summarise(
  fileName: string,
  fileSha: string,
  dryRun: boolean,
  sheets: ReadSheet[],
  fileMessages: ImportReport['fileMessages'],
  plan: ImportPlan,
): Promise<ImportReport> {
  const sheetReports: ImportSheetReport[] = sheets.map((s) => {
    const rows = plan.reports.filter((r) => r.sheet === s.name)
    return { name: s.name, isPresent: s.isPresent, rows: rows.length, messages: s.messages, ...summaryOf(rows) }
  })
  const sheetErrors = sheets.reduce((n, s) => n + s.messages.filter((m) => m.level === 'error').length, 0)
  const { summary } = summaryOf(plan.reports)
  const errorCount = fileMessages.filter((m) => m.level === 'error').length + sheetErrors + summary.error
  return {
    dryRun,
    fileName,
    fileMessages,
    sheets: sheetReports,
    rows: plan.reports,
    summary,
    errorCount,
    planHash: await planHashOf(fileSha, plan.reports),
    imported: false,
    created: null,
    updated: null,
  }
}

export interface ImportOptions {
  /** Why the records change (kept in the audit trail with the file name). */
  reason?: string | null
  /** The dry run's planHash: the import is refused unless it would do exactly that. */
  planHash?: string | null
}

/**
 * Read, check and (unless dryRun, and only without errors or conflicts) import the workbook; `limits` guard against
 * hostile files.
 */
export async function importWorkbook(
  db: Db,
  actor: User,
  file: { buffer: Buffer; originalName: string } | undefined,
  dryRun: boolean,
  limits: Partial<ImportLimits> = {},
  opts: ImportOptions = {},
): Promise<ImportReport> {
  const book = await loadWorkbook(file?.buffer, limits)
  const { sheets, fileMessages } = await readImportSheets(book, limits)
  const plan = await checkImport(db, sheets)
  const fileSha = createHash('sha256').update(file!.buffer).digest('hex')
  const report = await summarise(file!.originalName, fileSha, dryRun, sheets, fileMessages, plan)
  if (dryRun || report.errorCount > 0 || report.summary.conflict > 0) return report
  if (opts.planHash && opts.planHash !== report.planHash) {
    throw new ConflictError(
      'Nothing was imported: the file or the records in Overtone changed since the dry run. Check the file again, then import what that check shows.',
    )
  }
  if (report.summary.create + report.summary.update === 0) {
    report.fileMessages.push({
      column: null,
      message: 'Nothing to import: every row is unchanged or skipped.',
      level: 'error',
    })
    report.errorCount++
    return report
  }
  const reason = [`Excel import: ${report.fileName}`, opts.reason?.trim()].filter(Boolean).join(' — ').slice(0, 500)
  try {
    await prepare(db, plan)
    const done = await db.transaction((tx) => writePlan(tx, actor, plan, reason))
    report.created = done.created
    report.updated = done.updated
  } catch (e) {
    const isDup =
      (e as { code?: string; cause?: { code?: string } }).code === 'ER_DUP_ENTRY' ||
      (e as { cause?: { code?: string } }).cause?.code === 'ER_DUP_ENTRY'
    if (isDup || e instanceof ConflictError)
      throw new ConflictError(
        `Nothing was imported: ${isDup ? 'a code or position was taken by someone else meanwhile' : (e as Error).message}. Run the dry run again.`,
      )
    throw e
  }
  report.imported = true
  return report
}

/**
 * Before the long transaction, each in a short one of its own: the numbers of the new wafers (one
 * locked read of the series, then assigned in memory; the preview codes of the dry run become the
 * final ones) and the channel sets of the arrays written.
 */
async function prepare(db: Db, plan: ImportPlan) {
  const newWafers = plan.wafers.filter((p) => p.report.status === 'create')
  const first = await reserveCodeNumbers(db, 'wafers', 'W', newWafers.length)
  newWafers.forEach((w, i) => {
    w.number = first + i
    w.report.code = waferCode(w.number)
  })
  const written = plan.arrays.filter((a) => (a.report.status === 'create' || a.report.status === 'update') && a.derived)
  await saveChannelSets(
    db,
    written.map((a) => ({ key: a.derived!.channelSetKey, channels: a.derived!.channels })),
  )
}

type Table = typeof wafers | typeof chips | typeof arrays
interface Update {
  id: number
  code: string
  version: Date
  set: Record<string, unknown>
  audit: AuditChanges
}

/**
 * Updates in chunks: lock the chunk's rows (primary key, nothing else), check each is still at
 * the version the check read (else nothing is written), then one UPDATE … CASE id … per chunk
 * and one multi-row INSERT of their audit rows.
 */
async function applyUpdates(
  tx: DbOrTx,
  actor: User,
  entity: 'wafer' | 'chip' | 'array',
  table: Table,
  items: Update[],
  reason: string,
) {
  const cols = getTableColumns(table) as unknown as Record<
    string,
    ReturnType<typeof getTableColumns<typeof wafers>>['id']
  >
  const now = new Date()
  for (let k = 0; k < items.length; k += CHUNK) {
    const part = items.slice(k, k + CHUNK)
    const ids = part.map((p) => p.id)
    const current = await (tx as Db)
      .select({ id: table.id, updatedAt: table.updatedAt })
      .from(table as typeof wafers)
      .where(inArray(table.id, ids))
      .for('update')
    const versionOf = new Map(current.map((r) => [r.id, r.updatedAt.getTime()]))
    for (const p of part)
      if (versionOf.get(p.id) !== p.version.getTime())
        throw new ConflictError(`${p.code} was changed by someone else during the import`)
    const keys = [...new Set(part.flatMap((p) => Object.keys(p.set)))]
    const sets: SQL[] = keys.map((key) => {
      const col = cols[key]
      const cases = part.filter((p) => key in p.set).map((p) => sql`WHEN ${p.id} THEN ${sql.param(p.set[key], col)}`)
      return sql`${sql.identifier(col.name)} = CASE ${sql.identifier('id')} ${sql.join(cases, sql` `)} ELSE ${sql.identifier(col.name)} END`
    })
    sets.push(sql`${sql.identifier('updated_at')} = ${now}`)
    await tx.execute(
      sql`UPDATE ${table} SET ${sql.join(sets, sql`, `)} WHERE ${sql.identifier('id')} IN (${sql.join(
        ids.map((id) => sql`${id}`),
        sql`, `,
      )})`,
    )
    await tx.insert(auditLog).values(
      part.map((p) => ({
        userId: actor.id,
        entity,
        entityId: p.id,
        action: 'update' as const,
        changes: p.audit,
        reason,
      })),
    )
  }
}

/** A location change of an updated wafer or chip is also a move (the item's move history). */
async function recordMoves(
  tx: DbOrTx,
  actor: User,
  kind: 'wafer' | 'chip',
  items: { id: number; code: string; audit: AuditChanges }[],
  reason: string,
) {
  const moved = items.filter((p) => p.audit.locationId)
  for (let k = 0; k < moved.length; k += CHUNK) {
    await tx.insert(moves).values(
      moved.slice(k, k + CHUNK).map((p) => ({
        itemKind: kind,
        itemId: p.id,
        itemCode: p.code,
        fromLocationId: (p.audit.locationId.from as number | null) ?? null,
        toLocationId: (p.audit.locationId.to as number | null) ?? null,
        movedBy: actor.id,
        note: reason,
      })),
    )
  }
}

/**
 * Refuse (roll back) when a parent that gets new rows was retired since the check; a shared lock keeps it so until the
 * commit.
 */
async function parentsStillOpen(tx: DbOrTx, table: 'wafers' | 'chips', ids: number[], what: string) {
  for (let k = 0; k < ids.length; k += CHUNK) {
    const list = sql.join(
      ids.slice(k, k + CHUNK).map((id) => sql`${id}`),
      sql`, `,
    )
    const [rows] = (await tx.execute(
      sql`SELECT code, status FROM ${sql.identifier(table)} WHERE id IN (${list}) LOCK IN SHARE MODE`,
    )) as unknown as [{ code: string; status: string }[]]
    const retired = rows.find((r) => r.status === 'retired')
    if (retired) throw new ConflictError(`${what} ${retired.code} was retired meanwhile`)
  }
}

/** Write the plan in the caller's transaction. */
async function writePlan(tx: DbOrTx, actor: User, plan: ImportPlan, reason: string) {
  const is = (s: string) => (p: { report: ImportRowReport }) => p.report.status === s
  // Updates: wafers, chips (a new rotation makes the chip's stored channels stale: arrays this
  // import writes are derived with the new rotation and written after), then arrays.
  const waferUpdates = plan.wafers.filter(is('update')).map((p) => ({
    id: p.existing!.w.id,
    code: p.existing!.w.code,
    version: p.existing!.w.updatedAt,
    audit: p.change!.audit,
    set: Object.fromEntries(Object.entries(p.change!.audit).map(([k, c]) => [k, c.to])),
  }))
  await applyUpdates(tx, actor, 'wafer', wafers, waferUpdates, reason)
  await recordMoves(tx, actor, 'wafer', waferUpdates, reason)
  const chipUpdates = plan.chips.filter(is('update')).map((p) => ({
    id: p.existing!.c.id,
    code: p.existing!.c.code,
    version: p.existing!.c.updatedAt,
    audit: p.change!.audit,
    set: Object.fromEntries(Object.entries(p.change!.audit).map(([k, c]) => [k, c.to])),
  }))
  await applyUpdates(tx, actor, 'chip', chips, chipUpdates, reason)
  await recordMoves(tx, actor, 'chip', chipUpdates, reason)
  const rotated = chipUpdates.filter((c) => c.audit.rotationDeg).map((c) => c.id)
  if (rotated.length) await markArraysStale(tx as unknown as Db, inArray(chips.id, rotated))

  const now = new Date()
  await applyUpdates(
    tx,
    actor,
    'array',
    arrays,
    plan.arrays.filter(is('update')).map((p) => {
      const d = p.derived!
      return {
        id: p.existing!.a.id,
        code: p.existing!.a.code,
        version: p.existing!.a.updatedAt,
        audit: p.change!.audit,
        set: {
          ...Object.fromEntries(Object.entries(p.change!.audit).map(([k, c]) => [k, c.to])),
          symmetryName: d.symmetryName,
          channelSetKey: d.channelSetKey,
          engineVersion: ENGINE_VERSION,
          channelsInputHash: d.hash,
          channelsComputedAt: now,
        },
      }
    }),
    reason,
  )

  // New wafers (numbers reserved before the transaction), chips, arrays: multi-row INSERTs in chunks.
  const newWafers = plan.wafers.filter(is('create'))
  const waferValues = newWafers.map((w) => {
    const i = w.input
    return {
      code: waferCode(w.number),
      materialId: i.materialId,
      cutNormal: i.cutNormal as [number, number, number],
      flatDirection: i.flatDirection as [number, number, number],
      diameterMm: i.diameterMm,
      thicknessUm: i.thicknessUm,
      lot: i.lot,
      supplier: i.supplier,
      receivedOn: i.receivedOn,
      locationId: i.locationId,
      status: i.status,
      notes: i.notes,
      createdBy: actor.id,
    }
  })
  const waferIds = await insertWithAudit(tx, actor, 'wafer', wafers, waferValues, reason)
  newWafers.forEach((w) => {
    w.id = waferIds.get(w.report.code!)
  })
  const created = { wafers: newWafers.map((w) => ({ id: w.id!, code: w.report.code! })), chips: 0, arrays: 0 }

  const chipRows = plan.chips.filter(is('create'))
  await parentsStillOpen(
    tx,
    'wafers',
    [...new Set(chipRows.flatMap((c) => ('existing' in c.wafer ? [c.wafer.existing.id] : [])))],
    'Wafer',
  )
  const chipValues = chipRows.map((c) => {
    const waferId = 'plan' in c.wafer ? c.wafer.plan.id! : c.wafer.existing.id
    const number = 'plan' in c.wafer ? c.wafer.plan.number : codeNumber(c.wafer.existing.code)
    c.report.code = chipCode(number, c.index!)
    return { code: c.report.code, waferId, index: c.index!, ...c.values }
  })
  const chipIds = await insertWithAudit(tx, actor, 'chip', chips, chipValues, reason)
  created.chips = chipIds.size

  const arrayRows = plan.arrays.filter(is('create'))
  await parentsStillOpen(
    tx,
    'chips',
    [...new Set(arrayRows.flatMap((a) => ('existing' in a.chip ? [a.chip.existing.id] : [])))],
    'Chip',
  )
  const arrayValues = arrayRows.map((a) => {
    const chipId = 'plan' in a.chip ? chipIds.get(a.chip.plan.report.code!)! : a.chip.existing.id
    const code = arrayCode('plan' in a.chip ? a.chip.plan.report.code! : a.chip.existing.code, a.input.position)
    a.report.code = code
    const d = a.derived!
    return {
      code,
      chipId,
      ...a.input,
      symmetryName: d.symmetryName,
      channelSetKey: d.channelSetKey,
      engineVersion: ENGINE_VERSION,
      channelsInputHash: d.hash,
      channelsComputedAt: now,
    }
  })
  created.arrays = (
    await insertWithAudit(tx, actor, 'array', arrays, arrayValues, reason, (v) => ({
      ...v,
      channelSetKey: undefined,
      channelsInputHash: undefined,
      channelsComputedAt: undefined,
    }))
  ).size

  // A new material, cut or flat of a wafer makes the stored channels of all its arrays stale (also those written
  // above).
  const reframed = waferUpdates
    .filter((w) => w.audit.materialId || w.audit.cutNormal || w.audit.flatDirection)
    .map((w) => w.id)
  if (reframed.length) await markArraysStale(tx as unknown as Db, inArray(chips.waferId, reframed))
  return {
    created,
    updated: {
      wafers: waferUpdates.length,
      chips: chipUpdates.length,
      arrays: plan.arrays.filter(is('update')).length,
    },
  }
}

/** Insert rows in chunks, read their ids back by code (unique), and add one audit row per record. */
async function insertWithAudit<V extends { code: string }>(
  tx: DbOrTx,
  actor: User,
  entity: 'wafer' | 'chip' | 'array',
  table: Table,
  values: V[],
  reason: string,
  auditView: (v: V) => Record<string, unknown> = (v) => v,
): Promise<Map<string, number>> {
  const ids = new Map<string, number>()
  for (let k = 0; k < values.length; k += CHUNK) {
    const part = values.slice(k, k + CHUNK)
    await tx.insert(table as typeof chips).values(part as never)
    const rows = await (tx as Db)
      .select({ id: table.id, code: table.code })
      .from(table as typeof chips)
      .where(
        inArray(
          table.code,
          part.map((v) => v.code),
        ),
      )
    for (const r of rows) ids.set(r.code, r.id)
    await tx.insert(auditLog).values(
      part.map((v) => ({
        userId: actor.id,
        entity,
        entityId: ids.get(v.code)!,
        action: 'create' as const,
        changes: diffFields({}, auditView(v)),
        reason,
      })),
    )
  }
  return ids
}
