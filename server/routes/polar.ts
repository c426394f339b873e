import { Router } from 'express'
import { requireAbility } from '../auth/guards'
import { computePolar } from '../../shared/engine'

/**
 * Rotational-anisotropy patterns at oblique incidence over HTTP: the same request and response as
 * the `polar` CLI (shared/engine/polar.ts). Bad input throws EngineError, which the error handler
 * answers as a 400 with `fields: { path: [message] }`.
 */
export function polarRoutes(): Router {
  const r = Router()
  r.post('/', requireAbility('read', 'Channels'), (req, res) => {
    res.json(computePolar(req.body))
  })
  return r
}
