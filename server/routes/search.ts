import { Router } from 'express'
import { searchQuerySchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { requireUser } from '../auth/guards'
import { searchUsers } from '../services/users'
import type { SearchHit } from '../../shared/types'
import { ROLE_LABELS } from '../../shared/roles'

/** Global search. People for now; each record kind adds its hits here. */
export function searchRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/', requireUser, async (req, res) => {
    const { q } = parse(searchQuerySchema, req.query)
    const people = await searchUsers(ctx.db, q)
    const hits: SearchHit[] = people.map((p) => ({
      kind: 'person', id: p.id, label: p.name,
      detail: `${p.email} · ${p.roles.map((x) => ROLE_LABELS[x]).join(', ')}${p.active ? '' : ' · deactivated'}`,
      to: `/people?focus=${p.id}`,
    }))
    res.json({ hits })
  })
  return r
}
