import { fileURLToPath } from 'node:url'
import { defineConfig } from 'vite'
import vue from '@vitejs/plugin-vue'
import { quasar, transformAssetUrls } from '@quasar/vite-plugin'
import { precompress } from './scripts/precompress'

const fromRoot = (p: string) => fileURLToPath(new URL(p, import.meta.url))

// Client build: index.html at the top level loads src/main.ts; the output goes to dist/client,
// which the Express server serves with an SPA fallback (see server/). Root stays the project
// folder so the Quasar plugin's sass cache lands in the top-level node_modules/.cache.
export default defineConfig({
  publicDir: false,
  build: {
    outDir: fromRoot('./dist/client'),
    emptyOutDir: true,
    // The JS `sass` compiler trips rolldown's plugin-timing note on every build.
    rolldownOptions: { checks: { bundlerTimings: false } },
  },
  plugins: [
    vue({ template: { transformAssetUrls } }),
    quasar({ sassVariables: fromRoot('./src/quasar-variables.sass') }),
    // Brotli and gzip copies of the text assets, served as they are (server/middleware/client-files.ts).
    {
      name: 'overtone-precompress',
      apply: 'build',
      writeBundle(options) {
        if (options.dir) precompress(options.dir)
      },
    },
  ],
  server: {
    host: '127.0.0.1',
    proxy: { '/api': 'http://127.0.0.1:3000' },
  },
  preview: { host: '127.0.0.1', proxy: { '/api': 'http://127.0.0.1:3000' } },
})
