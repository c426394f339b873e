import { Router } from 'express'
import { searchQuerySchema } from '../../shared/schemas/auth'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { requireUser } from '../auth/guards'
import { searchUsers } from '../services/people/users'
import { searchRecords } from '../services/search/resolve'
import type { SearchHit } from '../../shared/types'
import { ROLE_LABELS } from '../../shared/roles'

/** Global search: records (exact code first, then code prefixes, lots, suppliers, notes, materials), then people. */
export function searchRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/', requireUser, async (req, res) => {
    const { q } = parse(searchQuerySchema, req.query)
    const [records, people] = await Promise.all([searchRecords(ctx.db, q), searchUsers(ctx.db, q)])
    const hits: SearchHit[] = [
      ...records,
      ...people.map(
        (p) =>
          ({
            kind: 'person',
            id: p.id,
            label: p.name,
            detail: `${p.email} · ${p.roles.map((x) => ROLE_LABELS[x]).join(', ')}${p.active ? '' : ' · deactivated'}`,
            to: `/people?focus=${p.id}`,
          }) as SearchHit,
      ),
    ]
    res.json({ hits })
  })
  return r
}
