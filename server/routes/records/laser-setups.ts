import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { laserSetupSchema, listQuerySchema } from '../../../shared/schemas/records'
import { retireSchema } from '../../../shared/schemas/measurements'
import { LASER_CAUTION } from '../../../shared/safety'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import { createLaserSetup, getLaserSetup, listLaserSetups, retireLaserSetup, updateLaserSetup } from '../../services/laser-setups'

const updateSchema = laserSetupSchema.partial().extend({ reason: retireSchema.shape.reason.optional() })

/** /api/laser-setups: the setup list (safety officers write; everyone reads). Every answer carries the laser caution. */
export function laserSetupRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/laser-setups', requireAbility('read', 'LaserSetup'), async (req, res) => {
    res.json({ ...(await listLaserSetups(ctx.db, parse(listQuerySchema, req.query))), caution: LASER_CAUTION })
  })
  r.get('/laser-setups/:id', requireAbility('read', 'LaserSetup'), async (req, res) => {
    res.json({ ...(await getLaserSetup(ctx.db, parse(idParamSchema, req.params).id)), caution: LASER_CAUTION })
  })
  r.post('/laser-setups', requireAbility('create', 'LaserSetup'), async (req, res) => {
    const setup = await createLaserSetup(ctx.db, currentUser(req), parse(laserSetupSchema, req.body))
    res.status(201).json({ ...setup, caution: LASER_CAUTION })
  })
  r.patch('/laser-setups/:id', requireAbility('update', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json({ ...(await updateLaserSetup(ctx.db, currentUser(req), id, parse(updateSchema, req.body))), caution: LASER_CAUTION })
  })
  r.post('/laser-setups/:id/retire', requireAbility('retire', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const { reason } = parse(retireSchema, req.body ?? {})
    res.json({ ...(await retireLaserSetup(ctx.db, currentUser(req), id, reason)), caution: LASER_CAUTION })
  })
  return r
}
