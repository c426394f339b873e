import { and, asc, count, desc, eq, gt, inArray, isNull, like, or, sql, type SQL } from 'drizzle-orm'
import { arrays, chips, wafers, materials, auditLog, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { ArrayRecord, ArrayRow, Page, StoredChannel } from '../../../shared/records'
import type { ArrayInput, ListQuery } from '../../../shared/schemas/records'
import { ENGINE_VERSION } from '../../../shared/engine'
import { diffFields, writeAudit } from '../audit/audit'
import { ConflictError, fieldError } from '../../errors'
import { arrayCode, found, iso, likePattern, orderBy, requireReason } from './codes'
import { arraySymmetry, deriveChannels, type ChannelInputs } from './array-channels'
import { staleChannelsSql } from './stale-channels'
import { loadChannelSets, saveChannelSets } from './channel-sets'
import { plainRows } from '../../db/plain-rows'
import { BoundedCache } from '../../../shared/engine/bounded-cache'
import { idCondition, textHitIds, type TextTarget } from '../search/text-search'

/** Nanostructure arrays on chips. Channels are derived on every save (see array-channels.ts). */
type Row = typeof arrays.$inferSelect
const base = () => ({
  a: arrays,
  chipCode: chips.code,
  chipRotationDeg: chips.rotationDeg,
  cutNormal: wafers.cutNormal,
  flatDirection: wafers.flatDirection,
  pointGroup: materials.pointGroup,
  isStale: staleChannelsSql,
})
type Joined = {
  a: Row
  chipCode: string
  chipRotationDeg: number
  cutNormal: [number, number, number]
  flatDirection: [number, number, number]
  pointGroup: string
  isStale: number
}

function selectArrays(db: Db) {
  return db
    .select(base())
    .from(arrays)
    .innerJoin(chips, eq(chips.id, arrays.chipId))
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
}

function inputsOf(
  r: Joined,
  a: Pick<Row, keyof Omit<ChannelInputs, 'pointGroup' | 'cutNormal' | 'flatDirection' | 'chipRotationDeg'>> = r.a,
): ChannelInputs {
  return {
    pointGroup: r.pointGroup,
    cutNormal: r.cutNormal,
    flatDirection: r.flatDirection,
    chipRotationDeg: r.chipRotationDeg,
    shape: a.shape,
    dimensionsNm: a.dimensionsNm,
    shapeAzimuthDeg: a.shapeAzimuthDeg,
    lattice: a.lattice,
    periodXNm: a.periodXNm,
    periodYNm: a.periodYNm,
    azimuthDeg: a.azimuthDeg,
    customRotationOrder: a.customRotationOrder,
    customMirrors: a.customMirrors,
  }
}

/**
 * The row of one array read with its chip, wafer and material (an array's page, a chip's arrays), built like a list
 * row.
 */
function toArrayRow(r: Joined): ArrayRow {
  return toListRow({ ...r.a, chipCode: r.chipCode, chipRotationDeg: r.chipRotationDeg, isStale: r.isStale })
}

type ListJoined = Omit<Row, 'channelSetKey' | 'channelsInputHash'> & {
  chipCode: string
  chipRotationDeg: number
  isStale: number
}
/**
 * The rotation order and mirrors of a list row's structure, remembered by the few inputs they
 * depend on (most rows of a page share them); null when the engine refuses the inputs.
 */
const rowSymmetries = new BoundedCache<string, { rotationOrder: number; mirrors: number[] | 'all' } | { none: true }>(
  10_000,
)
function rowSymmetry(r: ListJoined): { rotationOrder: number; mirrors: number[] | 'all' } | null {
  const key = `${r.shape}|${r.shapeAzimuthDeg}|${r.lattice}|${r.customRotationOrder}|${JSON.stringify(r.customMirrors)}|${r.chipRotationDeg}|${r.azimuthDeg}`
  let hit = rowSymmetries.get(key)
  if (!hit) {
    try {
      const s = arraySymmetry(r)
      hit = { rotationOrder: s.rotationOrder, mirrors: s.mirrors }
    } catch {
      hit = { none: true }
    }
    rowSymmetries.set(key, hit)
  }
  return 'none' in hit ? null : hit
}

/** A list row from LIST_COLUMNS (everything but the channels); order and mirrors from rowSymmetry. */
function toListRow(r: ListJoined): ArrayRow {
  const s = rowSymmetry(r)
  const symmetry: ArrayRecord['symmetry'] = s
    ? { name: r.symmetryName ?? '?', ...s }
    : { name: r.symmetryName ?? '?', rotationOrder: 1, mirrors: [] }
  return {
    id: r.id,
    code: r.code,
    chip: { id: r.chipId, code: r.chipCode },
    position: r.position,
    shape: r.shape,
    dimensionsNm: r.dimensionsNm,
    shapeAzimuthDeg: r.shapeAzimuthDeg,
    lattice: r.lattice,
    periodXNm: r.periodXNm,
    periodYNm: r.periodYNm,
    azimuthDeg: r.azimuthDeg,
    count: r.count,
    customRotationOrder: r.customRotationOrder,
    customMirrors: r.customMirrors,
    symmetry,
    engineVersion: r.engineVersion,
    channelsComputedAt: iso(r.channelsComputedAt),
    isStale: Number(r.isStale) === 1,
    notes: r.notes,
    retiredAt: iso(r.retiredAt),
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  }
}

function toArrayRecord(r: Joined, sets: Map<string, StoredChannel[]>): ArrayRecord {
  return { ...toArrayRow(r), channels: (r.a.channelSetKey && sets.get(r.a.channelSetKey)) || [] }
}

/**
 * The columns of a list row: no channel key or input hash, staleness decided in SQL (as the `stale` filter and the
 * export do).
 */
const LIST_COLUMNS = {
  id: arrays.id,
  code: arrays.code,
  chipId: arrays.chipId,
  chipCode: chips.code,
  chipRotationDeg: chips.rotationDeg,
  position: arrays.position,
  shape: arrays.shape,
  dimensionsNm: arrays.dimensionsNm,
  shapeAzimuthDeg: arrays.shapeAzimuthDeg,
  lattice: arrays.lattice,
  periodXNm: arrays.periodXNm,
  periodYNm: arrays.periodYNm,
  azimuthDeg: arrays.azimuthDeg,
  count: arrays.count,
  customRotationOrder: arrays.customRotationOrder,
  customMirrors: arrays.customMirrors,
  symmetryName: arrays.symmetryName,
  engineVersion: arrays.engineVersion,
  channelsComputedAt: arrays.channelsComputedAt,
  isStale: staleChannelsSql,
  notes: arrays.notes,
  retiredAt: arrays.retiredAt,
  createdAt: arrays.createdAt,
  updatedAt: arrays.updatedAt,
}

const SORTS = {
  code: arrays.code,
  position: arrays.position,
  shape: arrays.shape,
  lattice: arrays.lattice,
  createdAt: arrays.createdAt,
  periodXNm: arrays.periodXNm,
}

export type ArrayListQuery = ListQuery & { chipId?: number; shape?: string; lattice?: string; stale?: boolean }

/** Arrays whose code starts with the typed code (chip codes find their arrays) or whose notes have the words. */
const ARRAY_TEXT: TextTarget = { table: 'arrays', letter: 'A', wordColumns: ['notes'] }

/** Arrays filtered by chip, shape, lattice, staleness and text (code, notes), sorted and paged in SQL. */
export async function listArrays(db: Db, q: ArrayListQuery): Promise<Page<ArrayRow>> {
  const chipId = q.chipId ?? q.parentId
  const where = and(
    q.includeRetired ? undefined : isNull(arrays.retiredAt),
    chipId ? eq(arrays.chipId, chipId) : undefined,
    q.shape ? eq(arrays.shape, q.shape) : undefined,
    q.lattice ? eq(arrays.lattice, q.lattice) : undefined,
    q.stale === true ? staleChannelsSql : q.stale === false ? sql`NOT ${staleChannelsSql}` : undefined,
    q.q
      ? idCondition(
          arrays.id,
          await textHitIds(db, ARRAY_TEXT, q.q),
          or(like(arrays.code, likePattern(q.q)), like(arrays.notes, likePattern(q.q))),
        )
      : undefined,
  )
  // The page is cut from `arrays` alone (its indexes) in a derived table, and only its rows are
  // joined to chip, wafer and material: one round trip, no join over every matching row.
  // Ties are broken by id in the same direction, so a (filter…, sort column) index is read backwards, not filesorted.
  // (Inside the derived table `arrays` names its own FROM, outside the joined row: one ORDER BY serves both.)
  const order = [orderBy(SORTS, q.sort, q.dir, 'code'), q.dir === 'desc' ? desc(arrays.id) : asc(arrays.id)]
  const page = db
    .select({ id: arrays.id })
    .from(arrays)
    .where(where)
    .orderBy(...order)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .as('page')
  const [rows, [{ n }]] = await Promise.all([
    plainRows(
      db,
      LIST_COLUMNS,
      (f) =>
        db
          .select(f)
          .from(page)
          .innerJoin(arrays, eq(arrays.id, page.id))
          .innerJoin(chips, eq(chips.id, arrays.chipId))
          .orderBy(...order),
      { cache: true },
    ),
    plainRows(db, { n: count() }, (f) => db.select(f).from(arrays).where(where), { cache: true }),
  ])
  return { rows: rows.map(toListRow), total: Number(n), page: q.page, pageSize: q.pageSize }
}

export async function listArraysOfChip(db: Db, chipId: number): Promise<ArrayRow[]> {
  return (
    await selectArrays(db)
      .where(and(eq(arrays.chipId, chipId), isNull(arrays.retiredAt)))
      .orderBy(asc(arrays.position))
  ).map(toArrayRow)
}

export async function getArray(db: Db, id: number): Promise<ArrayRecord> {
  const [row] = await selectArrays(db).where(eq(arrays.id, id))
  found(row, 'array')
  return toArrayRecord(row, await loadChannelSets(db, [row.a.channelSetKey]))
}

async function chipContext(db: Db, chipId: number) {
  const [c] = await db
    .select({
      chip: chips,
      cutNormal: wafers.cutNormal,
      flatDirection: wafers.flatDirection,
      pointGroup: materials.pointGroup,
    })
    .from(chips)
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .where(eq(chips.id, chipId))
  if (!c) throw fieldError('chipId', 'No such chip')
  return c
}

function geometry(i: ArrayInput) {
  return {
    shape: i.shape,
    dimensionsNm: i.dimensionsNm,
    shapeAzimuthDeg: i.shapeAzimuthDeg,
    lattice: i.lattice,
    periodXNm: i.periodXNm,
    periodYNm: i.periodYNm,
    azimuthDeg: i.azimuthDeg,
    count: i.count,
    customRotationOrder: i.customRotationOrder,
    customMirrors: i.customMirrors,
    notes: i.notes,
  }
}

function derived(ctx: Awaited<ReturnType<typeof chipContext>>, g: ReturnType<typeof geometry>) {
  const d = deriveChannels({
    pointGroup: ctx.pointGroup,
    cutNormal: ctx.cutNormal,
    flatDirection: ctx.flatDirection,
    chipRotationDeg: ctx.chip.rotationDeg,
    ...g,
  })
  return {
    set: { key: d.channelSetKey, channels: d.channels },
    row: {
      symmetryName: d.symmetryName,
      channelSetKey: d.channelSetKey,
      engineVersion: ENGINE_VERSION,
      channelsInputHash: d.hash,
      channelsComputedAt: new Date(),
    },
  }
}

/** Create an array (code A-<chip>-<position>) with its symmetry and channels derived. */
export async function createArray(db: Db, actor: User, input: ArrayInput): Promise<number> {
  const ctx = await chipContext(db, input.chipId)
  if (ctx.chip.status === 'retired') throw fieldError('chipId', `${ctx.chip.code} is retired`)
  const [dup] = await db
    .select({ id: arrays.id })
    .from(arrays)
    .where(and(eq(arrays.chipId, input.chipId), eq(arrays.position, input.position)))
  if (dup)
    throw new ConflictError(`${ctx.chip.code} already has an array at ${input.position}`, {
      position: ['This position is taken on the chip'],
    })
  const g = geometry(input)
  const d = derived(ctx, g)
  const v = {
    code: arrayCode(ctx.chip.code, input.position),
    chipId: input.chipId,
    position: input.position,
    ...g,
    ...d.row,
  }
  return db.transaction(async (tx) => {
    await saveChannelSets(tx, [d.set])
    const [{ id }] = await tx.insert(arrays).values(v).$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'array',
      entityId: id,
      action: 'create',
      changes: diffFields({}, { code: v.code, position: v.position, ...g, symmetryName: v.symmetryName }),
    })
    return id
  })
}

