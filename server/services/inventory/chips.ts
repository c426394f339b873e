import { DEFAULT_KERF_MM, maxChipsOnWafer } from '../../../shared/wafer-fit'
import { and, asc, count, desc, eq, like, or, sql } from 'drizzle-orm'
import { chips, wafers, materials, users, locations, arrays, type User } from '../../db/schema/index'
import type { SelectResultFields } from 'drizzle-orm/query-builders/select.types'
import type { Db } from '../../db/client'
import type { ArrayRow, Chip, FabStep, Page } from '../../../shared/records'
import type { DiceInput, ListQuery } from '../../../shared/schemas/records'
import type { chipUpdateSchema } from '../../../shared/schemas/records'
import type { z } from 'zod'
import { diffFields, writeAudit } from '../audit/audit'
import { fieldError } from '../../errors'
import { MAX_CHIP_INDEX, chipCode, codeNumber, found, likePattern, orderBy, requireReason } from './codes'
import { locationRefs } from './locations'
import { markArraysStale } from './materials'
import { cutLabel } from './cut-label'
import { listArraysOfChip } from './arrays'
import { listFabSteps } from './fab-steps'
import { plainRows } from '../../db/plain-rows'
import { idCondition, textHitIds, type TextTarget } from '../search/text-search'

/** Parsed update; `notes` undefined = leave as is (the route drops it when the body omits it). */
type ChipUpdate = Omit<z.infer<typeof chipUpdateSchema>, 'notes'> & { notes?: string | null }

/** The columns of a chip as the API shows it (flat: read by Drizzle for one chip, by plainRows for a list page). */
const CHIP_COLUMNS = {
  id: chips.id,
  code: chips.code,
  waferId: chips.waferId,
  waferCode: wafers.code,
  cutNormal: wafers.cutNormal,
  materialName: materials.name,
  pointGroup: materials.pointGroup,
  index: chips.index,
  rotationDeg: chips.rotationDeg,
  widthMm: chips.widthMm,
  heightMm: chips.heightMm,
  locationId: chips.locationId,
  holderId: chips.holderId,
  holderName: users.name,
  status: chips.status,
  notes: chips.notes,
  arrayCount: sql<number>`(SELECT count(*) FROM arrays a WHERE a.chip_id = chips.id AND a.retired_at IS NULL)`,
  createdAt: chips.createdAt,
  updatedAt: chips.updatedAt,
}
/** A row of CHIP_COLUMNS; the holder is left-joined. */
type ChipColumns = Omit<SelectResultFields<typeof CHIP_COLUMNS>, 'holderName'> & { holderName: string | null }

function selectChips(db: Db) {
  return db
    .select(CHIP_COLUMNS)
    .from(chips)
    .innerJoin(wafers, eq(wafers.id, chips.waferId))
    .innerJoin(materials, eq(materials.id, wafers.materialId))
    .leftJoin(users, eq(users.id, chips.holderId))
}

function toChip(r: ChipColumns, refs: Awaited<ReturnType<typeof locationRefs>>): Chip {
  const loc = r.locationId ? refs.get(r.locationId) : undefined
  return {
    id: r.id,
    code: r.code,
    wafer: {
      id: r.waferId,
      code: r.waferCode,
      cutLabel: cutLabel(r.pointGroup, r.cutNormal),
      materialName: r.materialName,
    },
    index: r.index,
    rotationDeg: r.rotationDeg,
    widthMm: r.widthMm,
    heightMm: r.heightMm,
    location: loc ? { id: loc.id, code: loc.code, path: loc.path } : null,
    holder: r.holderId ? { id: r.holderId, name: r.holderName ?? '?' } : null,
    status: r.status,
    notes: r.notes,
    arrayCount: Number(r.arrayCount),
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  }
}

const SORTS = {
  code: chips.code,
  status: chips.status,
  rotationDeg: chips.rotationDeg,
  createdAt: chips.createdAt,
  wafer: wafers.code,
}

/**
 * Chips whose code starts with the typed code (wafer codes find their chips), whose notes have the words, or whose
 * wafer's lot contains the text.
 */
const CHIP_TEXT: TextTarget = {
  table: 'chips',
  letter: 'C',
  wordColumns: ['notes'],
  extra: (text) => [
    sql`SELECT c.id FROM chips c JOIN wafers w ON w.id = c.wafer_id WHERE w.lot LIKE ${likePattern(text)}`,
  ],
}

