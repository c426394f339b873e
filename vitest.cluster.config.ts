import { defineConfig } from 'vitest/config'

// The tests on a real three-node Galera cluster behind haproxy: only through `npm run test:cluster`
// (scripts/cluster.sh starts the cluster, the app servers and the proxy, and passes their addresses).
export default defineConfig({
  test: {
    include: ['tests/cluster/**/*.test.ts'],
    environment: 'node',
    testTimeout: 120_000,
    hookTimeout: 120_000,
    fileParallelism: false,
  },
})
