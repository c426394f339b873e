import { desc, eq } from 'drizzle-orm'
import { fabSteps, chips, users, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { FabStep } from '../../../shared/records'
import type { FabStepInput } from '../../../shared/schemas/records'
import { diffFields, writeAudit } from '../audit/audit'
import { fieldError } from '../../errors'
import { found } from './codes'

/** Fabrication steps of a chip (resist, exposure, etch …), newest first; the operator is the signed-in person. */
export async function listFabSteps(db: Db, chipId: number): Promise<FabStep[]> {
  const rows = await db
    .select({ s: fabSteps, operatorName: users.name })
    .from(fabSteps)
    .innerJoin(users, eq(users.id, fabSteps.operatorId))
    .where(eq(fabSteps.chipId, chipId))
    .orderBy(desc(fabSteps.performedAt), desc(fabSteps.id))
  return rows.map(({ s, operatorName }) => ({
    id: s.id,
    chipId: s.chipId,
    kind: s.kind,
    params: s.params,
    operator: { id: s.operatorId, name: operatorName },
    performedAt: s.performedAt.toISOString(),
    notes: s.notes,
    createdAt: s.createdAt.toISOString(),
  }))
}

/** Record a step. A step dated in the future is refused; the entry time is kept apart (created_at). */
export async function createFabStep(db: Db, actor: User, input: FabStepInput): Promise<FabStep> {
  const [chip] = await db.select().from(chips).where(eq(chips.id, input.chipId))
  if (found(chip, 'chip').status === 'retired') throw fieldError('chipId', `${chip.code} is retired`)
  const performedAt = new Date(input.performedAt)
  if (performedAt.getTime() > Date.now() + 5 * 60_000)
    throw fieldError('performedAt', 'A step cannot be dated in the future')
  const id = await db.transaction(async (tx) => {
    const v = {
      chipId: chip.id,
      kind: input.kind,
      params: input.params,
      operatorId: actor.id,
      performedAt,
      notes: input.notes,
    }
    const [{ id }] = await tx.insert(fabSteps).values(v).$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'fab_step',
      entityId: id,
      action: 'create',
      changes: diffFields({}, { ...v, performedAt: performedAt.toISOString() }),
    })
    return id
  })
  return (await listFabSteps(db, chip.id)).find((s) => s.id === id)!
}
