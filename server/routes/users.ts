import { Router } from 'express'
import { accountActionSchema, idParamSchema, inviteSchema, updateUserSchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility } from '../auth/guards'
import { endSessionsOf, inviteUser, listUsers, sendPasswordReset, updateUser } from '../services/people/users'

export function userRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/', requireAbility('read', 'User'), async (_req, res) => {
    res.json({ users: await listUsers(ctx.db) })
  })
  r.post('/invite', requireAbility('invite', 'User'), async (req, res) => {
    const input = parse(inviteSchema, req.body)
    res.status(201).json({ user: await inviteUser(ctx.db, currentUser(req), input, ctx.publicUrl) })
  })
  r.patch('/:id', requireAbility('update', 'User'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const input = parse(updateUserSchema, req.body)
    res.json({ user: await updateUser(ctx.db, currentUser(req), id, input) })
  })
  // Administrators only: end every session of a person; send a one-time link to choose a new password.
  r.post('/:id/end-sessions', requireAbility('manage', 'User'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await endSessionsOf(ctx.db, currentUser(req), id, parse(accountActionSchema, req.body ?? {}).reason))
  })
  r.post('/:id/password-reset', requireAbility('manage', 'User'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await sendPasswordReset(
      ctx.db,
      currentUser(req),
      id,
      parse(accountActionSchema, req.body ?? {}).reason,
      ctx.publicUrl,
    )
    res.status(204).end()
  })
  return r
}
