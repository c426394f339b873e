import { and, asc, count, eq, like, or, sql } from 'drizzle-orm'
import { wafers, materials, users, chips, locations, type User } from '../../db/schema/index'
import type { SelectResultFields } from 'drizzle-orm/query-builders/select.types'
import type { Db, DbOrTx } from '../../db/client'
import { plainRows } from '../../db/plain-rows'
import type { Chip, Page, Wafer } from '../../../shared/records'
import type { ListQuery, WaferInput } from '../../../shared/schemas/records'
import { diffFields, writeAudit } from '../audit/audit'
import { fieldError } from '../../errors'
import { found, likePattern, nextCodeNumber, orderBy, requireReason, waferCode } from './codes'
import { locationRefs } from './locations'
import { markArraysStale } from './materials'
import { listChipsOfWafer } from './chips'
import { cutLabel } from './cut-label'

/** The columns of a wafer as the API shows it (flat: read by Drizzle for one wafer, by plainRows for a list page). */
const WAFER_COLUMNS = {
  id: wafers.id,
  code: wafers.code,
  materialId: wafers.materialId,
  materialName: materials.name,
  pointGroup: materials.pointGroup,
  cutNormal: wafers.cutNormal,
  flatDirection: wafers.flatDirection,
  diameterMm: wafers.diameterMm,
  thicknessUm: wafers.thicknessUm,
  lot: wafers.lot,
  supplier: wafers.supplier,
  receivedOn: sql<string | null>`DATE_FORMAT(${wafers.receivedOn}, '%Y-%m-%d')`,
  locationId: wafers.locationId,
  status: wafers.status,
  notes: wafers.notes,
  chipCount: sql<number>`(SELECT count(*) FROM chips c WHERE c.wafer_id = wafers.id)`,
  createdBy: wafers.createdBy,
  createdByName: users.name,
  createdAt: wafers.createdAt,
  updatedAt: wafers.updatedAt,
}

function toWafer(r: SelectResultFields<typeof WAFER_COLUMNS>, refs: Awaited<ReturnType<typeof locationRefs>>): Wafer {
  const loc = r.locationId ? refs.get(r.locationId) : undefined
  return {
    id: r.id,
    code: r.code,
    material: { id: r.materialId, name: r.materialName, pointGroup: r.pointGroup },
    cutNormal: r.cutNormal,
    flatDirection: r.flatDirection,
    cutLabel: cutLabel(r.pointGroup, r.cutNormal),
    diameterMm: r.diameterMm,
    thicknessUm: r.thicknessUm,
    lot: r.lot,
    supplier: r.supplier,
    receivedOn: r.receivedOn,
    location: loc ? { id: loc.id, code: loc.code, path: loc.path } : null,
    status: r.status,
    notes: r.notes,
    chipCount: Number(r.chipCount),
    createdBy: { id: r.createdBy, name: r.createdByName },
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  }
}

const SORTS = {
  code: wafers.code,
  lot: wafers.lot,
  status: wafers.status,
  material: materials.name,
  receivedOn: wafers.receivedOn,
  createdAt: wafers.createdAt,
  diameterMm: wafers.diameterMm,
}

/**
 * Wafers, filtered by status / material (`parentId` or `materialId`) / text (code, lot, supplier, notes), sorted and
 * paged in SQL.
 */
export async function listWafers(db: Db, q: ListQuery & { materialId?: number }): Promise<Page<Wafer>> {
  const materialId = q.materialId ?? q.parentId
  const where = and(
    q.status ? sql`${wafers.status} = ${q.status}` : q.includeRetired ? undefined : sql`${wafers.status} <> 'retired'`,
    materialId ? eq(wafers.materialId, materialId) : undefined,
    q.q
      ? or(
          like(wafers.code, likePattern(q.q)),
          like(wafers.lot, likePattern(q.q)),
          like(wafers.supplier, likePattern(q.q)),
          like(wafers.notes, likePattern(q.q)),
          like(materials.name, likePattern(q.q)),
        )
      : undefined,
  )
  // Rows and count through plainRows (no per-field mapping); the page may come from the query cache.
  // Ties (same lot, status, material…) are broken by id, so pages neither overlap nor leave a gap;
  // ascending in both directions, the order the list showed ties in before (a small table: sorted, not read from an
  // index).
  const order = [orderBy(SORTS, q.sort, q.dir, 'code'), asc(wafers.id)]
  const [rows, [{ n }], refs] = await Promise.all([
    plainRows(
      db,
      WAFER_COLUMNS,
      (f) =>
        db
          .select(f)
          .from(wafers)
          .innerJoin(materials, eq(materials.id, wafers.materialId))
          .innerJoin(users, eq(users.id, wafers.createdBy))
          .where(where)
          .orderBy(...order)
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
      { cache: true },
    ),
    plainRows(
      db,
      { n: count() },
      (f) => db.select(f).from(wafers).innerJoin(materials, eq(materials.id, wafers.materialId)).where(where),
      { cache: true },
    ),
    locationRefs(db),
  ])
  return { rows: rows.map((r) => toWafer(r, refs)), total: Number(n), page: q.page, pageSize: q.pageSize }
}

