import { Router } from 'express'
import { requireAbility } from '../auth/guards'
import { computeChannels } from '../../shared/engine'

/** The harmonic-channel engine over HTTP: same request and response as the `channels` CLI. */
export function channelRoutes(): Router {
  const r = Router()
  r.post('/', requireAbility('read', 'Channels'), (req, res) => {
    res.json(computeChannels(req.body))
  })
  return r
}
