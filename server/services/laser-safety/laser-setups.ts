import { and, asc, desc, eq, inArray, isNull, like, or, sql, type SQL } from 'drizzle-orm'
import { laserSetups, users } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { User } from '../../db/schema/index'
import type { LaserSetup, Page } from '../../../shared/records'
import type { LaserSetupInput, ListQuery } from '../../../shared/schemas/records'
import { diffFields, writeAudit } from '../audit/audit'
import { changedHazardFields, hazardHash } from './setup-hazards'
import {
  addDays,
  approvalCheck,
  loadDecisions,
  signoffSummary,
  todayUtc,
  voidSignoff,
  type DecisionRow,
} from './signoffs'
import { noticeSetupChanged, noticeSetupSubmitted } from '../mail/notices'
import { BadRequestError, ConflictError, ForbiddenError, NotFoundError, fieldError } from '../../errors'

/**
 * The laser-safety register (issue 5): setups with their hazard fields and sign-off state. Codes
 * LS-001 are assigned inside the creating transaction and never reused. A change to the hazard
 * fields of a signed-off setup needs a reason and voids the sign-off (signoffs.ts).
 */

type Row = typeof laserSetups.$inferSelect

export function toLaserSetup(
  r: Row,
  decisions: DecisionRow[] = [],
  submitter: { id: number; name: string } | null = null,
): LaserSetup {
  return {
    id: r.id,
    code: r.code,
    name: r.name,
    room: r.room,
    sourceType: r.sourceType,
    wavelengthsNm: [...r.wavelengthsNm],
    notes: r.notes,
    retiredAt: r.retiredAt?.toISOString() ?? null,
    pulseDurationFs: r.pulseDurationFs,
    repRateHz: r.repRateHz,
    maxAvgPowerMw: r.maxAvgPowerMw,
    pulseEnergyUj: r.pulseEnergyUj,
    beamDiameterMm: r.beamDiameterMm,
    divergenceMrad: r.divergenceMrad,
    harmonicOrders: r.harmonicOrders ?? [],
    laserClass: r.laserClass ?? null,
    eyewear: r.eyewear ?? [],
    interlocks: r.interlocks,
    controlledAreaNotes: r.controlledAreaNotes,
    submitter,
    submittedAt: r.submittedAt?.toISOString() ?? null,
    signoff: signoffSummary(decisions, hazardHash(r), r.submittedAt),
  }
}

/** Rows → API objects with their submitter and sign-off state (two queries for the whole page). */
export async function withSignoffs(db: Pick<Db, 'select'>, rows: Row[]): Promise<LaserSetup[]> {
  const decisions = await loadDecisions(
    db,
    rows.map((r) => r.id),
  )
  const ids = [...new Set(rows.map((r) => r.submittedById).filter((x): x is number => !!x))]
  const people = ids.length
    ? await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids))
    : []
  return rows.map((r) => toLaserSetup(r, decisions.get(r.id), people.find((p) => p.id === r.submittedById) ?? null))
}

/**
 * Next code `PREFIX-NNN…`: max existing number + 1, read with FOR UPDATE inside the caller's
 * transaction (concurrent creators wait; `withCodeRetry` covers the remaining duplicate-key race).
 */
export async function nextCode(tx: DbOrTx, table: string, prefix: string, digits: number): Promise<string> {
  const start = prefix.length + 2
  const [rows] = (await tx.execute(
    sql.raw(
      `SELECT COALESCE(MAX(CAST(SUBSTRING(code, ${start}) AS UNSIGNED)), 0) AS n FROM \`${table}\` WHERE code LIKE '${prefix}-%' FOR UPDATE`,
    ),
  )) as unknown as [{ n: number | string }[]]
  return `${prefix}-${String(Number(rows[0].n) + 1).padStart(digits, '0')}`
}

/** Run `fn` again (at most 3 times) when a concurrent insert took the same code. */
export async function withCodeRetry<T>(fn: () => Promise<T>): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await fn()
    } catch (err) {
      const dup = err as { cause?: { errno?: number }; errno?: number }
      if (attempt >= 3 || (dup.errno ?? dup.cause?.errno) !== 1062) throw err
    }
  }
}

const SORTABLE = {
  code: laserSetups.code,
  name: laserSetups.name,
  room: laserSetups.room,
  createdAt: laserSetups.createdAt,
} as const

