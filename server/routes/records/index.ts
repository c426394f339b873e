import { Router } from 'express'
import type { AppContext } from '../../context'
import { materialRoutes } from './materials'
import { locationRoutes } from './locations'
import { waferRoutes } from './wafers'
import { chipRoutes } from './chips'
import { fabStepRoutes } from './fab-steps'
import { arrayRoutes } from './arrays'
import { resolveRoutes } from './resolve'
import { laserSetupRoutes } from './laser-setups'
import { sessionRoutes } from './sessions'
import { fileRoutes } from './files'

/** Routers of the sample records, mounted under /api by app.ts. Each record kind adds its router here. */
export function recordRoutes(ctx: AppContext): Router {
  const r = Router()
  // inventory (materials, locations + moves, wafers, chips, fab steps, arrays, code resolver)
  r.use(
    materialRoutes(ctx),
    locationRoutes(ctx),
    waferRoutes(ctx),
    chipRoutes(ctx),
    fabStepRoutes(ctx),
    arrayRoutes(ctx),
    resolveRoutes(ctx),
  )
  // measurements (laser setups, sessions, files)
  r.use(laserSetupRoutes(ctx), sessionRoutes(ctx), fileRoutes(ctx))
  return r
}
