import mysql, { type Pool, type PoolConnection, type PoolOptions } from 'mysql2/promise'
import { hostUrl, parseDatabaseUrl, type DbHost } from './url'

/**
 * One mysql2 pool per database host, used as one pool (the subset of mysql2's promise Pool that
 * Drizzle, the session store and the app use: `query`, `execute`, `getConnection`, `end`).
 *
 * Failover: a connection is taken from the first host of the list that is not marked down; a host
 * whose connect fails, or whose connection breaks or is refused by Galera (a node that is not synced
 * or not in the primary component answers 1047 "WSREP has not yet prepared node for application
 * use"), is marked down for DOWN_MS and the next host is used. After DOWN_MS the host is tried
 * again, so an app server returns to its first node once that node is back. When every host is
 * marked down all are still tried in order (a request is never refused without trying), and the
 * last error is thrown: the error handler and the db-watchdog answer 503 as for one database.
 *
 * Every new connection is checked once: on a Galera node (`@@wsrep_on`) it must be ready
 * (`wsrep_ready`), and gets `SET SESSION wsrep_sync_wait = <syncWait>`: its reads first wait until
 * the node has applied every write set the cluster committed before the read began, so a session
 * row, a person or a record written through another app server (on another node) is seen on the
 * very next request. On a plain MariaDB nothing is set.
 *
 * `query`/`execute` straight on the pool (not in a transaction) are sent again once on the next
 * host when the first host refused them (1047) or, for a read (SELECT/SHOW), when the connection
 * broke: a write whose connection broke may or may not have committed and is not repeated here.
 */
export const DOWN_MS = 5000

/** Errors that say "this node cannot serve now" rather than "this statement is wrong". */
const NODE_FAULT_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'PROTOCOL_ENQUEUE_AFTER_FATAL_ERROR',
  'ER_SERVER_SHUTDOWN',
  'WSREP_NOT_READY',
])
const NODE_FAULT_ERRNOS = new Set([1047, 1053, 2002, 2003, 2006, 2013])
const CLOSED = /Pool is closed|connection is in closed state/

type Coded = { code?: string; errno?: number; message?: string }
export function isNodeFault(err: unknown): boolean {
  const e = err as Coded | undefined
  if (!e) return false
  return NODE_FAULT_CODES.has(e.code ?? '') || NODE_FAULT_ERRNOS.has(e.errno ?? 0) || CLOSED.test(e.message ?? '')
}
/** Refused before anything ran: safe to send again anywhere. */
const isRefused = (err: unknown) =>
  (err as Coded | undefined)?.errno === 1047 || (err as Coded | undefined)?.code === 'WSREP_NOT_READY'
