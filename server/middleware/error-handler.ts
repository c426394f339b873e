import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ZodError } from 'zod'
import { AppError } from '../errors'
import type { ApiErrorBody } from '../../shared/types'
import { EngineError } from '../../shared/engine'

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
  for (let e = err as DbError | undefined, i = 0; e && typeof e === 'object' && i < 5; e = e.cause as DbError | undefined, i++) {
    if (typeof e.errno === 'number' || (typeof e.code === 'string' && /^(ER_|PROTOCOL_|E[A-Z]+$)/.test(e.code))) return e
  }
  return null
}

/** Unique indexes over several columns, and the form field each one is about. */
const INDEX_FIELDS: Record<string, string> = {
  chips_wafer_index_uq: 'index', arrays_chip_position_uq: 'position', notice_log_key_uq: 'noticeKey',
}
const TABLE_PREFIX = /^(materials|locations|wafers|chips|arrays|laser_setups|measurement_sessions|users|invitations|label_jobs|files)_/
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
  const body: ApiErrorBody = { error: 'not_found', message: `No API route ${req.method} ${req.path}`, requestId: req.id }
  res.status(404).json(body)
}

/** The one JSON error handler: zod → 400 with fields, AppError → its status, anything else → 500 (logged). */
export function errorHandler(log: (msg: string) => void): ErrorRequestHandler {
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
    } else if (dbErrorOf(err)?.errno === 1062 || dbErrorOf(err)?.code === 'ER_DUP_ENTRY') {
      status = 409
      body = duplicateKeyBody(dbErrorOf(err)!)
    } else if (err instanceof EngineError) {
      status = 400
      body = { error: 'bad_request', message: err.message, fields: { [err.field || '_']: [err.message] } }
    } else if (err && typeof err === 'object' && 'type' in err && (err as { type: string }).type === 'entity.parse.failed') {
      status = 400
      body = { error: 'bad_request', message: 'The request body is not valid JSON.' }
    } else if (err && typeof err === 'object' && 'status' in err && typeof (err as { status: unknown }).status === 'number'
      && (err as { status: number }).status >= 400 && (err as { status: number }).status < 500) {
      status = (err as { status: number }).status
      body = { error: 'bad_request', message: (err as Error).message || 'Bad request' }
    } else {
      log(`[${req.id}] ${req.method} ${req.originalUrl} failed: ${(err as Error)?.stack ?? String(err)}`)
      body = { error: 'internal', message: 'Something went wrong on the server. The error was logged.' }
    }
    body.requestId = req.id
    if (!res.headersSent) res.status(status).json(body)
  }
}
