import type { Pool, PoolConnection } from 'mysql2/promise'

/**
 * The data version: a counter in MariaDB (table data_version, one row) that goes up after every
 * committed write the app makes, whichever app server makes it. A response cache (server/middleware/
 * response-cache.ts) keeps a GET answer under the version it read BEFORE reading the data, and
 * serves it again only while the version is unchanged. Why that is never stale:
 * - a write bumps the version only after it has committed (a transaction: right after COMMIT, on
 *   the same connection; a single statement: right after it), and the writer's own request waits
 *   for the bump before it answers, so whoever sees the old version cannot yet depend on the write;
 * - a cached answer was read after its version was read, so it holds every write bumped before.
 * A server that dies between a commit and its bump leaves answers cached elsewhere up to the cache's
 * time limit (RESPONSE_CACHE_TTL_MS). Writes made outside the app (hand-written SQL) are not counted
 * either: restart the app or wait for that limit.
 *
 * Writes to tables no cached answer reads (the session store, the sign-in throttle, the Excel
 * export jobs) do not count, or every sign-in, session refresh and export progress update would
 * empty every cache. A route that caches its answer must not read one of these tables (the export
 * job routes are not cached: a job's progress changes without any write that counts).
 */
const UNCOUNTED_TABLES = new Set(['sessions', 'throttle_hits', 'export_jobs', 'data_version'])

const BUMP = 'UPDATE `data_version` SET `n` = `n` + 1 WHERE `id` = 1'
const READ = 'SELECT SQL_CACHE `n` FROM `data_version` WHERE `id` = 1'

type Kind = 'read' | 'write' | 'begin' | 'end' | 'commit'

/**
 * What a statement does to the data version: reads, writes (with the table), or controls a
 * transaction. `params` fill a `??` table placeholder (the session store writes `INSERT INTO ??`).
 */
export function statementKind(text: string, params?: unknown): Kind {
  const m = /^\s*(?:\/\*.*?\*\/\s*)*([a-z]+)(?:\s+(?:ignore\s+|low_priority\s+|into\s+|from\s+)*`?(\?\?|[\w$]+)`?)?/i.exec(text)
  const table = m?.[2] === '??' && Array.isArray(params) ? String(params[0]) : (m?.[2] ?? '')
  const verb = (m?.[1] ?? '').toLowerCase()
  switch (verb) {
    // (WITH is counted below: MySQL allows `WITH … UPDATE`; MariaDB reads seldom start with it here.)
    case 'select': case 'show': case 'explain': case 'describe': case 'set': case 'do': case 'help': case 'savepoint': case 'release':
      return 'read'
    case 'begin': case 'start':
      return 'begin'
    case 'commit':
      return 'commit'
    case 'rollback':
      return /^\s*rollback\s+to\b/i.test(text) ? 'read' : 'end'
    case 'insert': case 'update': case 'delete': case 'replace':
      return UNCOUNTED_TABLES.has(table.toLowerCase()) ? 'read' : 'write'
    default:
      return 'write' // DDL, LOAD DATA, CALL, anything unknown: count it
  }
}

const textOf = (q: unknown) => (typeof q === 'string' ? q : ((q as { sql?: string })?.sql ?? ''))

const bumpFailedListeners = new Set<(err: unknown) => void>()
/**
 * Called when a bump fails after its write has committed (the connection dropped, a lock wait timed
 * out). The write is NOT failed for that — it has committed, and answering an error would invite a
 * second, duplicate attempt — so each response cache empties itself instead (others' caches keep
 * their answers up to RESPONSE_CACHE_TTL_MS). Answers a function that removes the listener.
 */
export function onBumpFailed(listener: (err: unknown) => void): () => void {
  bumpFailedListeners.add(listener)
  return () => bumpFailedListeners.delete(listener)
}

async function bump(on: Pick<Pool, 'query'>): Promise<void> {
  try {
    await on.query(BUMP)
  } catch (e) {
    // Before migration 0010 (migrate.ts itself, old test databases) there is nothing to count in.
    if ((e as { errno?: number }).errno === 1146) return
    for (const listener of bumpFailedListeners) {
      try { listener(e) } catch { /* a listener must never fail a write that has committed */ }
    }
  }
}

