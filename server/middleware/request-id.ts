import { randomUUID } from 'node:crypto'
import type { RequestHandler } from 'express'

declare module 'express-serve-static-core' {
  interface Request {
    id: string
  }
}

/** Give every request an id, echoed in `X-Request-Id` and in error bodies and logs. */
export const requestId: RequestHandler = (req, res, next) => {
  const incoming = req.get('x-request-id')
  req.id = incoming && /^[\w-]{8,64}$/.test(incoming) ? incoming : randomUUID()
  res.set('X-Request-Id', req.id)
  next()
}
