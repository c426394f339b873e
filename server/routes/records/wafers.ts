import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { diceSchema, listQuerySchema, reasonSchema, waferSchema } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import { createWafer, getWaferDetail, listWafers, retireWafer, updateWafer } from '../../services/inventory/wafers'
import { diceChips, listChipsOfWafer } from '../../services/inventory/chips'
import { idValue } from '../../../shared/schemas/common'

const waferListSchema = listQuerySchema.extend({ materialId: idValue().optional() })

/** /api/wafers: list, detail (with chips), create, update, retire, and dicing into chips. */
export function waferRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/wafers', requireAbility('read', 'Wafer'), async (req, res) => {
    res.json(await listWafers(ctx.db, parse(waferListSchema, req.query)))
  })
  r.get('/wafers/:id', requireAbility('read', 'Wafer'), async (req, res) => {
    res.json(await getWaferDetail(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/wafers', requireAbility('create', 'Wafer'), async (req, res) => {
    const wafer = await createWafer(ctx.db, currentUser(req), parse(waferSchema, req.body))
    res.status(201).json(wafer)
  })
  r.patch('/wafers/:id', requireAbility('update', 'Wafer'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const { reason } = parse(reasonSchema, { reason: req.body?.reason })
    res.json(await updateWafer(ctx.db, currentUser(req), id, parse(waferSchema, req.body), reason))
  })
  r.post('/wafers/:id/retire', requireAbility('retire', 'Wafer'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireWafer(ctx.db, currentUser(req), id, parse(reasonSchema, req.body ?? {}).reason))
  })
  r.post('/wafers/:id/dice', requireAbility('create', 'Chip'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const ids = await diceChips(ctx.db, currentUser(req), parse(diceSchema, { ...req.body, waferId: id }))
    const chips = await listChipsOfWafer(ctx.db, id)
    res.status(201).json({ chips: chips.filter((c) => ids.includes(c.id)) })
  })
  return r
}
