import mysql from 'mysql2/promise'
import { drizzle } from 'drizzle-orm/mysql2'
import * as schema from './schema/index'

export type Db = ReturnType<typeof createDb>['db']

/**
 * One mysql2 pool shared by Drizzle and the session store. `mode: 'planetscale'` because MariaDB
 * lacks LATERAL joins, which the default relational-query mode uses.
 */
export function createDb(url: string, connectionLimit = 10) {
  const pool = mysql.createPool({ uri: url, connectionLimit, timezone: 'Z', supportBigNumbers: true, dateStrings: false })
  const db = drizzle({ client: pool, schema, mode: 'planetscale' })
  return { pool, db }
}