const WATCHED = Symbol('data-version watched')
type Watchable = { query: (...a: never[]) => Promise<unknown>; execute: (...a: never[]) => Promise<unknown>; [WATCHED]?: true }

/** A connection taken from the pool (a transaction): count its writes at COMMIT, forget them at ROLLBACK. */
function watchConnection(conn: PoolConnection): PoolConnection {
  const c = conn as unknown as Watchable
  if (c[WATCHED]) return conn
  c[WATCHED] = true
  let inTx = false, wrote = false
  /** The end of a transaction; a COMMIT counts when it wrote, even when its answer was lost (it may
   * have committed: counting once too often is harmless, missing one is not). */
  const endTx = async (committed: boolean) => {
    const counted = committed && wrote
    inTx = false; wrote = false
    if (counted) await bump(conn)
  }
  for (const method of ['query', 'execute'] as const) {
    const original = c[method].bind(conn) as (...a: unknown[]) => Promise<unknown>
    ;(c as unknown as Record<string, unknown>)[method] = async (...args: unknown[]) => {
      const kind = statementKind(textOf(args[0]), args[1])
      try {
        const result = await original(...args)
        if (kind === 'begin') { inTx = true; wrote = false } else if (kind === 'end') await endTx(false)
        else if (kind === 'write' && inTx) wrote = true
        return result
      } finally {
        if (kind === 'commit') await endTx(true)
        else if (kind === 'write' && !inTx) await bump(conn) // autocommit: committed (or may have)
      }
    }
  }
  // mysql2's own transaction calls (they do not go through query())
  const tx = conn as unknown as Record<'beginTransaction' | 'commit' | 'rollback', () => Promise<void>>
  const begin = tx.beginTransaction.bind(conn), commit = tx.commit.bind(conn), rollback = tx.rollback.bind(conn)
  tx.beginTransaction = async () => { await begin(); inTx = true; wrote = false }
  tx.rollback = async () => { await rollback(); await endTx(false) }
  tx.commit = async () => { try { await commit() } finally { await endTx(true) } }
  return conn
}

/** Make every write through `pool` (single statements and transactions) bump the data version once it has committed. */
export function countWrites(pool: Pool): Pool {
  const p = pool as unknown as Watchable & { getConnection: () => Promise<PoolConnection> }
  if (p[WATCHED]) return pool
  p[WATCHED] = true
  for (const method of ['query', 'execute'] as const) {
    const original = p[method].bind(pool) as (...a: unknown[]) => Promise<unknown>
    ;(p as unknown as Record<string, unknown>)[method] = async (...args: unknown[]) => {
      // A lone statement on the pool runs in autocommit mode: it has committed when it answers
      // (and may have when its answer was lost: counted then too).
      const isWrite = statementKind(textOf(args[0]), args[1]) === 'write'
      try {
        return await original(...args)
      } finally {
        if (isWrite) await bump(pool)
      }
    }
  }
  const getConnection = p.getConnection.bind(pool)
  p.getConnection = async () => watchConnection(await getConnection())
  return pool
}

/** The current data version (usually an answer from MariaDB's query cache); null before migration 0010. */
export async function readDataVersion(pool: Pick<Pool, 'query'>): Promise<number | null> {
  try {
    const [rows] = (await pool.query(READ)) as unknown as [{ n: number | string }[]]
    return rows[0] ? Number(rows[0].n) : null
  } catch (e) {
    if ((e as { errno?: number }).errno === 1146) return null
    throw e
  }
}

/**
 * `readDataVersion` for many concurrent callers with fewer queries: a caller never gets the answer
 * of a read that was sent before it asked (it could predate a write the caller knows of); it waits
 * for the next read instead, which is sent as soon as the one in flight answers and serves every
 * caller that arrived meanwhile. Under load one query answers a whole batch of requests.
 */
export function sharedVersionReader(pool: Pick<Pool, 'query'>): () => Promise<number | null> {
  let inFlight: Promise<number | null> | null = null
  let following: Promise<number | null> | null = null
  const start = () => {
    const p: Promise<number | null> = readDataVersion(pool).finally(() => { if (inFlight === p) inFlight = null })
    inFlight = p
    return p
  }
  return () => {
    if (!inFlight) return start()
    following ??= inFlight.then(() => undefined, () => undefined).then(() => { following = null; return start() })
    return following
  }
}
