import { and, asc, eq, inArray, sql } from 'drizzle-orm'
import { auditLog, laserSetups, laserSetupSignoffs as so, users, type User } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { ApprovalCheck, SignoffState, SignoffSummary } from '../../../shared/records'
import { HAZARD_FIELDS, SIGNOFF_MAX_DAYS } from '../../../shared/schemas/records'
import { writeAudit } from '../audit/audit'
import { hazardHash } from './setup-hazards'
import { noticeSignoffDecision } from '../mail/notices'
import { BadRequestError, ConflictError, ForbiddenError, NotFoundError, fieldError } from '../../errors'

/**
 * Sign-off of laser setups by safety officers (issue 5). Decisions are appended to
 * laser_setup_signoffs (never updated); the latest row is the state. An approval binds to the
 * SHA-256 of the hazard fields, carries an expiry date (compared in UTC) and a note; a change to
 * the hazard fields voids it (laser-setups.ts). Sessions need a valid approval (sessions.ts).
 */
type SetupRow = typeof laserSetups.$inferSelect
export interface DecisionRow {
  id: number
  setupId: number
  decision: 'approved' | 'rejected' | 'revoked' | 'voided'
  by: { id: number; name: string }
  at: Date
  expiresOn: string | null
  note: string | null
  hazardHash: string
}

export const todayUtc = (d = new Date()) => d.toISOString().slice(0, 10)
export const addDays = (day: string, n: number) => todayUtc(new Date(Date.parse(day) + n * 86400_000))

export async function loadDecisions(db: Pick<Db, 'select'>, setupIds: number[]): Promise<Map<number, DecisionRow[]>> {
  const map = new Map<number, DecisionRow[]>(setupIds.map((id) => [id, []]))
  if (!setupIds.length) return map
  const rows = await db
    .select({ s: so, by: { id: users.id, name: users.name } })
    .from(so)
    .innerJoin(users, eq(users.id, so.byId))
    .where(inArray(so.setupId, setupIds))
    .orderBy(asc(so.id))
  for (const { s, by } of rows) map.get(s.setupId)!.push({ ...s, by })
  return map
}

/**
 * Current state from the decision history, the setup's current hazard hash and when it was
 * submitted: a draft until submitted; a rejected or revoked setup goes back to its author
 * (`submittedAt` is cleared) and waits again once resubmitted.
 */
export function signoffSummary(
  history: DecisionRow[],
  currentHash: string,
  submittedAt: Date | null,
  today = todayUtc(),
): SignoffSummary {
  const last = history.at(-1)
  if (!last)
    return { state: submittedAt ? 'waiting' : 'draft', expiresOn: null, by: null, at: null, note: null, isValid: false }
  let state: SignoffState = last.decision
  if ((state === 'rejected' || state === 'revoked') && submittedAt) state = 'waiting'
  else if (state === 'approved' && last.hazardHash !== currentHash) state = 'voided'
  else if (state === 'approved' && (last.expiresOn ?? '') < today) state = 'expired'
  return {
    state,
    expiresOn: last.expiresOn,
    by: last.by,
    at: last.at.toISOString(),
    note: last.note,
    isValid: state === 'approved',
  }
}

export const historyOut = (h: DecisionRow[]) =>
  h
    .map((d) => ({ decision: d.decision, by: d.by, at: d.at.toISOString(), expiresOn: d.expiresOn, note: d.note }))
    .reverse()

async function lockSetup(tx: DbOrTx, id: number): Promise<SetupRow> {
  const [r] = await tx.select().from(laserSetups).where(eq(laserSetups.id, id)).for('update')
  if (!r) throw new NotFoundError('No such laser setup')
  if (r.retiredAt) throw new BadRequestError('This laser setup is retired.')
  return r
}

/**
 * Who changed the setup's hazard fields (or created it) since its last decision, from the audit
 * trail: the rows after the latest approve/reject/revoke row whose changes touch a hazard field.
 */