const sqlText = (q: unknown) => (typeof q === 'string' ? q : ((q as { sql?: string } | undefined)?.sql ?? ''))
const isRead = (q: unknown) => /^\s*(\(\s*)?(select|show)\b/i.test(sqlText(q))

export interface FailoverOptions extends Omit<PoolOptions, 'uri' | 'host' | 'port'> {
  /** `wsrep_sync_wait` for connections to a Galera node (1 = reads are causal; 0 = off). */
  syncWait?: number
}

export class FailoverPool {
  readonly hosts: DbHost[]
  private readonly pools: Pool[]
  private readonly downUntil: number[]
  private readonly prepared = new WeakSet<object>()
  private readonly syncWait: number
  /** Per host: Galera node? (undefined until a connection told). */
  readonly galera: (boolean | undefined)[]

  constructor(url: string, opts: FailoverOptions = {}) {
    const parsed = parseDatabaseUrl(url)
    const { syncWait = 1, ...poolOpts } = opts
    this.syncWait = syncWait
    this.hosts = parsed.hosts
    this.pools = parsed.hosts.map((h) => mysql.createPool({ ...poolOpts, uri: hostUrl(parsed, h) }))
    this.downUntil = parsed.hosts.map(() => 0)
    this.galera = parsed.hosts.map(() => undefined)
  }

  /** Hosts to try, in list order: those not marked down first, then the others. */
  private order(): number[] {
    const now = Date.now()
    const idx = this.hosts.map((_h, i) => i)
    return [...idx.filter((i) => this.downUntil[i] <= now), ...idx.filter((i) => this.downUntil[i] > now)]
  }

  private markDown(i: number) {
    this.downUntil[i] = Date.now() + DOWN_MS
  }

  /** Which host a new connection would go to now (for logs and tests). */
  currentHost(): DbHost {
    return this.hosts[this.order()[0]]
  }

  /** Check a new connection once (Galera: ready, causal reads). Throws when the node cannot serve. */
  private async prepare(i: number, conn: PoolConnection): Promise<void> {
    if (this.prepared.has(conn.connection)) return
    let wsrepOn = false
    try {
      const [rows] = (await conn.query('SELECT @@wsrep_on AS w')) as unknown as [{ w: number | string }[]]
      wsrepOn = Number(rows[0]?.w) === 1
    } catch (err) {
      if ((err as Coded).errno !== 1193) throw err // 1193: unknown variable, a server built without wsrep
    }
    this.galera[i] = wsrepOn
    if (wsrepOn) {
      // SHOW answers also on a node that is not ready (it refuses most other statements).
      const [status] = (await conn.query("SHOW STATUS LIKE 'wsrep_ready'")) as unknown as [{ Value: string }[]]
      if (status[0]?.Value !== 'ON')
        throw Object.assign(
          new Error(
            `Galera node ${this.hosts[i].host}:${this.hosts[i].port} is not ready (wsrep_ready=${status[0]?.Value ?? '?'})`,
          ),
          { code: 'WSREP_NOT_READY', errno: 1047 },
        )
      await conn.query(`SET SESSION wsrep_sync_wait = ${Math.max(0, Math.min(15, Math.trunc(this.syncWait)))}`)
    }
    this.prepared.add(conn.connection)
  }

  /**
   * Mark the host down when a statement on its connection shows a node fault; a refused connection is dropped, not
   * reused.
   */
  private watch(i: number, conn: PoolConnection): PoolConnection {
    let refused = false
    const seen = (err: unknown) => {
      if (isNodeFault(err)) {
        this.markDown(i)
        if (isRefused(err)) refused = true
      }
      throw err
    }
    const query = conn.query.bind(conn) as (...a: unknown[]) => Promise<unknown>
    const execute = conn.execute.bind(conn) as (...a: unknown[]) => Promise<unknown>
    const release = conn.release.bind(conn)
    Object.assign(conn, {
      query: (...a: unknown[]) => query(...a).catch(seen),
      execute: (...a: unknown[]) => execute(...a).catch(seen),
      release: () => (refused ? conn.destroy() : release()),
    })
    return conn
  }

  async getConnection(): Promise<PoolConnection> {
    let last: unknown
    for (const i of this.order()) {
      let conn: PoolConnection
      try {
        conn = await this.pools[i].getConnection()
      } catch (err) {
        last = err
        this.markDown(i)
        continue
      }
      try {
        await this.prepare(i, conn)
      } catch (err) {
        conn.destroy()
        last = err
        this.markDown(i)
        continue
      }
      this.downUntil[i] = 0
      this.hostOfConn.set(conn.connection, this.hosts[i])
      return this.watch(i, conn)
    }
    throw last
  }

  private async send(how: 'query' | 'execute', args: unknown[]): Promise<unknown> {
    for (let attempt = 0; ; attempt++) {
      const conn = await this.getConnection()
      try {
        return await (conn[how] as (...a: unknown[]) => Promise<unknown>)(...args)
      } catch (err) {
        if (attempt === 0 && this.hosts.length > 1 && (isRefused(err) || (isNodeFault(err) && isRead(args[0]))))
          continue
        throw err
      } finally {
        conn.release()
      }
    }
  }

  /**
   * Does a host answer? `SELECT 1` on a connection, without the causal wait on a Galera node: while
   * the cluster is changing its membership (a node just died and is not yet evicted) a causal read
   * waits, but the node still answers, and requests only wait a few seconds for their commits. The
   * db-watchdog and /api/health use this, so that window is not reported as "database down".
   */
  async ping(): Promise<void> {
    const conn = await this.getConnection()
    try {
      const i = this.hosts.findIndex((h) => h === this.hostOf(conn))
      await conn.query(this.galera[i] ? 'SET STATEMENT wsrep_sync_wait = 0 FOR SELECT 1' : 'SELECT 1')
    } finally {
      conn.release()
    }
  }

  private readonly hostOfConn = new WeakMap<object, DbHost>()
  private hostOf(conn: PoolConnection): DbHost | undefined {
    return this.hostOfConn.get(conn.connection)
  }

  query(...args: unknown[]) {
    return this.send('query', args)
  }
  execute(...args: unknown[]) {
    return this.send('execute', args)
  }

  async end(): Promise<void> {
    await Promise.all(this.pools.map((p) => p.end()))
  }

  /** mysql2's Pool emits connection events; listeners are put on every host's pool. */
  on(event: string, listener: (...a: unknown[]) => void): this {
    for (const p of this.pools)
      (p as unknown as { on: (e: string, l: (...a: unknown[]) => void) => void }).on(event, listener)
    return this
  }
}

/** The failover pool typed as mysql2's Pool (it implements the part of it that is used). */
export function createFailoverPool(url: string, opts: FailoverOptions = {}): Pool {
  return new FailoverPool(url, opts) as unknown as Pool
}
