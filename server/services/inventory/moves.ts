import { and, desc, eq, inArray } from 'drizzle-orm'
import { locations, wafers, chips, moves, users, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { Move } from '../../../shared/records'
import type { MoveInput } from '../../../shared/schemas/records'
import { writeAudit } from '../audit/audit'
import { noticeHandOff } from '../mail/notices'
import { fieldError } from '../../errors'
import { iso } from './codes'
import { descendantIds, locationRefs } from './locations'

/** The item behind a scanned code: a wafer, a chip or a box. */
async function findItem(db: Db, code: string) {
  if (code.startsWith('W-')) {
    const [w] = await db.select().from(wafers).where(eq(wafers.code, code))
    if (w && w.status !== 'retired') return { kind: 'wafer' as const, id: w.id, code: w.code, locationId: w.locationId }
  } else if (code.startsWith('C-')) {
    const [c] = await db.select().from(chips).where(eq(chips.code, code))
    if (c && c.status !== 'retired')
      return { kind: 'chip' as const, id: c.id, code: c.code, locationId: c.locationId, holderId: c.holderId }
  } else if (code.startsWith('L-')) {
    const [l] = await db.select().from(locations).where(eq(locations.code, code))
    if (l && !l.retiredAt) {
      if (l.kind !== 'box')
        throw fieldError('itemCode', `${l.code} is a ${l.kind}; only boxes move (wafers, chips and boxes)`)
      return { kind: 'location' as const, id: l.id, code: l.code, locationId: l.parentId }
    }
  }
  throw fieldError('itemCode', `No wafer, chip or box has the code ${code}`)
}

/**
 * Move a wafer, chip or box to a location (and optionally hand it to a person), writing the item's
 * new place, a `moves` row, an audit row and (for a hand-off) a mail notice in ONE transaction.
 */
export async function moveItem(db: Db, actor: User, input: MoveInput, publicUrl: string): Promise<Move> {
  const item = await findItem(db, input.itemCode)
  const [to] = await db.select().from(locations).where(eq(locations.id, input.toLocationId))
  if (!to || to.retiredAt) throw fieldError('toLocationId', 'No such location (or it is retired)')
  if (item.kind === 'location') {
    if (to.kind !== 'cabinet') throw fieldError('toLocationId', 'A box goes into a cabinet')
    if ((await descendantIds(db, item.id)).has(to.id)) throw fieldError('toLocationId', 'A box cannot go inside itself')
  }
  let person: User | undefined
  if (input.handToUserId) {
    ;[person] = await db.select().from(users).where(eq(users.id, input.handToUserId))
    if (!person || !person.active) throw fieldError('handToUserId', 'No such active person')
  }
  const moveId = await db.transaction(async (tx) => {
    const changes: Record<string, { from: unknown; to: unknown }> = {}
    if (item.kind === 'wafer')
      await tx.update(wafers).set({ locationId: to.id, updatedAt: new Date() }).where(eq(wafers.id, item.id))
    if (item.kind === 'chip') {
      await tx
        .update(chips)
        .set({ locationId: to.id, ...(person ? { holderId: person.id } : {}), updatedAt: new Date() })
        .where(eq(chips.id, item.id))
      if (person && person.id !== item.holderId) changes.holderId = { from: item.holderId ?? null, to: person.id }
    }
    if (item.kind === 'location') await tx.update(locations).set({ parentId: to.id }).where(eq(locations.id, item.id))
    changes[item.kind === 'location' ? 'parentId' : 'locationId'] = { from: item.locationId ?? null, to: to.id }
    const [{ id }] = await tx
      .insert(moves)
      .values({
        itemKind: item.kind,
        itemId: item.id,
        itemCode: item.code,
        fromLocationId: item.locationId ?? null,
        toLocationId: to.id,
        handedToId: person?.id ?? null,
        movedBy: actor.id,
        note: input.note,
      })
      .$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: item.kind,
      entityId: item.id,
      action: 'update',
      changes,
      reason: input.note ?? `moved to ${to.code}`,
    })
    if (person && person.notifyByMail) {
      const path = (await locationRefs(tx as unknown as Db)).get(to.id)?.path ?? to.name
      await noticeHandOff(
        tx,
        {
          toUserId: person.id,
          itemCode: item.code,
          actorName: actor.name,
          path,
          locationCode: to.code,
          note: input.note,
        },
        publicUrl,
      )
    }
    return id
  })
  return (await listMoves(db, item.code, moveId))[0]
}

/** Move history of one item, newest first (or the single move `onlyId`). */
export async function listMoves(db: Db, itemCode: string, onlyId?: number): Promise<Move[]> {
  const rows = await db
    .select()
    .from(moves)
    .where(and(eq(moves.itemCode, itemCode.trim().toUpperCase()), onlyId ? eq(moves.id, onlyId) : undefined))
    .orderBy(desc(moves.movedAt), desc(moves.id))
    .limit(500)
  if (!rows.length) return []
  const refs = await locationRefs(db)
  const personIds = [...new Set(rows.flatMap((r) => [r.movedBy, r.handedToId].filter((x): x is number => !!x)))]
  const people = new Map(
    (await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, personIds))).map((p) => [
      p.id,
      p,
    ]),
  )
  const ref = (id: number | null) =>
    id && refs.get(id) ? { id, code: refs.get(id)!.code, path: refs.get(id)!.path } : null
  return rows.map((r) => ({
    id: r.id,
    itemCode: r.itemCode,
    from: ref(r.fromLocationId),
    to: ref(r.toLocationId),
    handedTo: r.handedToId ? (people.get(r.handedToId) ?? null) : null,
    movedBy: people.get(r.movedBy) ?? { id: r.movedBy, name: '?' },
    movedAt: iso(r.movedAt)!,
    note: r.note,
  }))
}