export async function hazardEditorsSinceDecision(db: Pick<Db, 'select'>, setupId: number): Promise<number[]> {
  const rows = await db
    .select({ id: auditLog.id, userId: auditLog.userId, action: auditLog.action, changes: auditLog.changes })
    .from(auditLog)
    .where(and(eq(auditLog.entity, 'laser_setup'), eq(auditLog.entityId, setupId)))
    .orderBy(asc(auditLog.id))
  let lastDecision = -1
  rows.forEach((r, i) => {
    if (r.action === 'signoff' || r.action === 'revoke') lastDecision = i
  })
  const hazard = new Set<string>(HAZARD_FIELDS)
  const editors = new Set<number>()
  for (const r of rows.slice(lastDecision + 1)) {
    const changes = typeof r.changes === 'string' ? (JSON.parse(r.changes) as Record<string, unknown>) : r.changes
    if (
      r.userId &&
      (r.action === 'create' || (r.action === 'update' && Object.keys(changes).some((k) => hazard.has(k))))
    )
      editors.add(r.userId)
  }
  return [...editors]
}

const SUBMITTED: SignoffState[] = ['waiting', 'voided', 'approved', 'expired']

/**
 * May `actor` approve (or renew) this setup? Only a safety officer, only a submitted setup, never
 * its author and never someone who changed its hazard fields since its last decision (the person who
 * describes a hazard never approves it). When nobody in the lab is left to approve, says how to fix it.
 */
export async function approvalCheck(
  db: Pick<Db, 'select'>,
  actor: Pick<User, 'id' | 'roles'>,
  setup: SetupRow,
  state: SignoffState,
): Promise<ApprovalCheck> {
  const editors = await hazardEditorsSinceDecision(db, setup.id)
  const barred = new Set([...editors, ...(setup.submittedById ? [setup.submittedById] : [])])
  const officers = await db
    .select({ id: users.id })
    .from(users)
    .where(and(eq(users.active, true), sql`JSON_CONTAINS(${users.roles}, '"safety_officer"')`))
  const eligibleOfficers = officers.filter((o) => !barred.has(o.id)).length
  const nobodyElse =
    eligibleOfficers === 0
      ? ' The lab has no other safety officer who could: an administrator adds a second safety officer under People (Invite, role Safety officer).'
      : ''
  let reason: string | null = null
  if (!actor.roles.includes('safety_officer')) reason = 'Only a safety officer signs off laser setups.'
  else if (!SUBMITTED.includes(state))
    reason = `This setup is ${state === 'draft' ? 'a draft' : state}: its author submits it for sign-off first.`
  else if (setup.submittedById === actor.id)
    reason = `You described this setup, so another safety officer must approve it.${nobodyElse}`
  else if (editors.includes(actor.id))
    reason = `You changed its hazard fields since its last decision, so another safety officer must approve it.${nobodyElse}`
  return { canApprove: reason === null, reason, eligibleOfficers }
}

