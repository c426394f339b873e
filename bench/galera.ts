/**
 * Writes through haproxy to two app servers on Galera: `npm run bench:cluster` (scripts/cluster.sh
 * bench starts node 1 alone, the app servers and the proxy, and passes their addresses). Prints:
 * write throughput and latency with one node, the same after nodes 2 and 3 have joined (app server
 * b back on node 2), and the failover when node 1 is killed with kill -9 under writes. Each write is
 * POST /api/locations (one transaction: the code series row, the location, its audit row).
 *
 *   BENCH_SECONDS      seconds per throughput run (default 10)
 *   BENCH_CONCURRENCY  writers at once (default 8)
 */
import { Client, nodeQuery, nodes, proxyUrl, killNode, restartNode, status, until } from '../tests/cluster/cluster-env'

const SECONDS = Number(process.env.BENCH_SECONDS ?? 10)
const CONCURRENCY = Number(process.env.BENCH_CONCURRENCY ?? 8)
const ADMIN = 'admin@kestrel-lab.example'
const PASSWORD = 'overtone-demo'
const [node1, node2, node3] = nodes
const tag = `bench${Date.now().toString(36)}`
let seq = 0

interface Shot {
  start: number
  end: number
  status: number
  writer: number
}

async function writers(n: number) {
  return Promise.all(
    Array.from({ length: n }, async () => {
      const c = new Client(proxyUrl)
      await c.signIn(ADMIN, PASSWORD)
      return c
    }),
  )
}

/** Write for `ms` with these clients; every request's start, end and status. */
async function load(clients: Client[], ms: number, during?: () => Promise<void>): Promise<Shot[]> {
  const shots: Shot[] = []
  const stopAt = Date.now() + ms
  const loops = clients.map(async (c, writer) => {
    while (Date.now() < stopAt) {
      const start = Date.now()
      const r = await c.post('/api/locations', { kind: 'room', name: `${tag} ${seq++}` }).catch(() => ({ status: 0 }))
      shots.push({ start, end: Date.now(), status: r.status, writer })
      if (r.status !== 201) await new Promise((res) => setTimeout(res, 100))
    }
  })
  await Promise.all([...loops, during?.()])
  return shots
}

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b)
  return s.length ? s[Math.min(s.length - 1, Math.floor(p * s.length))] : NaN
}

function summary(label: string, shots: Shot[], ms: number) {
  const ok = shots.filter((s) => s.status === 201)
  const lat = ok.map((s) => s.end - s.start)
  const other = new Map<number, number>()
  for (const s of shots) if (s.status !== 201) other.set(s.status, (other.get(s.status) ?? 0) + 1)
  return {
    label,
    'writes/s': (ok.length / (ms / 1000)).toFixed(1),
    'p50 ms': pct(lat, 0.5),
    'p95 ms': pct(lat, 0.95),
    'not 201': [...other].map(([st, n]) => `${n}× ${st || 'no answer'}`).join(', ') || '0',
  }
}

async function appConnectionsOn(n: typeof node1): Promise<number> {
  const rows = await nodeQuery<{ n: number }>(
    n,
    'SELECT count(*) AS n FROM information_schema.processlist WHERE user = ? AND id <> CONNECTION_ID()',
    [process.env.CLUSTER_DB_USER],
  )
  return Number(rows[0].n)
}

async function main() {
  const rows: ReturnType<typeof summary>[] = []
  const clients = await writers(CONCURRENCY)
  await load(clients, 2000) // warm-up
  console.error(`[bench] one node: ${SECONDS} s of writes at concurrency ${CONCURRENCY}`)
  rows.push(summary('1 node (both app servers on node 1)', await load(clients, SECONDS * 1000), SECONDS * 1000))

  for (const n of [node2, node3]) {
    const t0 = Date.now()
    restartNode(n)
    await until(
      `${n.name} to be Synced`,
      180_000,
      async () => (await status(n, 'wsrep_local_state_comment')) === 'Synced',
      500,
    )
    console.error(`[bench] ${n.name} joined in ${Date.now() - t0} ms`)
  }
  // App server b lists node 2 first: it returns there once the pool's 5 s "down" mark has run out.
  await until(
    'app server b on node 2',
    60_000,
    async () => {
      await load(clients, 500)
      return (await appConnectionsOn(node2)) > 0
    },
    500,
  )
  await load(clients, 2000)
  console.error(`[bench] three nodes: ${SECONDS} s of writes`)
  rows.push(summary('3 nodes (a on node 1, b on node 2)', await load(clients, SECONDS * 1000), SECONDS * 1000))

  // Failover: node 1 (app server a's first node) killed under writes.
  console.error('[bench] failover: kill -9 node 1 under writes')
  let killedAt = 0
  let evictedAt = 0
  const shots = await load(clients, 15_000, async () => {
    await new Promise((r) => setTimeout(r, 3000))
    killNode(node1)
    killedAt = Date.now()
    await until(
      'the cluster to drop to two nodes',
      30_000,
      async () => (await status(node2, 'wsrep_cluster_size')) === '2',
      50,
    )
    evictedAt = Date.now()
  })
  const after = shots.filter((s) => s.end > killedAt)
  const recovered = clients.map((_c, w) =>
    Math.min(...after.filter((s) => s.writer === w && s.status === 201 && s.start >= killedAt).map((s) => s.end)),
  )
  const longest = Math.max(...after.map((s) => s.end - Math.max(s.start, killedAt)))
  rows.push(summary('3 → 2 nodes, the 15 s around kill -9 of node 1', shots, 15_000))
  console.table(rows)
  console.log(
    `failover: the survivors evicted node 1 after ${evictedAt - killedAt} ms; every writer had a 201 again ${Math.max(...recovered) - killedAt} ms after the kill; ` +
      `the longest write waited ${longest} ms; ${after.filter((s) => s.status !== 201).length} of ${after.length} writes after the kill were not 201`,
  )
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err)
    process.exit(1)
  },
)
