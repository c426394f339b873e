import ExcelJS from 'exceljs'
import { randomUUID } from 'node:crypto'
import fs from 'node:fs/promises'
import path from 'node:path'
import { and, eq, gte, lt, notInArray, sql } from 'drizzle-orm'
import type { Db } from '../../db/client'
import { exportJobs, files, users, type ExportJobRow, type User } from '../../db/schema/index'
import type { ExportJob, ExportPhase } from '../../../shared/excel'
import { ENGINE_VERSION } from '../../../shared/engine'
import { NotFoundError, ConflictError } from '../../errors'
import type { FileStorage } from '../files/storage'
import { addStyledSheet, rememberPlainStyles } from './excel-style'
import {
  writeArrays,
  writeChips,
  writeFabSteps,
  writeFiles,
  writeLaserSetups,
  writeLocations,
  writeMaterials,
  writeMoves,
  writeSessions,
  writeWafers,
  type SheetContext,
} from './excel-export-sheets'

/**
 * Inventory export jobs. A job streams one workbook (exceljs WorkbookWriter, rows committed as they
 * are written) to a temp file `${DATA_DIR}/exports/<id>.xlsx` on the disk of the app server that
 * runs it; when it is complete the workbook goes into the shared FileStorage (content-addressed,
 * like uploads) and the temp file is removed.
 *
 * Job state is a row of `export_jobs` in MariaDB, so any app server answers the progress poll and
 * the download (which streams from the FileStorage): app servers keep no export state. The running
 * job writes its row at every phase change, its progress at most every PROGRESS_MS, and at least
 * every HEARTBEAT_MS (updated_at is its heartbeat). A job not done or failed whose row has not
 * been written for the staleness (EXPORT_STALE_S, default STALE_MS) is shown as failed (its server stopped) and no
 * longer blocks its
 * owner's next export; the next sweep marks it failed in the table, so a late write of that server
 * cannot revive it (its writes only touch rows not yet done or failed, and it gives up when its row
 * is gone or failed). Jobs and their workbooks expire an hour after they started: swept when an
 * export starts and every ten minutes by each app server (server/index.ts), never removing a blob
 * that a `files` row (an upload of the same bytes) or another job still names. App servers'
 * clocks must agree to well within STALE_MS.
 */
const TTL_MS = 60 * 60 * 1000
/** A job whose server has not written its row for this long is shown as failed (default; `EXPORT_STALE_S`). */
export const STALE_MS = 2 * 60 * 1000
let staleMs = STALE_MS
/**
 * The running job writes its row at least this often, even when a step makes no progress (a quarter of the staleness,
 * at most 15 s).
 */
let heartbeatMs = 15_000
/** Set the staleness from the configuration (`EXPORT_STALE_S`, called by createApp). */
export function setExportStaleness(ms: number): void {
  staleMs = ms
  heartbeatMs = Math.min(15_000, Math.floor(ms / 4))
}
/** And its progress at most this often (rows are counted in memory in between). */
const PROGRESS_MS = 500
const STALE_ERROR = 'The export stopped: the app server writing it stopped; start a new export.'
const FINISHED: ExportPhase[] = ['done', 'failed']

const exportDir = (dataDir: string) => path.resolve(dataDir, 'exports')
const stamp = (d: Date) => d.toISOString().slice(0, 16).replace(/[-:]/g, '').replace('T', '-')
const isStale = (row: ExportJobRow, now: number) =>
  !FINISHED.includes(row.phase) && now - row.updatedAt.getTime() > staleMs

/** The API shape of a job row; a stale running job is reported failed. */
function publicJob(row: ExportJobRow, now = Date.now()): ExportJob {
  const stale = isStale(row, now)
  return {
    id: row.id,
    phase: stale ? 'failed' : row.phase,
    done: row.done,
    total: row.total,
    startedAt: row.startedAt.toISOString(),
    finishedAt: stale ? row.updatedAt.toISOString() : (row.finishedAt?.toISOString() ?? null),
    fileName: row.fileName,
    sizeBytes: row.sizeBytes,
    error: stale ? STALE_ERROR : row.error,
  }
}

/**
 * Are these bytes still named by an uploaded file (a `files` row, retired or not) or by an export job younger than an
 * hour?
 */
