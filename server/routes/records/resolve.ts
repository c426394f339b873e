import { Router } from 'express'
import { z } from 'zod'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { requireUser } from '../../auth/guards'
import { resolveCode } from '../../services/search/resolve'
import { safeString } from '../../../shared/schemas/common'

const codeParamSchema = z.object({ code: safeString().min(1).max(200) })

/** GET /api/resolve/:code: the record behind a scanned or typed code (any signed-in person). */
export function resolveRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/resolve/:code', requireUser, async (req, res) => {
    res.json(await resolveCode(ctx.db, parse(codeParamSchema, req.params).code))
  })
  return r
}
