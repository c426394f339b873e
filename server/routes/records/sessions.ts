import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { sessionSchema } from '../../../shared/schemas/records'
import { sessionListQuerySchema, sessionPreviewSchema, sessionUpdateSchema } from '../../../shared/schemas/measurements'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import {
  createSession,
  getSession,
  listSessions,
  previewSession,
  updateSession,
} from '../../services/measurements/sessions'

/** /api/sessions: measurement sessions with predicted vs observed channels (optics staff write; everyone reads). */
export function sessionRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/sessions', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await listSessions(ctx.db, parse(sessionListQuerySchema, req.query)))
  })
  r.post('/sessions/preview', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await previewSession(ctx.db, parse(sessionPreviewSchema, req.body)))
  })
  r.get('/sessions/:id', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await getSession(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/sessions', requireAbility('create', 'Session'), async (req, res) => {
    res.status(201).json(await createSession(ctx.db, currentUser(req), parse(sessionSchema, req.body)))
  })
  r.patch('/sessions/:id', requireAbility('update', 'Session'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await updateSession(ctx.db, currentUser(req), id, parse(sessionUpdateSchema, req.body)))
  })
  return r
}
