import mysql from 'mysql2/promise'
import { drizzle } from 'drizzle-orm/mysql2'
import type { MySqlTransaction } from 'drizzle-orm/mysql-core'
import * as schema from './schema/index'

export type Db = ReturnType<typeof createDb>['db']

/** A Drizzle handle that can run statements: the db itself or an open transaction. */
export type DbOrTx = Db | MySqlTransaction<any, any, any, any>

/**
 * One mysql2 pool shared by Drizzle and the session store. `mode: 'planetscale'` because MariaDB
 * lacks LATERAL joins, which the default relational-query mode uses. In production mysql2 does not
 * capture a stack trace for every statement (`trace`), which cost a few per cent of the CPU of a
 * list request.
 */
/** A database that does not accept a connection within this is "down" (503), not a request that waits. */
const CONNECT_TIMEOUT_MS = 3000

export function createDb(url: string, connectionLimit = 10) {
  const pool = mysql.createPool({ uri: url, connectionLimit, connectTimeout: CONNECT_TIMEOUT_MS, timezone: 'Z', supportBigNumbers: true, dateStrings: false, trace: process.env.NODE_ENV !== 'production' })
  const db = drizzle({ client: pool, schema, mode: 'planetscale' })
  return { pool, db }
}
