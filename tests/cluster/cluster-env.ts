import fs from 'node:fs'
import { spawn } from 'node:child_process'
import mysql from 'mysql2/promise'

/**
 * What scripts/cluster.sh started, from its environment: three Galera nodes, two app servers
 * (a on nodes 1,2,3; b on nodes 2,3,1) and haproxy in front of them. Helpers to reach, kill and
 * restart them, and a small cookie-keeping HTTP client. No sleeps as assertions: `until` polls a
 * condition with a deadline.
 */
export interface ClusterNode {
  name: string
  port: number
  socket: string
  pidFile: string
  start: string
}

const need = (name: string) => {
  const v = process.env[name]
  if (!v) throw new Error(`${name} is not set: run these tests through npm run test:cluster`)
  return v
}
export const proxyUrl = need('CLUSTER_PROXY_URL')
export const appA = { url: need('CLUSTER_APP_A_URL'), pid: Number(need('CLUSTER_APP_A_PID')) }
export const appB = { url: need('CLUSTER_APP_B_URL'), pid: Number(need('CLUSTER_APP_B_PID')) }
export const nodes = JSON.parse(need('CLUSTER_NODES')) as ClusterNode[]

/**
 * A connection straight to one node as the app user, with causal reads (it sees every write the cluster committed
 * before).
 */
export async function connectNode(n: ClusterNode): Promise<mysql.Connection> {
  const c = await mysql.createConnection({
    host: '127.0.0.1',
    port: n.port,
    user: need('CLUSTER_DB_USER'),
    password: need('CLUSTER_DB_PASSWORD'),
    database: need('CLUSTER_DB'),
    connectTimeout: 2000,
  })
  await c.query('SET SESSION wsrep_sync_wait = 1')
  return c
}

export async function nodeQuery<T>(n: ClusterNode, q: string, params: unknown[] = []): Promise<T[]> {
  const c = await connectNode(n)
  try {
    return (await c.query(q, params))[0] as T[]
  } finally {
    await c.end()
  }
}

export async function status(n: ClusterNode, name: string): Promise<string | null> {
  try {
    const rows = await nodeQuery<{ Value: string }>(n, 'SHOW STATUS LIKE ?', [name])
    return rows[0]?.Value ?? null
  } catch {
    return null
  }
}

/** Record a wsrep_cluster_size the tests saw (scripts/cluster.sh prints them). */
export function recordSize(size: string | number | null) {
  if (process.env.CLUSTER_SIZE_FILE && size !== null) fs.appendFileSync(process.env.CLUSTER_SIZE_FILE, `${size}\n`)
}

export const pidOf = (n: ClusterNode) => Number(fs.readFileSync(n.pidFile, 'utf8').trim())
export const isAlive = (pid: number) => {
  try {
    process.kill(pid, 0)
    return true
  } catch {
    return false
  }
}

/** kill -9 a node's mariadbd (by its pid file). */
export function killNode(n: ClusterNode): number {
  const pid = pidOf(n)
  process.kill(pid, 'SIGKILL')
  return pid
}

/** Start a node again with the command scripts/cluster.sh wrote for it (it rejoins by IST or SST). */
export function restartNode(n: ClusterNode): void {
  const child = spawn(n.start, [], { detached: true, stdio: 'ignore' })
  child.unref()
}

/** Poll `check` until it answers a truthy value, at most `ms`; throws with `what` when time is up. */
export async function until<T>(
  what: string,
  ms: number,
  check: () => Promise<T | null | undefined | false>,
  everyMs = 200,
): Promise<T> {
  const deadline = Date.now() + ms
  let last: unknown
  for (;;) {
    try {
      const v = await check()
      if (v) return v
    } catch (err) {
      last = err
    }
    if (Date.now() > deadline)
      throw new Error(
        `timed out after ${ms} ms waiting for ${what}${last ? ` (last error: ${(last as Error).message})` : ''}`,
      )
    await new Promise((r) => setTimeout(r, everyMs))
  }
}

export interface Answer {
  status: number
  // a parsed JSON body, as supertest types it
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  body: any
  ms: number
}

/**
 * A fetch client that keeps its session cookie (one per signed-in person); `base` can be changed to move it to another
 * server.
 */
export class Client {
  cookie = ''
  constructor(public base: string) {}
  async req(method: string, path: string, body?: unknown, timeoutMs = 15_000): Promise<Answer> {
    const t0 = Date.now()
    const res = await fetch(this.base + path, {
      method,
      redirect: 'manual',
      signal: AbortSignal.timeout(timeoutMs),
      headers: {
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
        ...(this.cookie ? { cookie: this.cookie } : {}),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    })
    const set = res.headers.getSetCookie?.() ?? []
    const sid = set.map((c) => c.split(';')[0]).find((c) => c.startsWith('sid='))
    if (sid) this.cookie = sid
    const text = await res.text()
    let parsed: unknown = text
    try {
      parsed = JSON.parse(text)
    } catch {
      /* not JSON */
    }
    return { status: res.status, body: parsed, ms: Date.now() - t0 }
  }
  get = (p: string) => this.req('GET', p)
  post = (p: string, b: unknown = {}) => this.req('POST', p, b)
  async signIn(email: string, password: string) {
    const r = await this.post('/api/auth/login', { email, password })
    if (r.status !== 200)
      throw new Error(`sign-in as ${email} on ${this.base} answered ${r.status} ${JSON.stringify(r.body)}`)
    return r
  }
}
