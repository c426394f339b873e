import { Router } from 'express'
import type { AppContext } from '../context'
import { currentUser, requireUser } from '../auth/guards'
import { overviewFor } from '../services/home/overview'

/**
 * GET /api/overview: the signed-in person's home page, one panel per role they hold (each panel
 * checked against their abilities in the service). Read-only; never cached (the lists are live).
 */
export function overviewRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/', requireUser, async (req, res) => {
    const body = await overviewFor(ctx.db, currentUser(req), {
      dataDir: ctx.env.DATA_DIR,
      storageKind: ctx.env.FILE_STORAGE,
    })
    res.set('Cache-Control', 'no-store').json(body)
  })
  return r
}
