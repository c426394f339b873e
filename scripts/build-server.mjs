// Bundle the Express server into dist/server/index.js (npm packages stay external).
import { build } from 'esbuild'

await build({
  entryPoints: ['server/index.ts'],
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  packages: 'external',
  sourcemap: true,
  outfile: 'dist/server/index.js',
  logLevel: 'warning',
})
