import ExcelJS from 'exceljs'
import { randomUUID } from 'node:crypto'
import { createReadStream, type ReadStream } from 'node:fs'
import fs from 'node:fs/promises'
import path from 'node:path'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client'
import type { User } from '../db/schema/index'
import type { ExportJob, ExportPhase } from '../../shared/excel'
import { ENGINE_VERSION } from '../../shared/engine'
import { NotFoundError, ConflictError } from '../errors'
import { addStyledSheet, rememberPlainStyles } from './excel-style'
import { writeArrays, writeChips, writeLocations, writeMaterials, writeSessions, writeWafers, type SheetContext } from './excel-export-sheets'

/**
 * Inventory export jobs. A job streams one workbook (exceljs WorkbookWriter, rows committed as they
 * are written) to a temp file `${DATA_DIR}/exports/<id>.xlsx`, updating its progress as it goes.
 *
 * Job state lives IN MEMORY of the app server that started the job: with several app servers
 * behind a balancer, the progress and download requests must reach the same server (sticky
 * sessions), or the client sees 404 "no such export". Files and jobs expire after an hour; a
 * restarted server forgets its jobs (the files are removed by the next sweep).
 */
const TTL_MS = 60 * 60 * 1000
interface Job extends ExportJob { userId: number; file: string; createdMs: number }
const jobs = new Map<string, Job>()

const exportDir = (dataDir: string) => path.resolve(dataDir, 'exports')
const publicJob = ({ userId: _u, file: _f, createdMs: _c, ...job }: Job): ExportJob => job
const stamp = (d: Date) => d.toISOString().slice(0, 16).replace(/[-:]/g, '').replace('T', '-')

/** Drop jobs and temp files older than an hour (also files left by a previous run of the server). */
export async function sweepExports(dataDir: string, now = Date.now()): Promise<void> {
  for (const [id, job] of jobs) if (now - job.createdMs > TTL_MS) { jobs.delete(id); await fs.rm(job.file, { force: true }) }
  const dir = exportDir(dataDir)
  const names = await fs.readdir(dir).catch(() => [] as string[])
  for (const name of names) {
    const p = path.join(dir, name)
    const st = await fs.stat(p).catch(() => null)
    if (st && now - st.mtimeMs > TTL_MS) await fs.rm(p, { force: true })
  }
}

async function countRows(db: Db): Promise<number> {
  const [rows] = (await db.execute(sql`SELECT (SELECT count(*) FROM materials) + (SELECT count(*) FROM wafers) + (SELECT count(*) FROM chips)
    + (SELECT count(*) FROM arrays) + (SELECT count(*) FROM session_results) + (SELECT count(*) FROM locations) AS n`)) as unknown as [{ n: number | string }[]]
  return Number(rows[0].n)
}

function writeAbout(book: Pick<ExcelJS.Workbook, 'addWorksheet'>, actor: User, at: Date) {
  const ws = addStyledSheet(book, 'About', [{ header: 'Item', key: 'item', width: 22 }, { header: 'Value', key: 'value', width: 90 }])
  const lines: [string, unknown][] = [
    ['Exported (UTC)', at], ['Exported by', `${actor.name} <${actor.email}>`], ['Engine version', ENGINE_VERSION],
    ['Dates', 'All date-time cells are in UTC.'],
    ['Computed channels', 'The allowed m, normal-emission and symmetry columns of the Arrays sheet and the predicted columns of the Sessions sheet are MODEL PREDICTIONS of the Overtone engine (selection rules from symmetry), not measurements. "Stale" = computed by another engine version or for inputs that have changed since.'],
    ['Re-import', 'The Wafers, Chips and Arrays sheets can be imported again (Admin → Export & import); their extra columns are ignored.'],
  ]
  for (const [item, value] of lines) {
    const row = ws.addRow({ item, value })
    if (value instanceof Date) row.getCell(2).numFmt = 'yyyy-mm-dd hh:mm:ss'
    row.getCell(2).alignment = { wrapText: true, vertical: 'top' }
    ;(row as ExcelJS.Row & { commit?: () => void }).commit?.()
  }
  ;(ws as ExcelJS.Worksheet & { commit?: () => void }).commit?.()
}

