import type { RequestHandler } from 'express'
import { ForbiddenError } from '../errors'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

/**
 * Refuse cross-site state-changing requests: the Origin (or Sec-Fetch-Site) a browser sends must
 * be this server's own. Requests without either header come from non-browser clients and are let
 * through (they carry no ambient cookie from a victim's browser).
 */
export const originCheck: RequestHandler = (req, _res, next) => {
  if (SAFE.has(req.method)) return next()
  const site = req.get('sec-fetch-site')
  if (site && site !== 'same-origin' && site !== 'none') return next(new ForbiddenError('Cross-site request refused.'))
  const origin = req.get('origin')
  if (origin && origin !== 'null') {
    let host: string
    try {
      host = new URL(origin).host
    } catch {
      return next(new ForbiddenError('Cross-site request refused.'))
    }
    if (host !== req.get('host')) return next(new ForbiddenError('Cross-site request refused.'))
  } else if (origin === 'null') {
    return next(new ForbiddenError('Cross-site request refused.'))
  }
  next()
}
