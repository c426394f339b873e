import { pino, type DestinationStream, type Logger } from 'pino'
import { pinoHttp } from 'pino-http'
import type { RequestHandler } from 'express'

export type { Logger }

/**
 * Structured logs: one JSON object per line on stdout (pino), with `time` (ISO 8601), `level`
 * (number, as pino writes it), `msg`, and for a request `reqId` (the request's X-Request-Id, also
 * in error bodies). `LOG_LEVEL` picks the least severe level written (`silent` writes nothing; the
 * tests and the bench run with `error` or `silent`). Nothing secret is logged: request lines carry
 * method, URL, status, time and the person's id, never headers or bodies.
 */
export function createLogger(level: string = 'info', destination?: DestinationStream): Logger {
  return pino({ level, base: { app: 'overtone' }, timestamp: pino.stdTimeFunctions.isoTime }, destination)
}

/** A logger that writes nothing (tests, tools). */
export const silentLogger = (): Logger => createLogger('silent')

/**
 * One log line per finished request (after `requestId`, whose id it takes): `info` for answers
 * under 400, `warn` for 4xx, `error` for 5xx or a failed response; `req.log` is a child logger
 * bound to the request id for anything logged while the request runs. The load balancer's health
 * probe is not logged.
 */
export function requestLogger(logger: Logger): RequestHandler {
  return pinoHttp({
    logger,
    genReqId: (req) => (req as unknown as { id: string }).id,
    customAttributeKeys: { reqId: 'reqId' },
    quietReqLogger: true, // req.log carries only the request id
    autoLogging: { ignore: (req) => (req.url ?? '').startsWith('/api/health') },
    customLogLevel: (_req, res, err) =>
      err || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'warn' : 'info',
    customSuccessMessage: (req, res) =>
      `${req.method} ${(req as unknown as { originalUrl?: string }).originalUrl ?? req.url} ${res.statusCode}`,
    customErrorMessage: (req, res, err) =>
      `${req.method} ${(req as unknown as { originalUrl?: string }).originalUrl ?? req.url} ${res.statusCode}: ${err.message}`,
    customProps: (req) => {
      const user = (req as unknown as { user?: { id?: number } }).user
      return user?.id !== undefined ? { userId: user.id } : {}
    },
    serializers: {
      req: (req: { method: string; url: string; raw?: { originalUrl?: string } }) => ({
        method: req.method,
        url: req.raw?.originalUrl ?? req.url,
      }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  }) as unknown as RequestHandler
}
