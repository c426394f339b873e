import { Router } from 'express'
import type { AppContext } from '../context'

/** Mounted under /api/excel: inventory export and legacy import. */
export function excelRoutes(_ctx: AppContext): Router {
  const r = Router()
  return r
}
