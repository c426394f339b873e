import { and, eq, inArray, isNull, like, or, sql, type SQL } from 'drizzle-orm'
import { materials, wafers, chips, arrays, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { Material, MaterialDetail, Page, Coefficient } from '../../../shared/records'
import type { ListQuery, MaterialInput } from '../../../shared/schemas/records'
import { diffFields, writeAudit } from '../audit/audit'
import { ConflictError, fieldError } from '../../errors'
import { found, iso, likePattern, orderBy, requireReason } from './codes'
import { describeDMatrix, checkCoefficients } from './material-tensors'

type Row = typeof materials.$inferSelect

export function toMaterial(r: Row): Material {
  return {
    id: r.id,
    name: r.name,
    formula: r.formula,
    pointGroup: r.pointGroup,
    bandGapEv: r.bandGapEv,
    transparencyNote: r.transparencyNote,
    notes: r.notes,
    coefficients: r.coefficients ?? [],
    retiredAt: iso(r.retiredAt),
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  }
}

const SORTS = {
  name: materials.name,
  pointGroup: materials.pointGroup,
  createdAt: materials.createdAt,
  formula: materials.formula,
}

export async function listMaterials(db: Db, q: ListQuery): Promise<Page<Material>> {
  const where = and(
    q.includeRetired ? undefined : isNull(materials.retiredAt),
    q.q
      ? or(
          like(materials.name, likePattern(q.q)),
          like(materials.formula, likePattern(q.q)),
          eq(materials.pointGroup, q.q),
        )
      : undefined,
  )
  const [rows, [{ n }]] = await Promise.all([
    db
      .select()
      .from(materials)
      .where(where)
      .orderBy(orderBy(SORTS, q.sort, q.dir, 'name'))
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db
      .select({ n: sql<number>`count(*)` })
      .from(materials)
      .where(where),
  ])
  return { rows: rows.map(toMaterial), total: Number(n), page: q.page, pageSize: q.pageSize }
}

export async function getMaterial(db: Db, id: number): Promise<MaterialDetail> {
  const [row] = await db.select().from(materials).where(eq(materials.id, id))
  const m = found(row, 'material')
  const [{ n }] = await db
    .select({ n: sql<number>`count(*)` })
    .from(wafers)
    .where(eq(wafers.materialId, id))
  return { ...toMaterial(m), dMatrix: describeDMatrix(m.pointGroup), waferCount: Number(n) }
}

async function assertNameFree(db: Db, name: string, exceptId?: number) {
  const [dup] = await db.select({ id: materials.id }).from(materials).where(eq(materials.name, name))
  if (dup && dup.id !== exceptId)
    throw new ConflictError('A material with this name exists', { name: ['A material with this name exists'] })
}

function values(input: MaterialInput) {
  checkCoefficients(input.pointGroup, input.coefficients as Coefficient[])
  return {
    name: input.name,
    formula: input.formula,
    pointGroup: input.pointGroup,
    bandGapEv: input.bandGapEv,
    transparencyNote: input.transparencyNote,
    notes: input.notes,
    coefficients: input.coefficients as Coefficient[],
  }
}

/** Create a material; χ(2) coefficients the point group forbids (or that break its equalities) are refused. */
export async function createMaterial(db: Db, actor: User, input: MaterialInput): Promise<MaterialDetail> {
  const v = values(input)
  await assertNameFree(db, v.name)
  const id = await db.transaction(async (tx) => {
    const [{ id }] = await tx.insert(materials).values(v).$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'material',
      entityId: id,
      action: 'create',
      changes: diffFields({}, v),
    })
    return id
  })
  return getMaterial(db, id)
}

/**
 * Update a material. A changed point group makes the stored channels of every array on its wafers
 * stale: their input hash is cleared in the same transaction (the list compares it in SQL).
 */
export async function updateMaterial(db: Db, actor: User, id: number, input: MaterialInput): Promise<MaterialDetail> {
  const [prev] = await db.select().from(materials).where(eq(materials.id, id))
  found(prev, 'material')
  const v = values(input)
  await assertNameFree(db, v.name, id)
  const changes = diffFields(prev as unknown as Record<string, unknown>, v)
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx
        .update(materials)
        .set({ ...v, updatedAt: new Date() })
        .where(eq(materials.id, id))
      if (changes.pointGroup)
        await markArraysStale(
          tx as unknown as Db,
          sql`${chips.waferId} IN (SELECT id FROM wafers WHERE material_id = ${id})`,
        )
      await writeAudit(tx, { userId: actor.id, entity: 'material', entityId: id, action: 'update', changes })
    })
  }
  return getMaterial(db, id)
}

export async function retireMaterial(
  db: Db,
  actor: User,
  id: number,
  reason: string | null | undefined,
): Promise<MaterialDetail> {
  const why = requireReason(reason, 'material')
  const [prev] = await db.select().from(materials).where(eq(materials.id, id))
  if (found(prev, 'material').retiredAt) throw fieldError('reason', 'This material is already retired')
  await db.transaction(async (tx) => {
    const at = new Date()
    await tx.update(materials).set({ retiredAt: at, updatedAt: at }).where(eq(materials.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'material',
      entityId: id,
      action: 'retire',
      changes: { retiredAt: { from: null, to: at.toISOString() } },
      reason: why,
    })
  })
  return getMaterial(db, id)
}

/** Clear the channel input hash of the arrays on the chips matching `chipWhere` (they show as stale). */
export async function markArraysStale(tx: Db, chipWhere: SQL): Promise<void> {
  const ids = tx.select({ id: chips.id }).from(chips).where(chipWhere)
  await tx.update(arrays).set({ channelsInputHash: null }).where(inArray(arrays.chipId, ids))
}
