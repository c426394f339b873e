import type mysql from 'mysql2/promise'

/** The statements a service sends, with their parameters. */
export type Captured = [string, unknown[]][]

/**
 * A view of `pool` whose query() records every statement into `into` before sending it, so a
 * route's SQL (Drizzle's and plainRows' alike) can be replayed or explained on its own.
 */
export function capturingPool(pool: mysql.Pool, into: Captured): mysql.Pool {
  const capturing = Object.create(pool) as mysql.Pool
  capturing.query = ((q: string | { sql: string }, params?: unknown[]) => {
    into.push([typeof q === 'string' ? q : q.sql, params ?? []])
    return pool.query(q as string, params)
  }) as typeof pool.query
  return capturing
}
