/**
 * Excel import bench: a workbook of N new arrays (on N/20 new chips of N/2 000 new wafers, at
 * least one), imported in THIS process through the import service, so time and peak memory are
 * the import's alone. `mode` dry: the dry run; import: the real import, with a wafer registered
 * again and again meanwhile (its latency is the figure "other people's writes"); floor: a bare
 * multi-row INSERT of the same array rows (chunks of 500) into a copy of the arrays table, the
 * fastest the database takes them. Peak RSS = max of process.memoryUsage().rss sampled every 25 ms
 * and the kernel's VmHWM, minus nothing (the workbook is written to a temp file first, streamed).
 * `DATABASE_URL=… tsx bench/import.ts <rows> <dry|import|floor>` prints one JSON line; bench/index.ts
 * runs one child process per figure and turns them into table rows.
 */
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { spawnSync } from 'node:child_process'
import { fileURLToPath, pathToFileURL } from 'node:url'
import ExcelJS from 'exceljs'
import { eq, isNull } from 'drizzle-orm'
import { createDb } from '../server/db/client'
import { materials, users } from '../server/db/schema/index'
import { importWorkbook } from '../server/services/excel/excel-import'
import { createWafer } from '../server/services/inventory/wafers'
import { ENGINE_VERSION } from '../shared/engine'
import type { BenchRow } from './engine'

export interface ImportFigures {
  rows: number
  mode: 'dry' | 'import' | 'floor'
  seconds: number
  peakRssMb: number
  baselineRssMb: number
  sizeMb: number
  summary?: unknown
  errorCount?: number
  /** import only: latencies of the wafers registered while it ran. */
  writes?: { count: number; maxMs: number; p95Ms: number }
}

function vmHwmMb(): number {
  const m = /VmHWM:\s+(\d+) kB/.exec(fs.readFileSync('/proc/self/status', 'utf8'))
  return m ? Number(m[1]) / 1024 : NaN
}

const SHAPES: [string, Record<string, number>][] = [
  ['disk', { diameterNm: 450 }],
  ['disk', { diameterNm: 300 }],
  ['ring', { innerDiameterNm: 200, outerDiameterNm: 400 }],
  ['rectangle', { lengthNm: 400, widthNm: 150 }],
]

/** Write the workbook with the streaming writer (the bench process does not hold it in memory). */
async function writeWorkbook(file: string, rows: number, material: string, tag: string) {
  const book = new ExcelJS.stream.xlsx.WorkbookWriter({ filename: file, useStyles: false, useSharedStrings: false })
  const chipsN = Math.ceil(rows / 20),
    wafersN = Math.ceil(chipsN / 99)
  const w = book.addWorksheet('Wafers')
  w.addRow(['Code', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot']).commit()
  for (let i = 1; i <= wafersN; i++)
    w.addRow([`BW${i}`, material, '0 0 1', '1 -1 0', 50.8, 350, `BENCH-${tag}`]).commit()
  w.commit()
  const c = book.addWorksheet('Chips')
  c.addRow(['Code', 'Wafer', 'Index', 'Width (mm)', 'Height (mm)']).commit()
  for (let i = 0; i < chipsN; i++) c.addRow([`BC${i}`, `BW${1 + Math.floor(i / 99)}`, 1 + (i % 99), 5, 5]).commit()
  c.commit()
  const a = book.addWorksheet('Arrays')
  a.addRow([
    'Chip',
    'Position',
    'Shape',
    'Diameter (nm)',
    'Inner diameter (nm)',
    'Outer diameter (nm)',
    'Length (nm)',
    'Width (nm)',
    'Lattice',
    'Period X (nm)',
    'Period Y (nm)',
    'Count',
    'Notes',
  ]).commit()
  for (let i = 0; i < rows; i++) {
    const [shape, d] = SHAPES[i % SHAPES.length]
    a.addRow([
      `BC${Math.floor(i / 20)}`,
      `P${i % 20}`,
      shape,
      d.diameterNm ?? null,
      d.innerDiameterNm ?? null,
      d.outerDiameterNm ?? null,
      d.lengthNm ?? null,
      d.widthNm ?? null,
      'square',
      900,
      900,
      400,
      `bench row ${i}`,
    ]).commit()
  }
  a.commit()
  await book.commit()
}

export async function measureImport(
  url: string,
  email: string,
  rows: number,
  mode: ImportFigures['mode'],
): Promise<ImportFigures> {
  const { pool, db } = createDb(url, 6)
  const file = path.join(os.tmpdir(), `bench-import-${process.pid}.xlsx`)
  try {
    const [actor] = await db.select().from(users).where(eq(users.email, email))
    if (!actor) throw new Error(`no user ${email}`)
    const [mat] = await db.select().from(materials).where(isNull(materials.retiredAt)).limit(1)
    const tag = `${Date.now().toString(36)}`
    // Written by a child process, so building the workbook does not count in this process's peak.
    const made = spawnSync(
      process.execPath,
      ['--import', 'tsx', fileURLToPath(import.meta.url), String(rows), 'make', file, mat.name, tag],
      { encoding: 'utf8' },
    )
    if (made.status !== 0) throw new Error(`making the workbook failed: ${made.stderr.slice(-300)}`)
    const sizeMb = fs.statSync(file).size / 1048576
    const buffer = fs.readFileSync(file)
    global.gc?.()
    const baselineRssMb = process.memoryUsage().rss / 1048576
    let peak = 0
    const timer = setInterval(() => {
      peak = Math.max(peak, process.memoryUsage().rss)
    }, 25)
    const t0 = performance.now()
    const out: ImportFigures = { rows, mode, seconds: 0, peakRssMb: 0, baselineRssMb, sizeMb }
    if (mode === 'floor') {
      const conn = await pool.getConnection()
      try {
        await conn.query('DROP TABLE IF EXISTS bench_floor')
        await conn.query('CREATE TABLE bench_floor LIKE arrays') // not TEMPORARY: InnoDB refuses the FULLTEXT index there
        for (let k = 0; k < rows; k += 500) {
          const values: unknown[][] = []
          for (let i = k; i < Math.min(rows, k + 500); i++) {
            const [shape, d] = SHAPES[i % SHAPES.length]
            values.push([
              `A-B${tag}-${i}`,
              i + 1,
              `P${i % 20}`,
              shape,
              JSON.stringify(d),
              0,
              'square',
              900,
              900,
              0,
              400,
              `bench row ${i}`,
              'C4v',
              ENGINE_VERSION,
            ])
          }
          await conn.query(
            'INSERT INTO bench_floor (code, chip_id, position, shape, dimensions_nm, shape_azimuth_deg, lattice, period_x_nm, period_y_nm, azimuth_deg, count, notes, symmetry_name, engine_version) VALUES ?',
            [values],
          )
        }
        await conn.query('DROP TABLE bench_floor')
      } finally {
        conn.release()
      }
    } else {
      const input = () => ({
        materialId: mat.id,
        cutNormal: [0, 0, 1] as [number, number, number],
        flatDirection: [1, -1, 0] as [number, number, number],
        diameterMm: 50.8,
        thicknessUm: 350,
        lot: `BENCH-W-${tag}`,
        supplier: null,
        receivedOn: null,
        locationId: null,
        status: 'in_stock' as const,
        notes: null,
      })
      let running = true
      const latencies: number[] = []
      const writer =
        mode === 'import'
          ? (async () => {
              while (running) {
                const s = performance.now()
                await createWafer(db, actor, input())
                latencies.push(performance.now() - s)
                await new Promise((r) => setTimeout(r, 50))
              }
            })()
          : Promise.resolve()
      try {
        const report = await importWorkbook(db, actor, { buffer, originalName: `bench-${rows}.xlsx` }, mode === 'dry', {
          maxExpandedBytes: 500 * 1048576,
          maxRows: 200_000,
        })
        out.summary = report.summary
        out.errorCount = report.errorCount
      } finally {
        running = false
        await writer
      }
      if (latencies.length) {
        const sorted = [...latencies].sort((x, y) => x - y)
        out.writes = {
          count: sorted.length,
          maxMs: sorted[sorted.length - 1],
          p95Ms: sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * 0.95))],
        }
      }
    }
    out.seconds = (performance.now() - t0) / 1000
    clearInterval(timer)
    out.peakRssMb = Math.max(peak / 1048576, vmHwmMb())
    return out
  } finally {
    fs.rmSync(file, { force: true })
    await pool.end()
  }
}