/** Update an array's geometry (chip and position are part of the code and stay); channels are derived again. */
export async function updateArray(db: Db, actor: User, id: number, input: ArrayInput): Promise<ArrayRecord> {
  const [prev] = await db.select().from(arrays).where(eq(arrays.id, id))
  if (found(prev, 'array').retiredAt) throw fieldError('_', 'This array is retired')
  if (input.chipId !== prev.chipId) throw fieldError('chipId', 'An array stays on its chip')
  if (input.position !== prev.position)
    throw fieldError('position', 'The position is part of the code; it cannot change')
  const g = geometry(input)
  const d = derived(await chipContext(db, prev.chipId), g)
  const changes = diffFields(prev as unknown as Record<string, unknown>, { ...g, symmetryName: d.row.symmetryName })
  await db.transaction(async (tx) => {
    await saveChannelSets(tx, [d.set])
    await tx
      .update(arrays)
      .set({ ...g, ...d.row, updatedAt: new Date() })
      .where(eq(arrays.id, id))
    if (Object.keys(changes).length)
      await writeAudit(tx, { userId: actor.id, entity: 'array', entityId: id, action: 'update', changes })
  })
  return getArray(db, id)
}

export async function retireArray(
  db: Db,
  actor: User,
  id: number,
  reason: string | null | undefined,
): Promise<ArrayRecord> {
  const why = requireReason(reason, 'array')
  const [prev] = await db.select().from(arrays).where(eq(arrays.id, id))
  if (found(prev, 'array').retiredAt) throw fieldError('reason', 'This array is already retired')
  await db.transaction(async (tx) => {
    const at = new Date()
    await tx.update(arrays).set({ retiredAt: at, updatedAt: at }).where(eq(arrays.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'array',
      entityId: id,
      action: 'retire',
      changes: { retiredAt: { from: null, to: at.toISOString() } },
      reason: why,
    })
  })
  return getArray(db, id)
}