/** Chips filtered by wafer (`parentId`), status and text (code, notes, wafer lot), paged in SQL. */
export async function listChips(db: Db, q: ListQuery): Promise<Page<Chip>> {
  const lotOf = (text: string) => sql`${chips.waferId} IN (SELECT id FROM wafers WHERE lot LIKE ${likePattern(text)})`
  const where = and(
    q.parentId ? eq(chips.waferId, q.parentId) : undefined,
    q.status ? sql`${chips.status} = ${q.status}` : q.includeRetired ? undefined : sql`${chips.status} <> 'retired'`,
    q.q
      ? idCondition(
          chips.id,
          await textHitIds(db, CHIP_TEXT, q.q),
          or(like(chips.code, likePattern(q.q)), like(chips.notes, likePattern(q.q)), lotOf(q.q)),
        )
      : undefined,
  )
  // The page is cut from `chips` alone (its indexes; the wafer only when sorting by wafer code) in a
  // derived table, and only its rows are joined to wafer, material and holder: one round trip.
  // (Inside the derived table `chips` and `wafers` name its own FROM, outside the joined row: one ORDER BY serves
  // both.)
  const order = [orderBy(SORTS, q.sort, q.dir, 'code'), q.dir === 'desc' ? desc(chips.id) : asc(chips.id)]
  const ids =
    q.sort === 'wafer'
      ? db.select({ id: chips.id }).from(chips).innerJoin(wafers, eq(wafers.id, chips.waferId))
      : db.select({ id: chips.id }).from(chips)
  const page = ids
    .where(where)
    .orderBy(...order)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .as('page')
  const [rows, [{ n }], refs] = await Promise.all([
    plainRows(
      db,
      CHIP_COLUMNS,
      (f) =>
        db
          .select(f)
          .from(page)
          .innerJoin(chips, eq(chips.id, page.id))
          .innerJoin(wafers, eq(wafers.id, chips.waferId))
          .innerJoin(materials, eq(materials.id, wafers.materialId))
          .leftJoin(users, eq(users.id, chips.holderId))
          .orderBy(...order),
      { cache: true },
    ),
    plainRows(db, { n: count() }, (f) => db.select(f).from(chips).where(where), { cache: true }),
    locationRefs(db),
  ])
  return { rows: rows.map((r) => toChip(r, refs)), total: Number(n), page: q.page, pageSize: q.pageSize }
}

export async function listChipsOfWafer(db: Db, waferId: number): Promise<Chip[]> {
  const [rows, refs] = await Promise.all([
    selectChips(db).where(eq(chips.waferId, waferId)).orderBy(asc(chips.index)),
    locationRefs(db),
  ])
  return rows.map((r) => toChip(r, refs))
}

export async function getChip(db: Db, id: number): Promise<Chip> {
  const [row] = await selectChips(db).where(eq(chips.id, id))
  return toChip(found(row, 'chip'), await locationRefs(db))
}

export async function getChipDetail(db: Db, id: number): Promise<Chip & { arrays: ArrayRow[]; fabSteps: FabStep[] }> {
  const chip = await getChip(db, id)
  const [arrs, steps] = await Promise.all([listArraysOfChip(db, id), listFabSteps(db, id)])
  return { ...chip, arrays: arrs, fabSteps: steps }
}

/**
 * The new chips, with the saw's kerf, must fit the wafer beside the chips already cut from it
 * (counted in units of the new chip's cell): a chip larger than the wafer, or more chips than its
 * area holds, is refused on the field to fix.
 */
async function requireChipsFit(
  tx: Db,
  wafer: { id: number; code: string; diameterMm: number },
  input: DiceInput,
): Promise<void> {
  const d = Number(wafer.diameterMm),
    k = DEFAULT_KERF_MM
  if (Math.hypot(input.widthMm, input.heightMm) > d)
    throw fieldError('widthMm', `A ${input.widthMm} × ${input.heightMm} mm chip does not fit a ${d} mm wafer`)
  const capacity = maxChipsOnWafer(d, input.widthMm, input.heightMm, k)
  const cell = (input.widthMm + k) * (input.heightMm + k)
  const cut = await tx.select({ w: chips.widthMm, h: chips.heightMm }).from(chips).where(eq(chips.waferId, wafer.id))
  const used = cut.reduce((sum, c) => sum + ((Number(c.w) + k) * (Number(c.h) + k)) / cell, 0)
  const left = Math.max(0, Math.floor(capacity - used + 1e-9))
  if (input.count > left)
    throw fieldError(
      'count',
      `A ${d} mm wafer holds at most ${capacity} chips of ${input.widthMm} × ${input.heightMm} mm (${k * 1000} µm kerf); ${cut.length ? `with the ${cut.length} already cut, ${left} more fit` : `${left} fit`}`,
    )
}

/**
 * Dice `count` chips from a wafer in ONE transaction: the wafer row is locked, numbering continues
 * after its existing chips (C-0001-01…); a count past index 99 or a bad location writes nothing.
 */
