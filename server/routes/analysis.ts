import { Router } from 'express'
import { idParamSchema } from '../../shared/schemas/auth'
import {
  barePatternSchema,
  fitRequestSchema,
  patternQuerySchema,
  spectrumRequestSchema,
} from '../../shared/schemas/analysis'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility } from '../auth/guards'
import { createFileStorage } from '../services/files/create-storage'
import {
  arrayPattern,
  barePattern,
  chipPattern,
  fitSession,
  listSessionAnalyses,
  spectrumSession,
} from '../services/analysis/analysis'
import { sheetSessions } from '../services/analysis/analysis-sheet'

/**
 * /api/analysis (issue 6): predicted polar patterns (arrays, chips, bare crystals), polar fits
 * and spectrum peaks of a session's files, saved analyses, and the sample-sheet session list.
 * Reading is open to every signed-in person; running a fit or spectrum analysis (which may save)
 * needs `create Session` (optics staff).
 */
export function analysisRoutes(ctx: AppContext): Router {
  const r = Router()
  const storage = createFileStorage(ctx.env.DATA_DIR, ctx.env)
  r.get('/arrays/:id/pattern', requireAbility('read', 'Array'), async (req, res) => {
    res.json(await arrayPattern(ctx.db, parse(idParamSchema, req.params).id, parse(patternQuerySchema, req.query)))
  })
  r.get('/chips/:id/pattern', requireAbility('read', 'Chip'), async (req, res) => {
    res.json(await chipPattern(ctx.db, parse(idParamSchema, req.params).id, parse(patternQuerySchema, req.query)))
  })
  r.post('/pattern', requireAbility('read', 'Channels'), async (req, res) => {
    res.json(barePattern(parse(barePatternSchema, req.body ?? {})))
  })
  r.get('/arrays/:id/sheet', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await sheetSessions(ctx.db, { arrayId: parse(idParamSchema, req.params).id }))
  })
  r.get('/chips/:id/sheet', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await sheetSessions(ctx.db, { chipId: parse(idParamSchema, req.params).id }))
  })
  r.get('/sessions/:id', requireAbility('read', 'Session'), async (req, res) => {
    res.json(await listSessionAnalyses(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/sessions/:id/fit', requireAbility('create', 'Session'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await fitSession(ctx.db, storage, currentUser(req), id, parse(fitRequestSchema, req.body ?? {})))
  })
  r.post('/sessions/:id/spectrum', requireAbility('create', 'Session'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await spectrumSession(ctx.db, storage, currentUser(req), id, parse(spectrumRequestSchema, req.body ?? {})))
  })
  return r
}