async function blobInUse(db: Db, sha256: string, now: number): Promise<boolean> {
  const [rows] = (await db.execute(sql`SELECT EXISTS (SELECT 1 FROM ${files} WHERE ${files.sha256} = ${sha256})
    OR EXISTS (SELECT 1 FROM ${exportJobs} WHERE ${exportJobs.blobSha256} = ${sha256} AND ${exportJobs.startedAt} >= ${new Date(now - TTL_MS)}) AS used`)) as unknown as [
    { used: number | string }[],
  ]
  return Number(rows[0].used) === 1
}

/**
 * Expire exports: mark jobs whose server stopped as failed; remove jobs older than an hour with
 * their workbooks (unless the same bytes are still named elsewhere); remove temp files older than
 * an hour (left by a server that stopped mid-export). A job whose workbook cannot be removed now
 * (storage unreachable) keeps its row and is tried again by the next sweep.
 */
export async function sweepExports(db: Db, storage: FileStorage, dataDir: string, now = Date.now()): Promise<void> {
  await db
    .update(exportJobs)
    .set({ phase: 'failed', error: STALE_ERROR, finishedAt: sql`${exportJobs.updatedAt}` })
    .where(and(notInArray(exportJobs.phase, FINISHED), lt(exportJobs.updatedAt, new Date(now - staleMs))))
  const expired = await db
    .select({ id: exportJobs.id, blob: exportJobs.blobSha256 })
    .from(exportJobs)
    .where(lt(exportJobs.startedAt, new Date(now - TTL_MS)))
  for (const job of expired) {
    try {
      if (job.blob && !(await blobInUse(db, job.blob, now))) await storage.remove(job.blob)
      await db.delete(exportJobs).where(eq(exportJobs.id, job.id))
    } catch {
      /* kept for the next sweep */
    }
  }
  const dir = exportDir(dataDir)
  const names = await fs.readdir(dir).catch(() => [] as string[])
  for (const name of names) {
    const p = path.join(dir, name)
    const st = await fs.stat(p).catch(() => null)
    if (st && now - st.mtimeMs > TTL_MS) await fs.rm(p, { force: true })
  }
}

async function countRows(db: Db): Promise<number> {
  const [rows] =
    (await db.execute(sql`SELECT (SELECT count(*) FROM materials) + (SELECT count(*) FROM wafers) + (SELECT count(*) FROM chips)
    + (SELECT count(*) FROM arrays) + (SELECT count(*) FROM session_results) + (SELECT count(*) FROM locations)
    + (SELECT count(*) FROM fab_steps) + (SELECT count(*) FROM laser_setups) + (SELECT count(*) FROM moves) + (SELECT count(*) FROM files) AS n`)) as unknown as [
      { n: number | string }[],
    ]
  return Number(rows[0].n)
}

function writeAbout(book: Pick<ExcelJS.Workbook, 'addWorksheet'>, actor: User, at: Date) {
  const ws = addStyledSheet(book, 'About', [
    { header: 'Item', key: 'item', width: 22 },
    { header: 'Value', key: 'value', width: 90 },
  ])
  const lines: [string, unknown][] = [
    ['Exported (UTC)', at],
    ['Exported by', `${actor.name} <${actor.email}>`],
    ['Engine version', ENGINE_VERSION],
    ['Dates', 'All date-time cells are in UTC.'],
    [
      'Computed channels',
      'The allowed m, normal-emission and symmetry columns of the Arrays sheet and the predicted columns of the Sessions sheet are MODEL PREDICTIONS of the Overtone engine (selection rules from symmetry), not measurements. "Stale" = computed by another engine version or for inputs that have changed since.',
    ],
    [
      'Re-import',
      'The Wafers, Chips and Arrays sheets can be imported again (Admin → Export & import): a row whose Code is an Overtone code updates that record, and its Version shows whether the record changed in Overtone since this export (then the row is a conflict, not written). Their extra columns are ignored.',
    ],
    [
      'Read-only sheets',
      'Sessions, Locations, Fabrication, Laser setups (register and sign-off state), Moves and Files (metadata only) are for reading; the import does not read them.',
    ],
    [
      'Text cells',
      'Text that begins with =, +, - or @ is written with a leading apostrophe so that no spreadsheet program takes it for a formula, also after saving as CSV; the import removes it again.',
    ],
  ]
  for (const [item, value] of lines) {
    const row = ws.addRow({ item, value })
    if (value instanceof Date) row.getCell(2).numFmt = 'yyyy-mm-dd hh:mm:ss'
    row.getCell(2).alignment = { wrapText: true, vertical: 'top' }
    ;(row as ExcelJS.Row & { commit?: () => void }).commit?.()
  }
  ;(ws as ExcelJS.Worksheet & { commit?: () => void }).commit?.()
}