/**
 * Table rows of the import figures: per size, dry run and import time and rows/s, the floor, peak RSS, the concurrent
 * write.
 */
export function importRows(figs: ImportFigures[], heapMb = 0): BenchRow[] {
  const out: BenchRow[] = []
  const of = (rows: number, mode: ImportFigures['mode']) => figs.find((f) => f.rows === rows && f.mode === mode)
  for (const rows of [...new Set(figs.map((f) => f.rows))].sort((a, b) => a - b)) {
    const n = rows.toLocaleString('en-US')
    const floor = of(rows, 'floor')
    for (const mode of ['dry', 'import'] as const) {
      const f = of(rows, mode)
      if (!f) continue
      const what = mode === 'dry' ? 'dry run' : 'import'
      out.push({
        name: `Excel ${what} of ${n} array rows: rows/s`,
        value: rows / f.seconds,
        unit: 'rows/s',
        note: `${f.seconds.toFixed(1)} s, ${f.sizeMb.toFixed(1)} MB xlsx, ${JSON.stringify(f.summary)}${floor ? `; bare multi-row INSERT of the same rows ${(rows / floor.seconds).toFixed(0)} rows/s (${floor.seconds.toFixed(1)} s)` : ''}`,
      })
      out.push({
        name: `Excel ${what} of ${n} array rows: peak RSS`,
        value: f.peakRssMb,
        unit: 'MB',
        target: 500,
        better: 'lower',
        note: `RSS before ${f.baselineRssMb.toFixed(0)} MB; ${heapMb ? `--max-old-space-size=${heapMb}` : "Node's default heap limit"}`,
      })
      if (rows >= 100_000)
        out.push({
          name: `Excel ${what} of ${n} array rows: time`,
          value: f.seconds,
          unit: 's',
          target: 60,
          better: 'lower',
        })
      if (f.writes)
        out.push({
          name: `wafer registered during the import of ${n} rows: max latency`,
          value: f.writes.maxMs,
          unit: 'ms',
          target: 1000,
          better: 'lower',
          note: `${f.writes.count} registrations, p95 ${f.writes.p95Ms.toFixed(0)} ms`,
        })
    }
  }
  const small = of(2000, 'import'),
    large = of(20_000, 'import')
  if (small && large)
    out.push({
      name: 'Excel import: time of 20 000 rows / time of 2 000',
      value: large.seconds / small.seconds,
      unit: '×',
      target: 12,
      better: 'lower',
      note: 'linear would be 10×',
    })
  return out
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const url = process.env.DATABASE_URL
  if (!url) {
    console.error('DATABASE_URL is not set')
    process.exit(2)
  }
  const [rows, mode] = [Number(process.argv[2] ?? 2000), (process.argv[3] ?? 'dry') as ImportFigures['mode'] | 'make']
  if (mode === 'make') await writeWorkbook(process.argv[4], rows, process.argv[5], process.argv[6])
  else
    measureImport(url, process.env.BENCH_EMAIL ?? '', rows, mode).then(
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
