/**
 * Write `x.br` (brotli, best quality) and `x.gz` (gzip -9) next to every text asset of a built
 * client, so the server sends compressed bytes without compressing per request
 * (server/middleware/client-files.ts). Run by the Vite build (vite.config.ts). A variant that is
 * not smaller than its file is not kept.
 */
import fs from 'node:fs'
import path from 'node:path'
import { brotliCompressSync, constants, gzipSync } from 'node:zlib'

/** What is worth compressing: text. Fonts (woff2) and images are compressed already. */
export const COMPRESSIBLE = /\.(?:js|mjs|css|html|svg|json|txt)$/

function* files(dir: string): Generator<string> {
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name)
    if (entry.isDirectory()) yield* files(full)
    else if (COMPRESSIBLE.test(entry.name)) yield full
  }
}

/** Precompress every text file under `dir`; answers how many variants were written. */
export function precompress(dir: string): number {
  let written = 0
  for (const file of files(dir)) {
    const bytes = fs.readFileSync(file)
    const variants: [string, Buffer][] = [
      [
        '.br',
        brotliCompressSync(bytes, {
          params: {
            [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY,
            [constants.BROTLI_PARAM_SIZE_HINT]: bytes.length,
          },
        }),
      ],
      ['.gz', gzipSync(bytes, { level: 9 })],
    ]
    for (const [ext, packed] of variants) {
      if (packed.length >= bytes.length) continue
      fs.writeFileSync(file + ext, packed)
      written++
    }
  }
  return written
}
