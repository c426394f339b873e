import { and, asc, desc, eq, isNull, like, or, sql, type SQL } from 'drizzle-orm'
import { laserSetups } from '../db/schema/index'
import type { Db } from '../db/client'
import type { User } from '../db/schema/index'
import type { LaserSetup, Page } from '../../shared/records'
import type { LaserSetupInput, ListQuery } from '../../shared/schemas/records'
import { diffFields, writeAudit, type DbOrTx } from './audit'
import { BadRequestError, NotFoundError, fieldError } from '../errors'

/**
 * The laser-setup list (a plain register for now; a later issue adds sign-offs and hazard figures).
 * Codes LS-001 are assigned inside the creating transaction and never reused.
 */

type Row = typeof laserSetups.$inferSelect

export function toLaserSetup(r: Row): LaserSetup {
  return {
    id: r.id, code: r.code, name: r.name, room: r.room, sourceType: r.sourceType,
    wavelengthsNm: [...r.wavelengthsNm], notes: r.notes, retiredAt: r.retiredAt?.toISOString() ?? null,
  }
}

/**
 * Next code `PREFIX-NNN…`: max existing number + 1, read with FOR UPDATE inside the caller's
 * transaction (concurrent creators wait; `withCodeRetry` covers the remaining duplicate-key race).
 */
export async function nextCode(tx: DbOrTx, table: string, prefix: string, digits: number): Promise<string> {
  const start = prefix.length + 2
  const [rows] = (await tx.execute(sql.raw(
    `SELECT COALESCE(MAX(CAST(SUBSTRING(code, ${start}) AS UNSIGNED)), 0) AS n FROM \`${table}\` WHERE code LIKE '${prefix}-%' FOR UPDATE`,
  ))) as unknown as [{ n: number | string }[]]
  return `${prefix}-${String(Number(rows[0].n) + 1).padStart(digits, '0')}`
}

/** Run `fn` again (at most 3 times) when a concurrent insert took the same code. */
export async function withCodeRetry<T>(fn: () => Promise<T>): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try { return await fn() } catch (err) {
      const dup = (err as { cause?: { errno?: number }; errno?: number })
      if (attempt >= 3 || (dup.errno ?? dup.cause?.errno) !== 1062) throw err
    }
  }
}

const SORTABLE = { code: laserSetups.code, name: laserSetups.name, room: laserSetups.room, createdAt: laserSetups.createdAt } as const

export async function listLaserSetups(db: Db, q: ListQuery): Promise<Page<LaserSetup>> {
  const where: SQL[] = []
  if (!q.includeRetired) where.push(isNull(laserSetups.retiredAt))
  if (q.q) {
    const p = `%${q.q.replace(/[\\%_]/g, (c) => '\\' + c)}%`
    where.push(or(like(laserSetups.code, p), like(laserSetups.name, p), like(laserSetups.room, p))!)
  }
  const col = SORTABLE[(q.sort ?? 'code') as keyof typeof SORTABLE] ?? laserSetups.code
  const cond = where.length ? and(...where) : undefined
  const rows = await db.select().from(laserSetups).where(cond)
    .orderBy(q.dir === 'desc' ? desc(col) : asc(col), asc(laserSetups.id)).limit(q.pageSize).offset((q.page - 1) * q.pageSize)
  const [{ n }] = await db.select({ n: sql<number>`count(*)` }).from(laserSetups).where(cond)
  return { rows: rows.map(toLaserSetup), total: Number(n), page: q.page, pageSize: q.pageSize }
}

async function findRow(db: Pick<Db, 'select'>, id: number): Promise<Row> {
  const [r] = await db.select().from(laserSetups).where(eq(laserSetups.id, id))
  if (!r) throw new NotFoundError('No such laser setup')
  return r
}

export async function getLaserSetup(db: Db, id: number): Promise<LaserSetup> {
  return toLaserSetup(await findRow(db, id))
}

export async function createLaserSetup(db: Db, actor: User, input: LaserSetupInput): Promise<LaserSetup> {
  const id = await withCodeRetry(() => db.transaction(async (tx) => {
    const code = await nextCode(tx, 'laser_setups', 'LS', 3)
    const values = { code, ...input }
    const [{ id }] = await tx.insert(laserSetups).values(values).$returningId()
    await writeAudit(tx, { userId: actor.id, entity: 'laser_setup', entityId: id, action: 'create', changes: diffFields({}, values) })
    return id
  }))
  return getLaserSetup(db, id)
}

export async function updateLaserSetup(db: Db, actor: User, id: number, input: Partial<LaserSetupInput> & { reason?: string | null }): Promise<LaserSetup> {
  const { reason, ...fields } = input
  await db.transaction(async (tx) => {
    const before = await findRow(tx, id)
    if (before.retiredAt) throw new BadRequestError('This laser setup is retired; it cannot be edited.')
    const changes = diffFields(before as unknown as Record<string, unknown>, fields)
    if (!Object.keys(changes).length) return
    await tx.update(laserSetups).set({ ...fields, updatedAt: new Date() }).where(eq(laserSetups.id, id))
    await writeAudit(tx, { userId: actor.id, entity: 'laser_setup', entityId: id, action: 'update', changes, reason })
  })
  return getLaserSetup(db, id)
}

/** Retire a setup (never deleted): the reason is mandatory and kept in the audit row. */
export async function retireLaserSetup(db: Db, actor: User, id: number, reason: string): Promise<LaserSetup> {
  if (!reason?.trim()) throw fieldError('reason', 'Say why')
  await db.transaction(async (tx) => {
    const before = await findRow(tx, id)
    if (before.retiredAt) throw new BadRequestError('This laser setup is already retired.')
    const now = new Date()
    await tx.update(laserSetups).set({ retiredAt: now, updatedAt: now }).where(eq(laserSetups.id, id))
    await writeAudit(tx, { userId: actor.id, entity: 'laser_setup', entityId: id, action: 'retire', changes: { retiredAt: { from: null, to: now.toISOString() } }, reason })
  })
  return getLaserSetup(db, id)
}
