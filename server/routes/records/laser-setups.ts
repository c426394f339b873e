import { Router, type Request } from 'express'
import { z } from 'zod'
import { idParamSchema } from '../../../shared/schemas/auth'
import { approveSchema, laserSetupSchema, listQuerySchema, signoffNoteSchema } from '../../../shared/schemas/records'
import { retireSchema } from '../../../shared/schemas/measurements'
import { LASER_CAUTION } from '../../../shared/safety'
import { MPE_EDITIONS } from '../../../shared/laser-safety'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import {
  createLaserSetup,
  getLaserSetup,
  listLaserSetups,
  missingForSubmit,
  retireLaserSetup,
  signoffQueue,
  submitLaserSetup,
  updateLaserSetup,
} from '../../services/laser-safety/laser-setups'
import {
  approvalCheck,
  approveSetup,
  historyOut,
  loadDecisions,
  rejectSetup,
  revokeSetup,
} from '../../services/laser-safety/signoffs'
import { figuresFor } from '../../services/laser-safety/setup-hazards'
import { laserSetups } from '../../db/schema/index'
import { eq } from 'drizzle-orm'
import { safeString } from '../../../shared/schemas/common'

/** An edit: any subset of the fields, and a reason (required only when the edit voids a sign-off; empty means none). */
const updateSchema = laserSetupSchema.partial().extend({
  reason: safeString({ multiline: true })
    .max(500)
    .nullable()
    .optional()
    .transform((v) => v || null),
})
/**
 * Figures query: MPE edition, focal spot, and the evaluation (exposure) time in seconds: 0.25 (aversion
 * response, visible lines only), 10 (default), 100, 30000 or any typed value up to 30 000 s.
 */
const figuresQuery = z.object({
  edition: z.enum(MPE_EDITIONS as [string, ...string[]]).optional(),
  spotUm: z.coerce.number().positive('Spot diameter in µm, above 0').max(1e5).optional(),
  exposureS: z.coerce
    .number({ message: 'Exposure duration in seconds' })
    .min(1e-3, 'Exposure duration from 0.001 s')
    .max(30000, 'Exposure duration up to 30 000 s (the longest the MPE table covers)')
    .optional(),
})

/**
 * /api/laser-setups: the laser-safety register (the people who run lasers describe and submit setups,
 * safety officers sign them off; everyone reads).
 * Every answer carries the laser caution; the detail adds the sign-off history and computed figures.
 */
export function laserSetupRoutes(ctx: AppContext): Router {
  const r = Router()
  /**
   * The record page's answer: the setup, its sign-off history, whether the reader may approve it (and why not),
   * figures.
   */
  const detail = async (req: Request, id: number, q: z.infer<typeof figuresQuery> = {}) => {
    const setup = await getLaserSetup(ctx.db, id)
    const [row] = await ctx.db.select().from(laserSetups).where(eq(laserSetups.id, id))
    const history = historyOut((await loadDecisions(ctx.db, [id])).get(id)!)
    const approval = await approvalCheck(ctx.db, currentUser(req), row, setup.signoff.state)
    const computed = figuresFor(row, {
      edition: q.edition as never,
      spotDiameterUm: q.spotUm,
      exposureDurationS: q.exposureS,
    })
    return {
      ...setup,
      signoff: { ...setup.signoff, history },
      approval,
      missingForSubmit: missingForSubmit(row),
      computed,
      caution: LASER_CAUTION,
    }
  }
  r.get('/laser-setups', requireAbility('read', 'LaserSetup'), async (req, res) => {
    res.json({ ...(await listLaserSetups(ctx.db, parse(listQuerySchema, req.query))), caution: LASER_CAUTION })
  })
  r.get('/laser-setups/queue', requireAbility('signoff', 'LaserSetup'), async (req, res) => {
    res.json({ ...(await signoffQueue(ctx.db, currentUser(req))), caution: LASER_CAUTION })
  })
  r.get('/laser-setups/:id', requireAbility('read', 'LaserSetup'), async (req, res) => {
    res.json(await detail(req, parse(idParamSchema, req.params).id, parse(figuresQuery, req.query)))
  })
  r.post('/laser-setups', requireAbility('create', 'LaserSetup'), async (req, res) => {
    const setup = await createLaserSetup(ctx.db, currentUser(req), parse(laserSetupSchema, req.body))
    res.status(201).json(await detail(req, setup.id))
  })
  r.patch('/laser-setups/:id', requireAbility('update', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await updateLaserSetup(ctx.db, currentUser(req), id, parse(updateSchema, req.body))
    res.json(await detail(req, id))
  })
  r.post('/laser-setups/:id/submit', requireAbility('update', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await submitLaserSetup(ctx.db, currentUser(req), id)
    res.json(await detail(req, id))
  })
  r.post('/laser-setups/:id/retire', requireAbility('retire', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    const { reason } = parse(retireSchema, req.body ?? {})
    res.json({ ...(await retireLaserSetup(ctx.db, currentUser(req), id, reason)), caution: LASER_CAUTION })
  })
  r.post('/laser-setups/:id/approve', requireAbility('signoff', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await approveSetup(ctx.db, currentUser(req), id, parse(approveSchema, req.body ?? {}))
    res.json(await detail(req, id))
  })
  r.post('/laser-setups/:id/reject', requireAbility('signoff', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await rejectSetup(ctx.db, currentUser(req), id, parse(signoffNoteSchema, req.body ?? {}).note)
    res.json(await detail(req, id))
  })
  r.post('/laser-setups/:id/revoke', requireAbility('signoff', 'LaserSetup'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    await revokeSetup(ctx.db, currentUser(req), id, parse(signoffNoteSchema, req.body ?? {}).note)
    res.json(await detail(req, id))
  })
  return r
}