/**
 * The running side of a job: its progress in memory, written to its row one write after another
 * (each write sends the latest state). Writes touch the row only while it is not done or failed;
 * once a write finds no such row (marked failed as stale, or swept) the job is `gone` and stops.
 */
function jobWriter(db: Db, id: string) {
  const state = { phase: 'queued' as ExportPhase, done: 0, total: 0 }
  let chain: Promise<unknown> = Promise.resolve()
  let lastWrite = Date.now()
  const w = {
    state,
    gone: false,
    /**
     * Write the state (and `extra` columns) after any write already queued; answers whether the row was still running.
     */
    write(
      extra: Partial<Pick<ExportJobRow, 'finishedAt' | 'sizeBytes' | 'error' | 'blobSha256'>> = {},
    ): Promise<boolean> {
      lastWrite = Date.now()
      const next = chain.then(async () => {
        if (w.gone) return false
        const [res] = await db
          .update(exportJobs)
          .set({ phase: state.phase, done: state.done, total: state.total, ...extra, updatedAt: new Date() })
          .where(and(eq(exportJobs.id, id), notInArray(exportJobs.phase, FINISHED)))
        // affectedRows counts matched rows (mysql2 connects with FOUND_ROWS), changed or not.
        if ((res as { affectedRows: number }).affectedRows !== 1) w.gone = true
        return !w.gone
      })
      chain = next.catch(() => undefined)
      return next
    },
    /** A new phase, written at once; throws when the job is gone. */
    async phase(phase: ExportPhase) {
      state.phase = phase
      if (!(await w.write())) throw new Error('the job was stopped')
    },
    /** Rows written: counted in memory, written at most every PROGRESS_MS (a failed write is retried by the next). */
    tick(rows: number) {
      state.done = Math.min(state.total, state.done + rows)
      if (Date.now() - lastWrite >= PROGRESS_MS) void w.write().catch(() => undefined)
    },
    heartbeat: () => void w.write().catch(() => undefined),
  }
  return w
}

async function run(db: Db, storage: FileStorage, actor: User, id: string, file: string) {
  const job = jobWriter(db, id)
  const heartbeat = setInterval(job.heartbeat, heartbeatMs)
  heartbeat.unref()
  let stored: string | null = null
  try {
    await job.phase('counting')
    job.state.total = await countRows(db)
    await fs.mkdir(path.dirname(file), { recursive: true })
    const book = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: file, useStyles: true, useSharedStrings: false })
    rememberPlainStyles(book)
    book.creator = actor.name
    book.created = new Date()
    await job.phase('About')
    writeAbout(book, actor, new Date())
    const ctx: SheetContext = { db, book, tick: job.tick }
    const sheets: [ExportPhase, (c: SheetContext) => Promise<void>][] = [
      ['Materials', writeMaterials],
      ['Wafers', writeWafers],
      ['Chips', writeChips],
      ['Arrays', writeArrays],
      ['Sessions', writeSessions],
      ['Locations', writeLocations],
      ['Fabrication', writeFabSteps],
      ['Laser setups', writeLaserSetups],
      ['Moves', writeMoves],
      ['Files', writeFiles],
    ]
    for (const [phase, write] of sheets) {
      await job.phase(phase)
      await write(ctx)
    }
    await book.commit()
    // The finished workbook (tens of MB at most) into the shared storage, then off the local disk.
    const { sha256, sizeBytes } = await storage.put(await fs.readFile(file))
    stored = sha256
    await fs.rm(file, { force: true })
    job.state.done = job.state.total
    job.state.phase = 'done'
    if (!(await job.write({ finishedAt: new Date(), sizeBytes, blobSha256: sha256 })))
      throw new Error('the job was stopped')
  } catch (err) {
    await fs.rm(file, { force: true }).catch(() => undefined)
    if (stored) await removeUnlessInUse(db, storage, stored)
    if (!job.gone) {
      job.state.phase = 'failed'
      await job
        .write({ error: `The export failed: ${(err as Error).message}`.slice(0, 1000), finishedAt: new Date() })
        .catch(() => undefined)
    }
  } finally {
    clearInterval(heartbeat)
  }
}