export async function listLaserSetups(db: Db, q: ListQuery): Promise<Page<LaserSetup>> {
  const where: SQL[] = []
  if (!q.includeRetired) where.push(isNull(laserSetups.retiredAt))
  if (q.q) {
    const p = `%${q.q.replace(/[\\%_]/g, (c) => '\\' + c)}%`
    where.push(or(like(laserSetups.code, p), like(laserSetups.name, p), like(laserSetups.room, p))!)
  }
  const col = SORTABLE[(q.sort ?? 'code') as keyof typeof SORTABLE] ?? laserSetups.code
  const cond = where.length ? and(...where) : undefined
  const rows = await db
    .select()
    .from(laserSetups)
    .where(cond)
    .orderBy(q.dir === 'desc' ? desc(col) : asc(col), asc(laserSetups.id))
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
  const [{ n }] = await db
    .select({ n: sql<number>`count(*)` })
    .from(laserSetups)
    .where(cond)
  return { rows: await withSignoffs(db, rows), total: Number(n), page: q.page, pageSize: q.pageSize }
}

async function findRow(db: Pick<Db, 'select'>, id: number): Promise<Row> {
  const [r] = await db.select().from(laserSetups).where(eq(laserSetups.id, id))
  if (!r) throw new NotFoundError('No such laser setup')
  return r
}

export async function getLaserSetup(db: Db, id: number): Promise<LaserSetup> {
  return (await withSignoffs(db, [await findRow(db, id)]))[0]
}

/**
 * Register a setup as a draft. Its author (the submitter of record) is the signed-in person, set
 * here; nobody can name someone else. It enters the sign-off queue only when submitted.
 */
export async function createLaserSetup(db: Db, actor: User, input: LaserSetupInput): Promise<LaserSetup> {
  const { submitterId: _ignored, ...fields } = input
  const id = await withCodeRetry(() =>
    db.transaction(async (tx) => {
      const code = await nextCode(tx, 'laser_setups', 'LS', 3)
      const values = { code, ...fields, submittedById: actor.id }
      const [{ id }] = await tx.insert(laserSetups).values(values).$returningId()
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'laser_setup',
        entityId: id,
        action: 'create',
        changes: diffFields({}, values),
      })
      return id
    }),
  )
  return getLaserSetup(db, id)
}

/** What a setup still lacks before it can be submitted for sign-off (field → message); empty when complete. */
export function missingForSubmit(r: Row): Record<string, string[]> {
  const miss: Record<string, string[]> = {}
  const need = (field: string, ok: boolean, msg: string) => {
    if (!ok) miss[field] = [msg]
  }
  need('wavelengthsNm', (r.wavelengthsNm ?? []).length > 0, 'Give at least one wavelength')
  need('maxAvgPowerMw', r.maxAvgPowerMw !== null && r.maxAvgPowerMw > 0, 'Give the maximum average power')
  if (r.sourceType !== 'cw') {
    need('pulseDurationFs', r.pulseDurationFs !== null, 'Give the pulse duration of this pulsed source')
    if (r.sourceType === 'mode_locked')
      need('repRateHz', r.repRateHz !== null, 'Give the repetition rate of this mode-locked source')
    else
      need(
        'pulseEnergyUj',
        r.repRateHz !== null || r.pulseEnergyUj !== null,
        'Give the repetition rate, or the pulse energy of a single-shot source',
      )
  }
  need('beamDiameterMm', r.beamDiameterMm !== null, 'Give the beam diameter at the exit')
  need('eyewear', (r.eyewear ?? []).length > 0, 'List the eyewear used with this setup')
  need('interlocks', !!r.interlocks?.trim(), 'Describe the interlocks (or say that there are none and why)')
  return miss
}

/**
 * The author submits a complete draft for sign-off: it enters the safety officers' queue and they
 * get a notice. A rejected or revoked setup goes back to its author and is submitted again.
 */
export async function submitLaserSetup(db: Db, actor: User, id: number): Promise<LaserSetup> {
  await db.transaction(async (tx) => {
    const [r] = await tx.select().from(laserSetups).where(eq(laserSetups.id, id)).for('update')
    if (!r) throw new NotFoundError('No such laser setup')
    if (r.retiredAt) throw new BadRequestError('This laser setup is retired.')
    if (r.submittedAt) throw new ConflictError('This setup is already submitted for sign-off.')
    if (r.submittedById !== actor.id) throw new ForbiddenError('Only the author of this setup submits it for sign-off.')
    const miss = missingForSubmit(r)
    if (Object.keys(miss).length)
      throw new BadRequestError('The description is not complete enough to sign off: fill in the marked fields.', miss)
    const now = new Date()
    await tx.update(laserSetups).set({ submittedAt: now, updatedAt: now }).where(eq(laserSetups.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'laser_setup',
      entityId: id,
      action: 'update',
      changes: { submittedAt: { from: null, to: now.toISOString() } },
    })
    await noticeSetupSubmitted(tx, { setupId: id, code: r.code, name: r.name, actorName: actor.name })
  })
  return getLaserSetup(db, id)
}

