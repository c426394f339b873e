/**
 * Excel export bench: the inventory export of the whole database (100 000 arrays after the large
 * seed), run in THIS process through the export service, so time and peak memory are the export's
 * alone. Peak RSS = max of process.memoryUsage().rss sampled every 25 ms and the kernel's VmHWM.
 * `DATABASE_URL=… DATA_DIR=… tsx bench/export.ts` prints one JSON line; bench/index.ts runs it as a
 * child process and turns it into table rows.
 */
import fs from 'node:fs'
import { pathToFileURL } from 'node:url'
import { eq } from 'drizzle-orm'
import { createDb } from '../server/db/client'
import { users } from '../server/db/schema/index'
import { startExport, waitForExport } from '../server/services/excel/excel-export'
import { createFileStorage } from '../server/services/files/create-storage'
import { loadFileStorageEnv } from '../server/env'
import type { BenchRow } from './engine'

export interface ExportFigures {
  seconds: number
  peakRssMb: number
  baselineRssMb: number
  sizeMb: number
  rows: number
  phase: string
  error: string | null
}

function vmHwmMb(): number {
  const m = /VmHWM:\s+(\d+) kB/.exec(fs.readFileSync('/proc/self/status', 'utf8'))
  return m ? Number(m[1]) / 1024 : NaN
}

export async function measureExport(url: string, dataDir: string, email: string): Promise<ExportFigures> {
  const { pool, db } = createDb(url, 4)
  try {
    const [actor] = await db.select().from(users).where(eq(users.email, email))
    if (!actor) throw new Error(`no user ${email}`)
    global.gc?.()
    const baselineRssMb = process.memoryUsage().rss / 1048576
    let peak = 0
    const timer = setInterval(() => {
      peak = Math.max(peak, process.memoryUsage().rss)
    }, 25)
    const t0 = performance.now()
    const job = await startExport(db, createFileStorage(dataDir, loadFileStorageEnv()), dataDir, actor)
    const done = await waitForExport(db, job.id, 30 * 60_000)
    const seconds = (performance.now() - t0) / 1000
    clearInterval(timer)
    const peakRssMb = Math.max(peak / 1048576, vmHwmMb())
    return {
      seconds,
      peakRssMb,
      baselineRssMb,
      sizeMb: (done.sizeBytes ?? 0) / 1048576,
      rows: done.total,
      phase: done.phase,
      error: done.error,
    }
  } finally {
    await pool.end()
  }
}

export function exportRows(f: ExportFigures, arrays: number): BenchRow[] {
  const note = `${f.rows.toLocaleString('en-US')} rows (${arrays.toLocaleString('en-US')} arrays), ${f.sizeMb.toFixed(1)} MB xlsx, phase ${f.phase}${f.error ? ` ${f.error}` : ''}`
  return [
    { name: 'Excel export of the inventory: time', value: f.seconds, unit: 's', target: 15, better: 'lower', note },
    {
      name: 'Excel export: peak RSS of the exporting process',
      value: f.peakRssMb,
      unit: 'MB',
      target: 300,
      better: 'lower',
      note: `RSS before the export ${f.baselineRssMb.toFixed(0)} MB (streamed WorkbookWriter)`,
    },
  ]
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const url = process.env.DATABASE_URL
  if (!url) {
    console.error('DATABASE_URL is not set')
    process.exit(2)
  }
  measureExport(url, process.env.DATA_DIR ?? '.data', process.env.BENCH_EMAIL ?? '').then(
    (f) => {
      console.log(JSON.stringify(f))
      process.exit(0)
    },
    (e) => {
      console.error(e)
      process.exit(1)
    },
  )
}
