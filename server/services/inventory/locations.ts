import { and, eq, isNull, like, or, sql } from 'drizzle-orm'
import { locations, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { Location, LocationRef, Page } from '../../../shared/records'
import type { ListQuery, LocationInput } from '../../../shared/schemas/records'
import { diffFields, writeAudit } from '../audit/audit'
import { BadRequestError, fieldError } from '../../errors'
import { found, iso, likePattern, locationCode, nextCodeNumber, orderBy, requireReason } from './codes'

/** Storage tree room → cabinet → box → slot, codes L-0001; paths read "B2.14 › Cabinet 3 › Box 7". */
type Row = typeof locations.$inferSelect
const PARENT_KIND: Record<Row['kind'], Row['kind'] | null> = {
  room: null,
  cabinet: 'room',
  box: 'cabinet',
  slot: 'box',
}

/** Every location's code and path (the tree is small: one query, joined in memory). */
export async function locationRefs(db: Db): Promise<Map<number, LocationRef & { parentId: number | null }>> {
  const rows = await db
    .select({ id: locations.id, code: locations.code, name: locations.name, parentId: locations.parentId })
    .from(locations)
  const byId = new Map(rows.map((r) => [r.id, r]))
  const refs = new Map<number, LocationRef & { parentId: number | null }>()
  for (const r of rows) {
    const names: string[] = []
    for (
      let cur: typeof r | undefined = r, guard = 0;
      cur && guard < 10;
      cur = cur.parentId ? byId.get(cur.parentId) : undefined, guard++
    )
      names.unshift(cur.name)
    refs.set(r.id, { id: r.id, code: r.code, path: names.join(' › '), parentId: r.parentId })
  }
  return refs
}

const itemCountSql = sql<number>`((SELECT count(*) FROM wafers w WHERE w.location_id = locations.id AND w.status <> 'retired')
  + (SELECT count(*) FROM chips c WHERE c.location_id = locations.id AND c.status <> 'retired')
  + (SELECT count(*) FROM locations l2 WHERE l2.parent_id = locations.id AND l2.retired_at IS NULL))`

const SORTS = { code: locations.code, name: locations.name, kind: locations.kind, createdAt: locations.createdAt }

export async function listLocations(db: Db, q: ListQuery): Promise<Page<Location>> {
  const where = and(
    q.includeRetired ? undefined : isNull(locations.retiredAt),
    q.parentId ? eq(locations.parentId, q.parentId) : undefined,
    q.status ? sql`${locations.kind} = ${q.status}` : undefined,
    q.q ? or(like(locations.code, likePattern(q.q)), like(locations.name, likePattern(q.q))) : undefined,
  )
  const [rows, [{ n }], refs] = await Promise.all([
    db
      .select({ l: locations, itemCount: itemCountSql })
      .from(locations)
      .where(where)
      .orderBy(orderBy(SORTS, q.sort, q.dir, 'code'))
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db
      .select({ n: sql<number>`count(*)` })
      .from(locations)
      .where(where),
    locationRefs(db),
  ])
  return {
    rows: rows.map((r) => toLocation(r.l, Number(r.itemCount), refs)),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
  }
}

function toLocation(l: Row, itemCount: number, refs: Map<number, LocationRef>): Location {
  return {
    id: l.id,
    code: l.code,
    kind: l.kind,
    name: l.name,
    parentId: l.parentId,
    path: refs.get(l.id)?.path ?? l.name,
    notes: l.notes,
    itemCount,
    retiredAt: iso(l.retiredAt),
  }
}

export async function getLocation(db: Db, id: number): Promise<Location> {
  const [row] = await db.select({ l: locations, itemCount: itemCountSql }).from(locations).where(eq(locations.id, id))
  const r = found(row, 'location')
  return toLocation(r.l, Number(r.itemCount), await locationRefs(db))
}

/** A parent must exist, be active and be one level up (room → cabinet → box → slot). */
async function checkParent(db: Db, kind: Row['kind'], parentId: number | null, selfId?: number) {
  const want = PARENT_KIND[kind]
  if (!want) {
    if (parentId) throw fieldError('parentId', 'A room has no parent')
    return
  }
  if (!parentId) throw fieldError('parentId', `A ${kind} sits in a ${want}: pick one`)
  const [p] = await db.select().from(locations).where(eq(locations.id, parentId))
  if (!p || p.retiredAt) throw fieldError('parentId', 'No such location (or it is retired)')
  if (p.id === selfId) throw fieldError('parentId', 'A location cannot contain itself')
  if (p.kind !== want) throw fieldError('parentId', `A ${kind} sits in a ${want}, not in a ${p.kind}`)
}

export async function createLocation(db: Db, actor: User, input: LocationInput): Promise<Location> {
  await checkParent(db, input.kind, input.parentId)
  const id = await db.transaction(async (tx) => {
    const code = locationCode(await nextCodeNumber(tx, 'locations', 'L'))
    const v = { code, kind: input.kind, name: input.name, parentId: input.parentId, notes: input.notes }
    const [{ id }] = await tx.insert(locations).values(v).$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'location',
      entityId: id,
      action: 'create',
      changes: diffFields({}, v),
    })
    return id
  })
  return getLocation(db, id)
}

export async function updateLocation(db: Db, actor: User, id: number, input: LocationInput): Promise<Location> {
  const [prev] = await db.select().from(locations).where(eq(locations.id, id))
  if (found(prev, 'location').retiredAt) throw new BadRequestError('This location is retired')
  if (input.kind !== prev.kind) throw fieldError('kind', 'The kind of a location cannot change')
  await checkParent(db, input.kind, input.parentId, id)
  const v = { name: input.name, parentId: input.parentId, notes: input.notes }
  const changes = diffFields(prev as unknown as Record<string, unknown>, v)
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx.update(locations).set(v).where(eq(locations.id, id))
      await writeAudit(tx, { userId: actor.id, entity: 'location', entityId: id, action: 'update', changes })
    })
  }
  return getLocation(db, id)
}

/** Retire an empty location (no active wafers, chips or child locations in it). */
export async function retireLocation(
  db: Db,
  actor: User,
  id: number,
  reason: string | null | undefined,
): Promise<Location> {
  const why = requireReason(reason, 'location')
  const loc = await getLocation(db, id)
  if (loc.retiredAt) throw fieldError('reason', 'This location is already retired')
  if (loc.itemCount > 0)
    throw new BadRequestError(`${loc.code} still holds ${loc.itemCount} item(s); move them out first`, {
      _: ['Move the items out first'],
    })
  await db.transaction(async (tx) => {
    const at = new Date()
    await tx.update(locations).set({ retiredAt: at }).where(eq(locations.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'location',
      entityId: id,
      action: 'retire',
      changes: { retiredAt: { from: null, to: at.toISOString() } },
      reason: why,
    })
  })
  return getLocation(db, id)
}

/** Ids of `id` and everything below it. */
export async function descendantIds(db: Db, id: number): Promise<Set<number>> {
  const refs = await locationRefs(db)
  const out = new Set([id])
  let grew = true
  while (grew) {
    grew = false
    for (const r of refs.values())
      if (r.parentId && out.has(r.parentId) && !out.has(r.id)) {
        out.add(r.id)
        grew = true
      }
  }
  return out
}
