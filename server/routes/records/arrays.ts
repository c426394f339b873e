import { Router } from 'express'
import { z } from 'zod'
import { idParamSchema } from '../../../shared/schemas/auth'
import { arraySchema, listQuerySchema, reasonSchema, LATTICES, SHAPES } from '../../../shared/schemas/records'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import {
  createArray,
  getArray,
  listArrays,
  recomputeArrays,
  retireArray,
  updateArray,
} from '../../services/inventory/arrays'
import { getChip } from '../../services/inventory/chips'
import { idValue } from '../../../shared/schemas/common'

const arrayListSchema = listQuerySchema.extend({
  chipId: idValue().optional(),
  shape: z.enum(SHAPES).optional(),
  lattice: z.enum(LATTICES).optional(),
  stale: z
    .enum(['true', 'false'])
    .optional()
    .transform((v) => (v === undefined ? undefined : v === 'true')),
})
const recomputeSchema = z.object({
  ids: z.array(z.number().int().positive()).max(100_000).optional(),
  staleOnly: z.boolean().default(false),
})

/** /api/arrays and /api/chips/:id/arrays: nanostructure arrays with derived symmetry and channels. */
export function arrayRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/arrays', requireAbility('read', 'Array'), async (req, res) => {
    res.json(await listArrays(ctx.db, parse(arrayListSchema, req.query)))
  })
  r.get('/chips/:id/arrays', requireAbility('read', 'Array'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await getChip(ctx.db, id)
    res.json(await listArrays(ctx.db, { ...parse(arrayListSchema, req.query), chipId: id }))
  })
  r.post('/arrays/recompute', requireAbility('update', 'Array'), async (req, res) => {
    res.json(await recomputeArrays(ctx.db, currentUser(req), parse(recomputeSchema, req.body ?? {})))
  })
  r.get('/arrays/:id', requireAbility('read', 'Array'), async (req, res) => {
    res.json(await getArray(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.post('/arrays', requireAbility('create', 'Array'), async (req, res) => {
    const id = await createArray(ctx.db, currentUser(req), parse(arraySchema, req.body))
    res.status(201).json(await getArray(ctx.db, id))
  })
  r.post('/chips/:id/arrays', requireAbility('create', 'Array'), async (req, res) => {
    const { id: chipId } = parse(idParamSchema, req.params)
    const id = await createArray(ctx.db, currentUser(req), parse(arraySchema, { ...req.body, chipId }))
    res.status(201).json(await getArray(ctx.db, id))
  })
  r.patch('/arrays/:id', requireAbility('update', 'Array'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await updateArray(ctx.db, currentUser(req), id, parse(arraySchema, req.body)))
  })
  r.post('/arrays/:id/retire', requireAbility('retire', 'Array'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireArray(ctx.db, currentUser(req), id, parse(reasonSchema, req.body ?? {}).reason))
  })
  r.post('/arrays/:id/recompute', requireAbility('update', 'Array'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await getArray(ctx.db, id)
    await recomputeArrays(ctx.db, currentUser(req), { ids: [id] })
    res.json(await getArray(ctx.db, id))
  })
  return r
}
