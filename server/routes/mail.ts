import { Router } from 'express'
import { idParamSchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility, requireUser } from '../auth/guards'
import { getReceived, listQueue, listReceived } from '../services/mail/mail'
import { ForbiddenError, NotFoundError } from '../errors'
import { queueDigest } from '../services/mail/notice-scheduler'

/** The local sink's received mail and the outgoing queue (admins). */
export function mailRoutes(ctx: AppContext): Router {
  const r = Router()
  // "Send the digest now": admins and group leads (before the admin-only guard below).
  r.post('/digest', requireUser, async (req, res) => {
    if (!currentUser(req).roles.some((role) => role === 'admin' || role === 'group_lead')) throw new ForbiddenError()
    const { isSent, recipients, since, until } = await queueDigest(ctx.db, new Date(), true)
    res.status(201).json({ isSent, recipients, since, until })
  })
  r.use(requireAbility('read', 'Mail'))
  r.get('/', async (_req, res) => {
    res.json({ messages: await listReceived(ctx.db) })
  })
  r.get('/queue', async (_req, res) => {
    res.json({ queue: await listQueue(ctx.db) })
  })
  r.get('/:id', async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const msg = await getReceived(ctx.db, id)
    if (!msg) throw new NotFoundError('No such message')
    res.json(msg)
  })
  return r
}
