import { Router } from 'express'
import { idParamSchema } from '../../../shared/schemas/auth'
import { listQuerySchema, materialSchema, reasonSchema } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import {
  createMaterial,
  getMaterial,
  listMaterials,
  retireMaterial,
  updateMaterial,
} from '../../services/inventory/materials'

/** /api/materials: list, detail (with the d-matrix form), create, update, retire. */
export function materialRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/materials', requireAbility('read', 'Material'), async (req, res) => {
    res.json(await listMaterials(ctx.db, parse(listQuerySchema, req.query)))
  })
  r.get('/materials/:id', requireAbility('read', 'Material'), async (req, res) => {
    res.json(await getMaterial(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/materials', requireAbility('create', 'Material'), async (req, res) => {
    res.status(201).json(await createMaterial(ctx.db, currentUser(req), parse(materialSchema, req.body)))
  })
  r.patch('/materials/:id', requireAbility('update', 'Material'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await updateMaterial(ctx.db, currentUser(req), id, parse(materialSchema, req.body)))
  })
  r.post('/materials/:id/retire', requireAbility('retire', 'Material'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireMaterial(ctx.db, currentUser(req), id, parse(reasonSchema, req.body ?? {}).reason))
  })
  return r
}
