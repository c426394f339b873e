import { Router } from 'express'
import type { AppContext } from '../context'

/** Mounted under /api/audit: record history and audit search. */
export function auditRoutes(_ctx: AppContext): Router {
  const r = Router()
  return r
}