async function run(db: Db, actor: User, job: Job) {
  const set = (phase: ExportPhase) => { job.phase = phase }
  try {
    set('counting')
    job.total = await countRows(db)
    await fs.mkdir(path.dirname(job.file), { recursive: true })
    const book = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: job.file, useStyles: true, useSharedStrings: false })
    rememberPlainStyles(book)
    book.creator = actor.name
    book.created = new Date()
    set('About')
    writeAbout(book, actor, new Date())
    const ctx: SheetContext = { db, book, tick: (n) => { job.done = Math.min(job.total, job.done + n) } }
    const sheets: [ExportPhase, (c: SheetContext) => Promise<void>][] = [
      ['Materials', writeMaterials], ['Wafers', writeWafers], ['Chips', writeChips], ['Arrays', writeArrays], ['Sessions', writeSessions], ['Locations', writeLocations],
    ]
    for (const [phase, write] of sheets) { set(phase); await write(ctx) }
    await book.commit()
    job.sizeBytes = (await fs.stat(job.file)).size
    job.done = job.total
    job.finishedAt = new Date().toISOString()
    set('done')
  } catch (err) {
    job.error = `The export failed: ${(err as Error).message}`
    job.finishedAt = new Date().toISOString()
    set('failed')
    await fs.rm(job.file, { force: true })
  }
}

/** Start an export job for `actor`; answers at once, the workbook is written in the background. */
export async function startExport(db: Db, dataDir: string, actor: User): Promise<ExportJob> {
  await sweepExports(dataDir)
  const running = [...jobs.values()].find((j) => j.userId === actor.id && !['done', 'failed'].includes(j.phase))
  if (running) throw new ConflictError('Your previous export is still running; wait for it to finish.')
  const id = randomUUID()
  const now = new Date()
  const job: Job = {
    id, phase: 'queued', done: 0, total: 0, startedAt: now.toISOString(), finishedAt: null, fileName: `overtone-inventory-${stamp(now)}.xlsx`,
    sizeBytes: null, error: null, userId: actor.id, file: path.join(exportDir(dataDir), `${id}.xlsx`), createdMs: now.getTime(),
  }
  jobs.set(id, job)
  void run(db, actor, job)
  return publicJob(job)
}

/** A job of `actor` (another person's job is a 404: jobs belong to whoever started them). */
function ownJob(id: string, actor: User): Job {
  const job = jobs.get(id)
  if (!job || job.userId !== actor.id) throw new NotFoundError('No such export (exports are kept for an hour, on the server that made them).')
  return job
}

export function getExport(id: string, actor: User): ExportJob {
  return publicJob(ownJob(id, actor))
}

/** The finished workbook as a stream (409 while it is still being written). */
export async function openExport(id: string, actor: User): Promise<{ job: ExportJob; stream: ReadStream }> {
  const job = ownJob(id, actor)
  if (job.phase !== 'done') throw new ConflictError(job.phase === 'failed' ? (job.error ?? 'The export failed.') : 'The export is not finished yet.')
  await fs.access(job.file).catch(() => { throw new NotFoundError('The export file has expired; start a new export.') })
  return { job: publicJob(job), stream: createReadStream(job.file) }
}

/** For tests: wait until a job is done or failed. */
export async function waitForExport(id: string, timeoutMs = 60_000): Promise<ExportJob> {
  const t0 = Date.now()
  for (;;) {
    const job = jobs.get(id)
    if (!job) throw new NotFoundError()
    if (job.phase === 'done' || job.phase === 'failed') return publicJob(job)
    if (Date.now() - t0 > timeoutMs) throw new Error('export timed out')
    await new Promise((r) => setTimeout(r, 50))
  }
}
