import { defineConfig } from 'vitest/config'

// Unit tests (engine, pure helpers) and API tests against the real MariaDB started by scripts/test.sh.
export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    // tests/cluster/ needs the Galera cluster of `npm run test:cluster` (vitest.cluster.config.ts).
    exclude: ['tests/cluster/**', 'node_modules/**'],
    environment: 'node',
    testTimeout: 30_000,
    hookTimeout: 60_000,
    // API tests share one database; run files one after another.
    fileParallelism: false,
  },
})
