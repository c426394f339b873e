import type { ErrorRequestHandler, RequestHandler } from 'express'
import { ZodError } from 'zod'
import { AppError } from '../errors'
import type { ApiErrorBody } from '../../shared/types'
import { EngineError } from '../../shared/engine'
import type { Logger } from '../logger'

/** Map zod issues to `{ "field.path": ["message", …] }`. */
export function zodFields(err: ZodError): Record<string, string[]> {
  const fields: Record<string, string[]> = {}
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_'
    ;(fields[key] ??= []).push(issue.message)
  }
  return fields
}

export const apiNotFound: RequestHandler = (req, res) => {
  const body: ApiErrorBody = { error: 'not_found', message: `No API route ${req.method} ${req.path}`, requestId: req.id }
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
      // The request's own log line (server/logger.ts) then carries the error with its stack.
      if (req.log) (res as unknown as { err?: unknown }).err = err
      else log.error({ err, reqId: req.id, method: req.method, url: req.originalUrl }, 'request failed')
      body = { error: 'internal', message: 'Something went wrong on the server. The error was logged.' }
    }
    body.requestId = req.id
    if (!res.headersSent) res.status(status).json(body)
  }
}
