import { Router } from 'express'
import { z } from 'zod'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility } from '../auth/guards'
import { labelJobSchema, renderLabelsSchema, templateIdSchema } from '../../labels/schemas'
import { listLabelJobs, listTemplates, recordLabelJob, renderLabels } from '../services/labels/labels'

const downloadParams = z.object({ template: templateIdSchema, code: z.string().trim().toUpperCase().min(1).max(40) })

/** QR labels: templates, SVG/print output, print jobs. Mounted under /api/labels. */
export function labelRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/templates', requireAbility('read', 'Label'), (_req, res) => {
    res.json({ templates: listTemplates() })
  })
  r.post('/render', requireAbility('read', 'Label'), async (req, res) => {
    res.json(await renderLabels(ctx.db, ctx.publicUrl, parse(renderLabelsSchema, req.body)))
  })
  r.get('/jobs', requireAbility('read', 'Label'), async (_req, res) => {
    res.json({ jobs: await listLabelJobs(ctx.db) })
  })
  r.post('/jobs', requireAbility('create', 'Label'), async (req, res) => {
    res.status(201).json(await recordLabelJob(ctx.db, currentUser(req), parse(labelJobSchema, req.body)))
  })
  // One label as an SVG file at its physical size (e.g. /api/labels/chip-box/C-0001-01.svg).
  r.get('/:template/:code.svg', requireAbility('read', 'Label'), async (req, res) => {
    const { template, code } = parse(downloadParams, req.params)
    const {
      labels: [label],
    } = await renderLabels(ctx.db, ctx.publicUrl, { template, codes: [code], skip: 0 })
    res
      .set({
        'Content-Type': 'image/svg+xml; charset=utf-8',
        'Content-Disposition': `attachment; filename="${label.code}-${template}.svg"`,
        'X-Content-Type-Options': 'nosniff',
      })
      .send(label.svg)
  })
  return r
}
