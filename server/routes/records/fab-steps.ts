import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { fabStepSchema } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import { getChip } from '../../services/inventory/chips'
import { createFabStep, listFabSteps } from '../../services/inventory/fab-steps'

/** /api/chips/:id/fab-steps: a chip's fabrication steps (SEM images attach through the files API). */
export function fabStepRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/chips/:id/fab-steps', requireAbility('read', 'FabStep'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await getChip(ctx.db, id)
    res.json(await listFabSteps(ctx.db, id))
  })
  r.post('/chips/:id/fab-steps', requireAbility('create', 'FabStep'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res
      .status(201)
      .json(await createFabStep(ctx.db, currentUser(req), parse(fabStepSchema, { ...req.body, chipId: id })))
  })
  return r
}
