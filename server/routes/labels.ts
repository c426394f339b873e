import { Router } from 'express'
import type { AppContext } from '../context'

/** QR labels: templates, SVG/print output, print jobs. Mounted under /api/labels. */
export function labelRoutes(_ctx: AppContext): Router {
  const r = Router()
  return r
}
