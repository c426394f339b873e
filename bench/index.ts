/**
 * Benchmark runner. `npm run bench` (scripts/bench.sh) sets up a throw-away MariaDB with the large
 * data set, a built server and a built client, then runs this with:
 *   BENCH_BASE_URL  the running server (API suite)      DATABASE_URL  its database (API bare SQL, export)
 *   BENCH_CLIENT_DIR  the built client (bundle sizes)   BENCH_EMAIL / BENCH_PASSWORD  a demo admin
 *   BENCH_SEED_JSON   the large seed's result line      BENCH_SECONDS  autocannon duration per route (5)
 *   BENCH_ONLY  run only the API cases whose name contains this text (and no other suite)
 * Without them only the engine suite runs (`npx tsx bench/index.ts`). Each bench module returns rows
 * { name, value, unit, target?, better?, note? }; ONE table is printed, with the ratio to each target.
 */
import { spawnSync } from 'node:child_process'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { runEngineBench } from './engine'
import type { BenchRow } from './engine'
import { runApiBench } from './api'
import { exportRows, type ExportFigures } from './export'
import { importRows, type ImportFigures } from './import'
import { runClientSizeBench } from './client-size'

const env = process.env
const here = path.dirname(fileURLToPath(import.meta.url))
const log = (m: string) => console.error(m)

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v)
  return v >= 1000 ? Math.round(v).toLocaleString('en-US') : v.toPrecision(3)
}

function ratio(row: BenchRow): string {
  if (row.target === undefined) return ''
  const r = row.better === 'lower' ? row.target / row.value : row.value / row.target
  return `${r.toFixed(2)}× ${r >= 1 ? 'ok' : 'MISSES TARGET'}`
}

function printTable(sections: { title: string; rows: BenchRow[] }[]): void {
  const head = ['figure', 'value', 'target', 'ratio to target', 'note']
  const all = sections.flatMap((s) => [
    [`[${s.title}]`, '', '', '', ''],
    ...s.rows.map((r) => [
      r.name,
      `${fmt(r.value)} ${r.unit}`,
      r.target === undefined ? '' : `${r.better === 'lower' ? '<' : '≥'} ${fmt(r.target)} ${r.unit}`,
      ratio(r),
      r.note ?? '',
    ]),
  ])
  const widths = head.slice(0, 4).map((h, i) => Math.max(h.length, ...all.map((c) => c[i].length)))
  const line = (c: string[]) => c.map((x, i) => (i < 4 ? x.padEnd(widths[i]) : x)).join('  ')
  console.log('\n' + line(head))
  console.log(widths.map((w) => '-'.repeat(w)).join('  ') + '  ----')
  all.forEach((c) => console.log(line(c)))
}

async function main() {
  const sections: { title: string; rows: BenchRow[] }[] = []
  const add = async (title: string, run: () => BenchRow[] | Promise<BenchRow[]>) => {
    log(`[bench] ${title} …`)
    try {
      sections.push({ title, rows: await run() })
    } catch (e) {
      sections.push({
        title,
        rows: [
          {
            name: `${title} FAILED`,
            value: NaN,
            unit: '',
            note: String((e as { cause?: Error }).cause?.message ?? (e as Error).message).slice(0, 300),
          },
        ],
      })
    }
  }
  if (env.BENCH_SEED_JSON) {
    const seed = JSON.parse(env.BENCH_SEED_JSON) as { seconds: number; counts: Record<string, number> }
    sections.push({
      title: 'seed',
      rows: [
        {
          name: 'large seed (batched multi-row INSERTs)',
          value: seed.seconds,
          unit: 's',
          target: 60,
          better: 'lower',
          note: Object.entries(seed.counts)
            .map(([k, v]) => `${v} ${k}`)
            .join(', '),
        },
      ],
    })
  }
  if (!env.BENCH_ONLY) await add('engine', () => runEngineBench())
  if (env.BENCH_BASE_URL && env.DATABASE_URL) {
    await add('API, concurrency 16, autocannon on loopback', () =>
      runApiBench({
        baseUrl: env.BENCH_BASE_URL!,
        databaseUrl: env.DATABASE_URL!,
        email: env.BENCH_EMAIL!,
        password: env.BENCH_PASSWORD!,
        seconds: Number(env.BENCH_SECONDS ?? 5),
        only: env.BENCH_ONLY,
        log,
      }),
    )
    if (!env.BENCH_ONLY)
      await add('Excel export (own process)', () => {
        const child = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', path.join(here, 'export.ts')], {
          env,
          encoding: 'utf8',
          timeout: 30 * 60_000,
          maxBuffer: 1 << 20,
        })
        if (child.status !== 0) throw new Error(`export child exited ${child.status}: ${child.stderr.slice(-400)}`)
        const f = JSON.parse(child.stdout.trim().split('\n').pop()!) as ExportFigures
        const seed = env.BENCH_SEED_JSON ? (JSON.parse(env.BENCH_SEED_JSON).counts.arrays as number) : 0
        return exportRows(f, seed)
      })
  }
  if (env.DATABASE_URL && !env.BENCH_ONLY)
    await add('Excel import (own process per figure)', () => {
      // One child per figure so each peak RSS is its own. BENCH_IMPORT_ROWS (2000,20000,100000) and
      // BENCH_IMPORT_HEAP_MB (384: V8's old-space cap of the child, 0 = Node's default) set the runs.
      const sizes = (env.BENCH_IMPORT_ROWS ?? '2000,20000,100000').split(',').map(Number)
      const heap = Number(env.BENCH_IMPORT_HEAP_MB ?? 384)
      const figs: ImportFigures[] = []
      for (const rows of sizes) {
        for (const mode of ['floor', 'dry', 'import'] as const) {
          log(`[bench] import ${rows} ${mode}`)
          const flags = [
            ...(heap > 0 ? [`--max-old-space-size=${heap}`] : []),
            '--expose-gc',
            '--import',
            'tsx',
            path.join(here, 'import.ts'),
            String(rows),
            mode,
          ]
          const child = spawnSync(process.execPath, flags, {
            env,
            encoding: 'utf8',
            timeout: 30 * 60_000,
            maxBuffer: 1 << 20,
          })
          if (child.status !== 0)
            throw new Error(`import child (${rows} ${mode}) exited ${child.status}: ${child.stderr.slice(-400)}`)
          figs.push(JSON.parse(child.stdout.trim().split('\n').pop()!) as ImportFigures)
        }
      }
      return importRows(figs, heap)
    })
  if (env.BENCH_CLIENT_DIR && !env.BENCH_ONLY)
    await add('client bundle (gzip)', () => runClientSizeBench(env.BENCH_CLIENT_DIR!))
  printTable(sections)
}

await main()
