/**
 * Benchmark runner: `npm run bench`. Each bench module exports a function returning rows
 * { name, value, unit, target?, better?, note? }; append new suites to SUITES.
 */
import { runEngineBench } from './engine'
import type { BenchRow } from './engine'

const SUITES: { title: string; run: () => BenchRow[] }[] = [{ title: 'engine', run: () => runEngineBench() }]

function fmt(v: number): string {
  return v >= 1000 ? Math.round(v).toLocaleString('en-US') : v.toPrecision(3)
}

function ratio(row: BenchRow): string {
  if (row.target === undefined) return ''
  const r = row.better === 'lower' ? row.target / row.value : row.value / row.target
  return `${r.toFixed(2)}× ${r >= 1 ? 'ok' : 'BELOW TARGET'}`
}

function printTable(title: string, rows: BenchRow[]): void {
  const cells = rows.map((r) => [r.name, `${fmt(r.value)} ${r.unit}`, r.target === undefined ? '' : `${r.better === 'lower' ? '<' : '≥'} ${fmt(r.target)} ${r.unit}`, ratio(r), r.note ?? ''])
  const head = ['benchmark', 'value', 'target', 'ratio to target', 'note']
  const widths = head.map((h, i) => Math.max(h.length, ...cells.map((c) => c[i].length)))
  const line = (c: string[]) => c.map((x, i) => x.padEnd(widths[i])).join('  ')
  console.log(`\n## ${title}`)
  console.log(line(head))
  console.log(widths.map((w) => '-'.repeat(w)).join('  '))
  cells.forEach((c) => console.log(line(c)))
}

for (const suite of SUITES) printTable(suite.title, suite.run())