type Decision = 'approved' | 'rejected' | 'revoked'
async function decide(
  db: Db,
  actor: User,
  id: number,
  decision: Decision,
  note: string | null,
  expiresOn: string | null,
): Promise<void> {
  await db.transaction(async (tx) => {
    const setup = await lockSetup(tx, id)
    const hash = hazardHash(setup)
    const current = signoffSummary((await loadDecisions(tx, [id])).get(id)!, hash, setup.submittedAt)
    if (!actor.roles.includes('safety_officer'))
      throw new ForbiddenError('Only a safety officer signs off laser setups.')
    if (decision === 'approved') {
      const check = await approvalCheck(tx, actor, setup, current.state)
      if (!check.canApprove)
        throw SUBMITTED.includes(current.state) ? new ForbiddenError(check.reason!) : new ConflictError(check.reason!)
    }
    if (decision === 'revoked' && current.state !== 'approved' && current.state !== 'expired')
      throw new ConflictError(`Only a signed-off setup can be revoked; this one is ${current.state}.`)
    if (decision === 'rejected' && current.state !== 'waiting' && current.state !== 'voided')
      throw new ConflictError(
        current.state === 'approved'
          ? 'This setup is signed off: revoke the sign-off instead of rejecting it.'
          : `Only a setup waiting for sign-off can be rejected; this one is ${current.state === 'draft' ? 'a draft' : current.state}.`,
      )
    const [{ id: rowId }] = await tx
      .insert(so)
      .values({ setupId: id, decision, byId: actor.id, expiresOn, note, hazardHash: hash })
      .$returningId()
    // A rejected or revoked setup goes back to its author, who changes it and submits it again.
    const backToAuthor = decision !== 'approved'
    if (backToAuthor) await tx.update(laserSetups).set({ submittedAt: null }).where(eq(laserSetups.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'laser_setup',
      entityId: id,
      action: decision === 'revoked' ? 'revoke' : 'signoff',
      changes: {
        signoff: { from: current.state, to: decision },
        ...(expiresOn ? { expiresOn: { from: current.expiresOn, to: expiresOn } } : {}),
        signoffId: { from: null, to: rowId },
        hazardHash: { from: null, to: hash },
        ...(backToAuthor ? { submittedAt: { from: setup.submittedAt?.toISOString() ?? null, to: null } } : {}),
      },
      reason: note,
    })
    if (setup.submittedById)
      await noticeSignoffDecision(tx, {
        setupId: id,
        code: setup.code,
        name: setup.name,
        actorName: actor.name,
        decision,
        note,
        expiresOn,
        submitterId: setup.submittedById,
      })
  })
}

export async function approveSetup(
  db: Db,
  actor: User,
  id: number,
  input: { expiresOn: string; note: string | null },
): Promise<void> {
  const today = todayUtc()
  if (input.expiresOn <= today) throw fieldError('expiresOn', 'The expiry date must be after today')
  if (input.expiresOn > addDays(today, SIGNOFF_MAX_DAYS))
    throw fieldError('expiresOn', `At most ${SIGNOFF_MAX_DAYS / 365} years ahead (${addDays(today, SIGNOFF_MAX_DAYS)})`)
  await decide(db, actor, id, 'approved', input.note, input.expiresOn)
}
export const rejectSetup = (db: Db, actor: User, id: number, note: string) =>
  decide(db, actor, id, 'rejected', note, null)
export const revokeSetup = (db: Db, actor: User, id: number, note: string) =>
  decide(db, actor, id, 'revoked', note, null)

/** Inside an update transaction: record that a hazard change voided the approval. */
export async function voidSignoff(
  tx: DbOrTx,
  actor: User,
  setup: SetupRow,
  newHash: string,
  reason: string,
): Promise<void> {
  await tx.insert(so).values({
    setupId: setup.id,
    decision: 'voided',
    byId: actor.id,
    expiresOn: null,
    note: reason,
    hazardHash: newHash,
  })
}

/** Throws the `laserSetupId` field error unless sessions may be logged on the setup for `performedAt`. */
export async function requireValidSignoff(tx: DbOrTx, setup: SetupRow, performedAt: Date): Promise<void> {
  const s = signoffSummary((await loadDecisions(tx, [setup.id])).get(setup.id)!, hazardHash(setup), setup.submittedAt)
  const ask = 'ask a safety officer'
  const why =
    s.state === 'expired'
      ? `its sign-off expired on ${s.expiresOn}`
      : s.state === 'approved' && s.expiresOn! < todayUtc(performedAt)
        ? `its sign-off expires on ${s.expiresOn}, before the session date`
        : s.state === 'approved'
          ? null
          : s.state === 'waiting'
            ? 'it is not signed off yet'
            : s.state === 'draft'
              ? 'it is a draft, not yet submitted for sign-off'
              : s.state === 'voided'
                ? 'its sign-off was voided by a change to its hazard fields'
                : `its sign-off was ${s.state}`
  if (why)
    throw new ConflictError(`${setup.code} cannot be used: ${why}. Sessions need a signed-off setup: ${ask}.`, {
      laserSetupId: [`This setup is not signed off (${why}): ${ask}`],
    })
}