/** Remove a workbook this job stored but could not record, unless the same bytes are named elsewhere. */
async function removeUnlessInUse(db: Db, storage: FileStorage, sha256: string) {
  try {
    if (!(await blobInUse(db, sha256, Date.now()))) await storage.remove(sha256)
  } catch {
    /* nothing names it: at worst an unreferenced blob stays */
  }
}

/** Start an export job for `actor`; answers at once, the workbook is written in the background. */
export async function startExport(db: Db, storage: FileStorage, dataDir: string, actor: User): Promise<ExportJob> {
  const now = new Date()
  const runningOf = (on: Pick<Db, 'select'>) =>
    on
      .select({ id: exportJobs.id })
      .from(exportJobs)
      .where(
        and(
          eq(exportJobs.userId, actor.id),
          notInArray(exportJobs.phase, FINISHED),
          gte(exportJobs.updatedAt, new Date(now.getTime() - staleMs)),
        ),
      )
      .limit(1)
  const refuse = () => new ConflictError('Your previous export is still running; wait for it to finish.')
  if ((await runningOf(db)).length) throw refuse() // before the sweep: a refused request writes nothing
  await sweepExports(db, storage, dataDir, now.getTime())
  const row: ExportJobRow = {
    id: randomUUID(),
    userId: actor.id,
    phase: 'queued',
    done: 0,
    total: 0,
    startedAt: now,
    finishedAt: null,
    fileName: `overtone-inventory-${stamp(now)}.xlsx`,
    sizeBytes: null,
    error: null,
    blobSha256: null,
    updatedAt: now,
  }
  // Checked again with the person's row locked: a double click, or two app servers, start one job.
  await db.transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, actor.id)).for('update')
    if ((await runningOf(tx)).length) throw refuse()
    await tx.insert(exportJobs).values(row)
  })
  void run(db, storage, actor, row.id, path.join(exportDir(dataDir), `${row.id}.xlsx`))
  return publicJob(row, now.getTime())
}

/** A job of `actor` younger than an hour (another person's job is a 404: jobs belong to whoever started them). */
async function ownJob(db: Db, id: string, actor: User): Promise<ExportJobRow> {
  const [row] = await db.select().from(exportJobs).where(eq(exportJobs.id, id))
  if (!row || row.userId !== actor.id || Date.now() - row.startedAt.getTime() > TTL_MS)
    throw new NotFoundError('No such export (exports are kept for an hour).')
  return row
}

export async function getExport(db: Db, id: string, actor: User): Promise<ExportJob> {
  return publicJob(await ownJob(db, id, actor))
}

/** The finished workbook as a stream from the FileStorage (409 while it is still being written or when it failed). */
export async function openExport(
  db: Db,
  storage: FileStorage,
  id: string,
  actor: User,
): Promise<{ job: ExportJob; stream: NodeJS.ReadableStream }> {
  const row = await ownJob(db, id, actor)
  const job = publicJob(row)
  if (job.phase !== 'done')
    throw new ConflictError(
      job.phase === 'failed' ? (job.error ?? 'The export failed.') : 'The export is not finished yet.',
    )
  const expired = () => new NotFoundError('The export file has expired; start a new export.')
  if (!row.blobSha256) throw expired()
  const stream = await storage.get(row.blobSha256).catch((err: NodeJS.ErrnoException) => {
    throw err.code === 'ENOENT' ? expired() : err
  })
  return { job, stream }
}

/** For tests and the bench: wait until a job is done or failed (read from the database, whichever server runs it). */
export async function waitForExport(db: Db, id: string, timeoutMs = 60_000): Promise<ExportJob> {
  const t0 = Date.now()
  for (;;) {
    const [row] = await db.select().from(exportJobs).where(eq(exportJobs.id, id))
    if (!row) throw new NotFoundError()
    const job = publicJob(row)
    if (job.phase === 'done' || job.phase === 'failed') return job
    if (Date.now() - t0 > timeoutMs) throw new Error('export timed out')
    await new Promise((r) => setTimeout(r, 50))
  }
}
