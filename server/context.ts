import type { Pool } from 'mysql2/promise'
import type { Db } from './db/client'
import type { Env } from './env'
import type { Logger } from './logger'

/** What routes and services need from the running app; built once in index.ts (or by a test). */
export interface AppContext {
  db: Db
  pool: Pool
  env: Env
  /** Base URL for links in mail and QR codes, without a trailing slash. */
  publicUrl: string
  /** Structured JSON logs (pino); a request's own is `req.log`, bound to its id. */
  log: Logger
  /** Is outgoing mail deliverable right now (sink or real server answers)? */
  mailUp: () => Promise<boolean>
  startedAt: number
}
