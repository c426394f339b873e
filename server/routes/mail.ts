import { Router } from 'express'
import { idParamSchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { requireAbility } from '../auth/guards'
import { getReceived, listQueue, listReceived } from '../services/mail'
import { NotFoundError } from '../errors'

/** The local sink's received mail and the outgoing queue (admins). */
export function mailRoutes(ctx: AppContext): Router {
  const r = Router()
  r.use(requireAbility('read', 'Mail'))
  r.get('/', async (_req, res) => { res.json({ messages: await listReceived(ctx.db) }) })
  r.get('/queue', async (_req, res) => { res.json({ queue: await listQueue(ctx.db) }) })
  r.get('/:id', async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const msg = await getReceived(ctx.db, id)
    if (!msg) throw new NotFoundError('No such message')
    res.json(msg)
  })
  return r
}