/**
 * Edit a setup. Changing a hazard field of a signed-off setup (approved, even if expired) needs a
 * reason (400 fields.reason) and voids the sign-off: a 'voided' decision, the audit row and the notice
 * are written in the same transaction.
 */
export async function updateLaserSetup(
  db: Db,
  actor: User,
  id: number,
  input: Partial<LaserSetupInput> & { reason?: string | null },
): Promise<LaserSetup> {
  const { reason, submitterId: _ignored, ...fields } = input
  await db.transaction(async (tx) => {
    const [before] = await tx.select().from(laserSetups).where(eq(laserSetups.id, id)).for('update')
    if (!before) throw new NotFoundError('No such laser setup')
    if (before.retiredAt) throw new BadRequestError('This laser setup is retired; it cannot be edited.')
    const next: Record<string, unknown> = { ...fields }
    const normal = { ...before, harmonicOrders: before.harmonicOrders ?? [], eyewear: before.eyewear ?? [] }
    const changes = diffFields(normal as unknown as Record<string, unknown>, next)
    if (!Object.keys(changes).length) return
    const hazard = changedHazardFields(before, next)
    const signoff = signoffSummary((await loadDecisions(tx, [id])).get(id)!, hazardHash(before), before.submittedAt)
    const voids = hazard.length > 0 && (signoff.state === 'approved' || signoff.state === 'expired')
    if (voids && !reason?.trim())
      throw fieldError(
        'reason',
        `This setup is signed off: say why its hazard fields (${hazard.join(', ')}) change; the change voids the sign-off`,
      )
    await tx
      .update(laserSetups)
      .set({ ...next, updatedAt: new Date() })
      .where(eq(laserSetups.id, id))
    if (voids) {
      const [after] = await tx.select().from(laserSetups).where(eq(laserSetups.id, id))
      await voidSignoff(tx, actor, before, hazardHash(after), reason!)
      changes.signoff = { from: signoff.state, to: 'voided' }
    }
    await writeAudit(tx, { userId: actor.id, entity: 'laser_setup', entityId: id, action: 'update', changes, reason })
    // A draft is its author's business; the safety officers hear of changes once it is submitted.
    if (before.submittedAt)
      await noticeSetupChanged(tx, {
        setupId: id,
        code: before.code,
        name: before.name,
        actorName: actor.name,
        voided: voids,
        fields: Object.keys(changes),
      })
  })
  return getLaserSetup(db, id)
}

/**
 * The safety officers' queue: submitted setups waiting (never or no longer approved), approvals
 * expiring within 30 days, expired ones; each with whether `reader` may approve (renew) it.
 */
export async function signoffQueue(db: Db, reader: User) {
  const rows = await db.select().from(laserSetups).where(isNull(laserSetups.retiredAt)).orderBy(asc(laserSetups.code))
  const setups = await withSignoffs(db, rows)
  const soon = addDays(todayUtc(), 30)
  const by = (st: string[]) => setups.filter((s) => st.includes(s.signoff.state))
  const lists = {
    waiting: by(['waiting', 'voided']).filter((s) => s.submittedAt !== null),
    expiring: by(['approved'])
      .filter((s) => s.signoff.expiresOn! <= soon)
      .sort((a, b) => a.signoff.expiresOn!.localeCompare(b.signoff.expiresOn!)),
    expired: by(['expired']),
  }
  const withApproval = (list: LaserSetup[]) =>
    Promise.all(
      list.map(async (s) => ({
        ...s,
        approval: await approvalCheck(
          db,
          reader,
          rows.find((r) => r.id === s.id)!,
          s.signoff.state,
        ),
      })),
    )
  return {
    waiting: await withApproval(lists.waiting),
    expiring: await withApproval(lists.expiring),
    expired: await withApproval(lists.expired),
  }
}

/** Retire a setup (never deleted): the reason is mandatory and kept in the audit row. */
export async function retireLaserSetup(db: Db, actor: User, id: number, reason: string): Promise<LaserSetup> {
  if (!reason?.trim()) throw fieldError('reason', 'Say why')
  await db.transaction(async (tx) => {
    const before = await findRow(tx, id)
    if (before.retiredAt) throw new BadRequestError('This laser setup is already retired.')
    const now = new Date()
    await tx.update(laserSetups).set({ retiredAt: now, updatedAt: now }).where(eq(laserSetups.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'laser_setup',
      entityId: id,
      action: 'retire',
      changes: { retiredAt: { from: null, to: now.toISOString() } },
      reason,
    })
  })
  return getLaserSetup(db, id)
}