export async function diceChips(db: Db, actor: User, input: DiceInput): Promise<number[]> {
  const run = async (tx: Db) => {
    const [w] = (await tx.execute(
      sql`SELECT id, code, status, diameter_mm AS diameterMm FROM wafers WHERE id = ${input.waferId} FOR UPDATE`,
    )) as unknown as [{ id: number; code: string; status: string; diameterMm: number }[]]
    const wafer = w[0]
    if (!wafer) throw fieldError('waferId', 'No such wafer')
    if (wafer.status === 'retired') throw fieldError('waferId', `${wafer.code} is retired; it cannot be diced`)
    if (input.locationId) {
      const [l] = await tx.select().from(locations).where(eq(locations.id, input.locationId))
      if (!l || l.retiredAt) throw fieldError('locationId', 'No such location (or it is retired)')
    }
    const [{ last }] = await tx
      .select({ last: sql<number>`coalesce(max(${chips.index}), 0)` })
      .from(chips)
      .where(eq(chips.waferId, wafer.id))
    const first = Number(last) + 1
    await requireChipsFit(tx, wafer, input)
    if (first + input.count - 1 > MAX_CHIP_INDEX)
      throw fieldError(
        'count',
        `${wafer.code} already has ${first - 1} chip(s); chip numbers stop at ${MAX_CHIP_INDEX}, so at most ${Math.max(0, MAX_CHIP_INDEX - first + 1)} more can be diced`,
      )
    const rows = Array.from({ length: input.count }, (_, k) => ({
      code: chipCode(codeNumber(wafer.code), first + k),
      waferId: wafer.id,
      index: first + k,
      rotationDeg: input.rotationDeg,
      widthMm: input.widthMm,
      heightMm: input.heightMm,
      locationId: input.locationId,
      notes: input.notes,
    }))
    await tx.insert(chips).values(rows)
    const created = await tx
      .select({ id: chips.id, code: chips.code })
      .from(chips)
      .where(and(eq(chips.waferId, wafer.id), sql`${chips.index} >= ${first}`))
      .orderBy(asc(chips.index))
    for (const c of created) {
      const r = rows.find((x) => x.code === c.code)!
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'chip',
        entityId: c.id,
        action: 'create',
        changes: diffFields({}, r),
      })
    }
    return created.map((c) => c.id)
  }
  return db.transaction((tx) => run(tx as unknown as Db))
}

/**
 * Update a chip with an audit row. Changing rotationDeg of a chip that carries arrays needs a
 * reason (their stored channels become stale: the input hash is cleared in the same transaction).
 */
export async function updateChip(db: Db, actor: User, id: number, input: ChipUpdate): Promise<Chip> {
  const [prev] = await db.select().from(chips).where(eq(chips.id, id))
  if (found(prev, 'chip').status === 'retired') throw fieldError('status', 'This chip is retired')
  if (input.status === 'retired') throw fieldError('status', 'Use Retire (with a reason) to retire a chip')
  const v = {
    rotationDeg: input.rotationDeg,
    widthMm: input.widthMm,
    heightMm: input.heightMm,
    status: input.status,
    notes: input.notes,
  }
  const changes = diffFields(prev as unknown as Record<string, unknown>, v)
  const rotated = 'rotationDeg' in changes
  if (rotated) {
    const [{ n }] = await db
      .select({ n: sql<number>`count(*)` })
      .from(arrays)
      .where(eq(arrays.chipId, id))
    if (Number(n) > 0 && !input.reason)
      throw fieldError(
        'reason',
        `This chip carries ${n} array(s) whose stored channels depend on its rotation: say why it changes`,
      )
  }
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx
        .update(chips)
        .set({ ...v, updatedAt: new Date() })
        .where(eq(chips.id, id))
      if (rotated) await markArraysStale(tx as unknown as Db, eq(chips.id, id))
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'chip',
        entityId: id,
        action: 'update',
        changes,
        reason: input.reason,
      })
    })
  }
  return getChip(db, id)
}

export async function retireChip(db: Db, actor: User, id: number, reason: string | null | undefined): Promise<Chip> {
  const why = requireReason(reason, 'chip')
  const [prev] = await db.select().from(chips).where(eq(chips.id, id))
  if (found(prev, 'chip').status === 'retired') throw fieldError('reason', 'This chip is already retired')
  await db.transaction(async (tx) => {
    await tx.update(chips).set({ status: 'retired', updatedAt: new Date() }).where(eq(chips.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'chip',
      entityId: id,
      action: 'retire',
      changes: { status: { from: prev.status, to: 'retired' } },
      reason: why,
    })
  })
  return getChip(db, id)
}
