import type { Pool } from 'mysql2/promise'
import { drizzle } from 'drizzle-orm/mysql2'
import * as schema from './schema/index'
import { createFailoverPool } from './failover-pool'
import { withTxRetry } from './tx-retry'

export type Db = ReturnType<typeof createDb>['db']

/** A Drizzle handle that can run statements: the db itself or an open transaction. */
export type DbOrTx = Db | Parameters<Parameters<Db['transaction']>[0]>[0]

/** A database that does not accept a connection within this is "down" (503), not a request that waits. */
const CONNECT_TIMEOUT_MS = 3000

export interface DbOptions {
  /** `wsrep_sync_wait` on connections to a Galera node (see failover-pool.ts); default 1 (causal reads). */
  syncWait?: number
}

/**
 * One pool shared by Drizzle and the session store: mysql2 pools, one per host of `DATABASE_URL`
 * (`mysql://u:p@h1:3306,h2:3306/db`), with failover to the next host and causal reads on Galera
 * (server/db/failover-pool.ts). `mode: 'planetscale'` because MariaDB lacks LATERAL joins, which
 * the default relational-query mode uses. In production mysql2 does not capture a stack trace for
 * every statement (`trace`), which cost a few per cent of the CPU of a list request.
 *
 * `db.transaction` — the one every service calls — runs its callback again when the database
 * refuses the whole transaction (deadlock / Galera certification conflict, a node not ready, a
 * connection broken before COMMIT), at most TX_ATTEMPTS times (server/db/tx-retry.ts). So a
 * transaction callback must only touch the database (or do what is safe to repeat): it may run
 * more than once.
 */
export function createDb(url: string, connectionLimit = 10, opts: DbOptions = {}) {
  const pool: Pool = createFailoverPool(url, {
    connectionLimit,
    connectTimeout: CONNECT_TIMEOUT_MS,
    timezone: 'Z',
    supportBigNumbers: true,
    dateStrings: false,
    trace: process.env.NODE_ENV !== 'production',
    syncWait: opts.syncWait,
  })
  const db = drizzle({ client: pool, schema, mode: 'planetscale' })
  const once = db.transaction.bind(db)
  db.transaction = ((run, config) =>
    withTxRetry((commitSent) =>
      once(async (tx) => {
        const result = await run(tx)
        commitSent()
        return result
      }, config),
    )) as typeof db.transaction
  return { pool, db }
}