export async function getWafer(db: Db, id: number): Promise<Wafer> {
  const [row] = await db
    .select(WAFER_COLUMNS)
    .from(wafers)
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .innerJoin(users, eq(users.id, wafers.createdBy))
    .where(eq(wafers.id, id))
  return toWafer(found(row, 'wafer'), await locationRefs(db))
}

export async function getWaferDetail(db: Db, id: number): Promise<Wafer & { chips: Chip[] }> {
  const wafer = await getWafer(db, id)
  return { ...wafer, chips: await listChipsOfWafer(db, id) }
}

async function checkRefs(db: Db, input: WaferInput) {
  const [m] = await db.select().from(materials).where(eq(materials.id, input.materialId))
  if (!m || m.retiredAt) throw fieldError('materialId', 'No such material (or it is retired)')
  if (input.locationId) {
    const [l] = await db.select().from(locations).where(eq(locations.id, input.locationId))
    if (!l || l.retiredAt) throw fieldError('locationId', 'No such location (or it is retired)')
  }
}

const values = (i: WaferInput) => ({
  materialId: i.materialId,
  cutNormal: i.cutNormal as [number, number, number],
  flatDirection: i.flatDirection as [number, number, number],
  diameterMm: i.diameterMm,
  thicknessUm: i.thicknessUm,
  lot: i.lot,
  supplier: i.supplier,
  receivedOn: i.receivedOn,
  locationId: i.locationId,
  status: i.status,
  notes: i.notes,
})

/** Register a wafer; its code W-NNNN is max + 1 under a row lock, inside the transaction. */
export async function createWafer(db: Db, actor: User, input: WaferInput): Promise<Wafer> {
  if (input.status === 'retired') throw fieldError('status', 'A new wafer cannot start retired')
  await checkRefs(db, input)
  const id = await db.transaction(async (tx) => createWaferTx(tx, actor, input))
  return getWafer(db, id)
}

export async function createWaferTx(tx: DbOrTx, actor: User, input: WaferInput): Promise<number> {
  const v = { code: waferCode(await nextCodeNumber(tx, 'wafers', 'W')), ...values(input), createdBy: actor.id }
  const [{ id }] = await tx.insert(wafers).values(v).$returningId()
  await writeAudit(tx, {
    userId: actor.id,
    entity: 'wafer',
    entityId: id,
    action: 'create',
    changes: diffFields({}, v),
  })
  return id
}

/**
 * Update a wafer; a new material, cut or flat makes the channels of its arrays stale (hash cleared, same transaction).
 */
export async function updateWafer(
  db: Db,
  actor: User,
  id: number,
  input: WaferInput,
  reason?: string | null,
): Promise<Wafer> {
  const [prev] = await db.select().from(wafers).where(eq(wafers.id, id))
  if (found(prev, 'wafer').status === 'retired') throw fieldError('status', 'This wafer is retired')
  if (input.status === 'retired') throw fieldError('status', 'Use Retire (with a reason) to retire a wafer')
  await checkRefs(db, input)
  const v = values(input)
  const changes = diffFields(prev as unknown as Record<string, unknown>, v)
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx
        .update(wafers)
        .set({ ...v, updatedAt: new Date() })
        .where(eq(wafers.id, id))
      if (changes.materialId || changes.cutNormal || changes.flatDirection)
        await markArraysStale(tx as unknown as Db, eq(chips.waferId, id))
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'wafer',
        entityId: id,
        action: 'update',
        changes,
        reason: reason ?? null,
      })
    })
  }
  return getWafer(db, id)
}

export async function retireWafer(db: Db, actor: User, id: number, reason: string | null | undefined): Promise<Wafer> {
  const why = requireReason(reason, 'wafer')
  const [prev] = await db.select().from(wafers).where(eq(wafers.id, id))
  if (found(prev, 'wafer').status === 'retired') throw fieldError('reason', 'This wafer is already retired')
  await db.transaction(async (tx) => {
    await tx.update(wafers).set({ status: 'retired', updatedAt: new Date() }).where(eq(wafers.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'wafer',
      entityId: id,
      action: 'retire',
      changes: { status: { from: prev.status, to: 'retired' } },
      reason: why,
    })
  })
  return getWafer(db, id)
}
