import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ZodError } from 'zod'
import { AppError } from '../errors'
import type { ApiErrorBody } from '../../shared/types'
import { EngineError } from '../../shared/engine'
import { DB_UNAVAILABLE_MESSAGE } from './db-watchdog'
import type { Logger } from '../logger'
// Plain-words messages for every zod schema the routes parse with, also those defined in server/.
import '../../shared/schemas/messages'

/** Map zod issues to `{ "field.path": ["message", …] }`. */
export function zodFields(err: ZodError): Record<string, string[]> {
  const fields: Record<string, string[]> = {}
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_'
    ;(fields[key] ??= []).push(issue.message)
  }
  return fields
}

type DbError = { code?: string; errno?: number; sqlMessage?: string; message?: string; cause?: unknown }

/** The mysql2 error behind `err` (Drizzle wraps it as `cause`), if there is one. */
export function dbErrorOf(err: unknown): DbError | null {
  for (
    let e = err as DbError | undefined, i = 0;
    e && typeof e === 'object' && i < 5;
    e = e.cause as DbError | undefined, i++
  ) {
    if (typeof e.errno === 'number' || (typeof e.code === 'string' && /^(ER_|PROTOCOL_|E[A-Z]+$)/.test(e.code)))
      return e
  }
  return null
}

/**
 * The database cannot be reached or dropped the connection: stopped, restarting, unreachable,
 * frozen (a query timed out), out of connections. Answered 503 (try again), not 500.
 */
const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  'ETIMEDOUT',
  'EPIPE',
  'EHOSTUNREACH',
  'ENETUNREACH',
  'ENOTFOUND',
  'EAI_AGAIN',
  'PROTOCOL_CONNECTION_LOST',
  'PROTOCOL_SEQUENCE_TIMEOUT',
  'PROTOCOL_ENQUEUE_AFTER_FATAL_ERROR',
  'PROTOCOL_ENQUEUE_AFTER_QUIT',
  'ER_CON_COUNT_ERROR',
  'ER_TOO_MANY_USER_CONNECTIONS',
  'ER_SERVER_SHUTDOWN',
  'ER_LOCK_WAIT_TIMEOUT',
  'ER_QUERY_INTERRUPTED',
  // still refused after the transaction retries (server/db/tx-retry.ts): busy rows, or a Galera node not ready
  'ER_LOCK_DEADLOCK',
  'WSREP_NOT_READY',
])
const UNAVAILABLE_ERRNOS = new Set([1040, 1203, 1053, 1205, 1213, 1047, 1317, 2002, 2003, 2006, 2013])
export function isDbUnavailable(err: unknown): boolean {
  const e = dbErrorOf(err)
  if (e) return UNAVAILABLE_CODES.has(e.code ?? '') || UNAVAILABLE_ERRNOS.has(e.errno ?? 0)
  const m = (err as Error | undefined)?.message ?? ''
  // mysql2's own states after a fatal error, which carry no code
  return /Pool is closed|Can't add new command when connection is in closed state|connection is in closed state/.test(m)
}

/** Unique indexes over several columns, and the form field each one is about. */
const INDEX_FIELDS: Record<string, string> = {
  chips_wafer_index_uq: 'index',
  arrays_chip_position_uq: 'position',
  notice_log_key_uq: 'noticeKey',
}
const TABLE_PREFIX =
  /^(materials|locations|wafers|chips|arrays|laser_setups|measurement_sessions|users|invitations|label_jobs|files)_/
const camel = (s: string) => s.replace(/_([a-z])/g, (_m, c: string) => c.toUpperCase())

/**
 * A duplicate-key error (ER_DUP_ENTRY, 1062) as a 409 on the field its index is about: MariaDB says
 * "Duplicate entry 'x' for key 'materials_name_unique'"; Drizzle names a one-column unique index
 * `<table>_<column>_unique`, multi-column ones are listed above.
 */
export function duplicateKeyBody(e: DbError): ApiErrorBody {
  const key = /for key '(?:\w+\.)?(\w+)'/.exec(e.sqlMessage ?? e.message ?? '')?.[1] ?? ''
  let field = INDEX_FIELDS[key]
  if (!field && key) field = camel(key.replace(TABLE_PREFIX, '').replace(/_(unique|uq)$/, ''))
  field ||= '_'
  const what = field === '_' ? 'This value' : `This ${field === 'index' ? 'chip number' : field}`
  const msg = `${what} is already taken (it was probably saved a moment ago, e.g. by a second click); reload and check.`
  return { error: 'conflict', message: field === '_' ? msg : `${field}: ${msg}`, fields: { [field]: [msg] } }
}

export const apiNotFound: RequestHandler = (req, res) => {
  const body: ApiErrorBody = {
    error: 'not_found',
    message: `No API route ${req.method} ${req.path}`,
    requestId: req.id,
  }
  res.status(404).json(body)
}

/** The one JSON error handler: zod → 400 with fields, AppError → its status, anything else → 500 (logged). */
export function errorHandler(log: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    let status = 500
    let body: ApiErrorBody
    if (err instanceof ZodError) {
      status = 400
      const fields = zodFields(err)
      const first = Object.entries(fields)[0]
      body = { error: 'bad_request', message: first ? `${first[0]}: ${first[1][0]}` : 'Invalid input', fields }
    } else if (err instanceof AppError) {
      status = err.status
      body = { error: err.code, message: err.message, fields: err.fields }
    } else if (res.locals.isAnsweredByWatchdog) {
      return // the database watchdog answered 503 already; this is the late end of that request
    } else if (isDbUnavailable(err)) {
      status = 503
      body = { error: 'unavailable', message: DB_UNAVAILABLE_MESSAGE }
      res.set('Retry-After', '30')
    } else if (dbErrorOf(err)?.errno === 1062 || dbErrorOf(err)?.code === 'ER_DUP_ENTRY') {
      status = 409
      body = duplicateKeyBody(dbErrorOf(err)!)
    } else if (err instanceof EngineError) {
      status = 400
      body = { error: 'bad_request', message: err.message, fields: { [err.field || '_']: [err.message] } }
    } else if (
      err &&
      typeof err === 'object' &&
      'type' in err &&
      (err as { type: string }).type === 'entity.parse.failed'
    ) {
      status = 400
      body = { error: 'bad_request', message: 'The request body is not valid JSON.' }
    } else if (
      err &&
      typeof err === 'object' &&
      'status' in err &&
      typeof (err as { status: unknown }).status === 'number' &&
      (err as { status: number }).status >= 400 &&
      (err as { status: number }).status < 500
    ) {
      status = (err as { status: number }).status
      body = { error: 'bad_request', message: (err as Error).message || 'Bad request' }
    } else {
      // The request's own log line (server/logger.ts) then carries the error with its stack.
      if (req.log) (res as unknown as { err?: unknown }).err = err
      else log.error({ err, reqId: req.id, method: req.method, url: req.originalUrl }, 'request failed')
      body = { error: 'internal', message: 'Something went wrong on the server. The error was logged.' }
    }
    body.requestId = req.id
    if (!res.headersSent) res.status(status).json(body)
  }
}
