import { Router } from 'express'
import type { AppContext } from '../../context'

/** Routers of the sample records, mounted under /api by app.ts. Each record kind adds its router here. */
export function recordRoutes(_ctx: AppContext): Router {
  const r = Router()
  return r
}
