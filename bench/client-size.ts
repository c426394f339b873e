/**
 * Client bundle sizes: gzip (level 9, node:zlib) of every JS/CSS file in a built client's assets
 * directory, per route chunk, and the first page = what index.html loads (its module script, the
 * modulepreload links and stylesheets). Target: the first page under 300 kB gzip of JS.
 */
import fs from 'node:fs'
import path from 'node:path'
import { gzipSync } from 'node:zlib'
import type { BenchRow } from './engine'

const gz = (file: string) => gzipSync(fs.readFileSync(file), { level: 9 }).length / 1024

export function runClientSizeBench(clientDir: string): BenchRow[] {
  const assets = path.join(clientDir, 'assets')
  const html = fs.readFileSync(path.join(clientDir, 'index.html'), 'utf8')
  const first = new Set([...html.matchAll(/(?:src|href)="\/?assets\/([^"]+\.(?:js|css))"/g)].map((m) => m[1]))
  const files = fs.readdirSync(assets).filter((f) => /\.(js|css)$/.test(f))
  const size = new Map(files.map((f) => [f, gz(path.join(assets, f))]))
  const sum = (names: string[], ext: string) =>
    names.filter((f) => f.endsWith(ext)).reduce((n, f) => n + (size.get(f) ?? 0), 0)
  const firstJs = sum([...first], '.js'),
    firstCss = sum([...first], '.css')
  const rows: BenchRow[] = [
    {
      name: 'client: first page JS (index.html entry + modulepreloads), gzip',
      value: firstJs,
      unit: 'kB',
      target: 300,
      better: 'lower',
      note: [...first].filter((f) => f.endsWith('.js')).join(', '),
    },
    {
      name: 'client: first page CSS, gzip',
      value: firstCss,
      unit: 'kB',
      note: `all assets: JS ${sum(files, '.js').toFixed(0)} kB, CSS ${sum(files, '.css').toFixed(0)} kB gzip in ${files.length} files`,
    },
  ]
  const chunks = files.filter((f) => !first.has(f) && f.endsWith('.js')).sort((a, b) => size.get(b)! - size.get(a)!)
  for (const f of chunks) {
    const css = f.replace(/\.js$/, '.css')
    rows.push({
      name: `  chunk ${f.replace(/-[A-Za-z0-9_-]{8}\.js$/, '')}`,
      value: size.get(f)!,
      unit: 'kB',
      note: size.has(css) ? `+ ${size.get(css)!.toFixed(1)} kB CSS` : undefined,
    })
  }
  return rows
}
