import { Router } from 'express'
import { idParamSchema, inviteSchema, updateUserSchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility } from '../auth/guards'
import { inviteUser, listUsers, updateUser } from '../services/users'

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
  return r
}
