import { Router } from 'express'
import { z } from 'zod'
import { idParamSchema } from '../../../shared/schemas/auth'
import { listQuerySchema, locationSchema, moveSchema, reasonSchema } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import {
  createLocation,
  getLocation,
  listLocations,
  retireLocation,
  updateLocation,
} from '../../services/inventory/locations'
import { listMoves, moveItem } from '../../services/inventory/moves'
import { safeString } from '../../../shared/schemas/common'

const movesQuerySchema = z.object({ itemCode: safeString().min(1, 'Give the item code').max(40) })

/** /api/locations (storage tree) and /api/moves (move or hand over a wafer, chip or box; history). */
export function locationRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/locations', requireAbility('read', 'Location'), async (req, res) => {
    res.json(await listLocations(ctx.db, parse(listQuerySchema, req.query)))
  })
  r.get('/locations/:id', requireAbility('read', 'Location'), async (req, res) => {
    res.json(await getLocation(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/locations', requireAbility('create', 'Location'), async (req, res) => {
    res.status(201).json(await createLocation(ctx.db, currentUser(req), parse(locationSchema, req.body)))
  })
  r.patch('/locations/:id', requireAbility('update', 'Location'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await updateLocation(ctx.db, currentUser(req), id, parse(locationSchema, req.body)))
  })
  r.post('/locations/:id/retire', requireAbility('retire', 'Location'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireLocation(ctx.db, currentUser(req), id, parse(reasonSchema, req.body ?? {}).reason))
  })
  r.get('/moves', requireAbility('read', 'Location'), async (req, res) => {
    res.json(await listMoves(ctx.db, parse(movesQuerySchema, req.query).itemCode))
  })
  r.post('/moves', requireAbility('update', 'Location'), async (req, res) => {
    res.status(201).json(await moveItem(ctx.db, currentUser(req), parse(moveSchema, req.body), ctx.publicUrl))
  })
  return r
}