const CHUNK = 200

/**
 * Recompute stored channels: one array, or many (`ids`, or all; `staleOnly` keeps the stale ones)
 * in chunks of 200, one transaction per chunk with one audit row per recomputed array. Staleness is
 * decided in SQL (engine version, cleared input hash), so 100 000 rows never go through JS at once.
 */
export async function recomputeArrays(
  db: Db,
  actor: User,
  opts: { ids?: number[]; staleOnly?: boolean },
): Promise<{ checked: number; recomputed: number }> {
  let lastId = 0,
    checked = 0,
    recomputed = 0
  for (;;) {
    const filter: (SQL | undefined)[] = [
      gt(arrays.id, lastId),
      isNull(arrays.retiredAt),
      opts.ids ? inArray(arrays.id, opts.ids.length ? opts.ids : [0]) : undefined,
      opts.staleOnly ? staleChannelsSql : undefined,
    ]
    const rows = await selectArrays(db)
      .where(and(...filter))
      .orderBy(asc(arrays.id))
      .limit(CHUNK)
    if (!rows.length) break
    lastId = rows[rows.length - 1].a.id
    checked += rows.length
    const todo = rows
    const fresh = todo.map((r) => ({ id: r.a.id, d: deriveChannels(inputsOf(r)) }))
    await db.transaction(async (tx) => {
      await saveChannelSets(
        tx,
        fresh.map(({ d }) => ({ key: d.channelSetKey, channels: d.channels })),
      )
      for (const { id, d } of fresh) {
        await tx
          .update(arrays)
          .set({
            symmetryName: d.symmetryName,
            channelSetKey: d.channelSetKey,
            engineVersion: ENGINE_VERSION,
            channelsInputHash: d.hash,
            channelsComputedAt: new Date(),
          })
          .where(eq(arrays.id, id))
      }
      await tx.insert(auditLog).values(
        todo.map((r) => ({
          userId: actor.id,
          entity: 'array',
          entityId: r.a.id,
          action: 'update' as const,
          reason: 'channels recomputed',
          changes: { engineVersion: { from: r.a.engineVersion, to: ENGINE_VERSION } },
        })),
      )
    })
    recomputed += todo.length
  }
  return { checked, recomputed }
}
