import { Router } from 'express'
import { z } from 'zod'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { abilityOf, requireAbility, requireUser } from '../auth/guards'
import { ForbiddenError, fieldError } from '../errors'
import { AUDIT_ENTITIES, auditSearchSchema, type AuditEntity } from '../../shared/audit'
import { recordHistory, searchAudit } from '../services/audit/audit-query'
import { idValue } from '../../shared/schemas/common'

const historyParams = z.object({ entity: z.string().max(40), id: idValue() })

/**
 * Mounted under /api/audit: record history and audit search. Read-only on purpose: the audit
 * trail has no route that changes or removes a row (tests/server/audit/audit.test.ts checks it).
 */
export function auditRoutes(ctx: AppContext): Router {
  const r = Router()
  // History of one record: anyone who may read that kind of record.
  r.get('/records/:entity/:id', requireUser, async (req, res) => {
    const { entity, id } = parse(historyParams, req.params)
    if (!Object.hasOwn(AUDIT_ENTITIES, entity)) throw fieldError('entity', `Unknown record kind "${entity}"`)
    if (!abilityOf(req).can('read', AUDIT_ENTITIES[entity as AuditEntity])) throw new ForbiddenError()
    res.json(await recordHistory(ctx.db, entity, id))
  })
  // Audit search: group leads and admins.
  r.get('/search', requireAbility('read', 'Audit'), async (req, res) => {
    res.json(await searchAudit(ctx.db, parse(auditSearchSchema, req.query)))
  })
  return r
}
