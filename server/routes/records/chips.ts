import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { chipUpdateSchema, listQuerySchema, reasonSchema } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import { getChipDetail, listChips, retireChip, updateChip } from '../../services/inventory/chips'

/** /api/chips: list, detail (with arrays and fab steps), update (audited), retire; chips are made by dicing a wafer. */
export function chipRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/chips', requireAbility('read', 'Chip'), async (req, res) => {
    res.json(await listChips(ctx.db, parse(listQuerySchema, req.query)))
  })
  r.get('/chips/:id', requireAbility('read', 'Chip'), async (req, res) => {
    res.json(await getChipDetail(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.patch('/chips/:id', requireAbility('update', 'Chip'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const input = parse(chipUpdateSchema, req.body)
    const hasNotes = req.body && typeof req.body === 'object' && 'notes' in req.body
    res.json(await updateChip(ctx.db, currentUser(req), id, { ...input, notes: hasNotes ? input.notes : undefined }))
  })
  r.post('/chips/:id/retire', requireAbility('retire', 'Chip'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireChip(ctx.db, currentUser(req), id, parse(reasonSchema, req.body ?? {}).reason))
  })
  return r
}
