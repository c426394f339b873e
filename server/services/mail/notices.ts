import { and, eq, sql } from 'drizzle-orm'
import { users } from '../../db/schema/index'
import type { Role } from '../../../shared/roles'
import type { Db, DbOrTx } from '../../db/client'
import { diffFields, writeAudit } from '../audit/audit'
import type { Preferences, PreferencesInput } from '../../../shared/schemas/notices'
import { queueMail } from './mail'
import {
  layoutNotice,
  setupSubmittedNotice,
  setupChangedNotice,
  signoffDecisionNotice,
  handOffNotice,
  type NoticeBody,
  type Recipient,
} from './notice-templates'

/**
 * E-mail notices. Every function only queues mail (server/services/mail/mail.ts) inside the caller's
 * transaction, so a notice goes out only if the action commits and never blocks or fails it.
 * People who opted out (users.notify_by_mail = false) or are inactive get none.
 */

let noticeBaseUrl = ''

/** Public base URL used in notice links (set once at start-up by server/index.ts; tests may set it). */
export function setNoticeBaseUrl(url: string): void {
  noticeBaseUrl = url.replace(/\/$/, '')
}
export const getNoticeBaseUrl = () => noticeBaseUrl

/** Active people holding `role` who want mail notices. */
export async function recipientsWithRole(tx: DbOrTx, role: Role): Promise<Recipient[]> {
  return (tx as Db)
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(
      and(
        eq(users.active, true),
        eq(users.notifyByMail, true),
        sql`JSON_CONTAINS(${users.roles}, ${JSON.stringify(role)})`,
      ),
    )
}

/** One person, if active and wanting notices. */
async function recipientById(tx: DbOrTx, id: number): Promise<Recipient[]> {
  return (tx as Db)
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(and(eq(users.id, id), eq(users.active, true), eq(users.notifyByMail, true)))
}

/** Queue one notice body to each recipient (each gets their own greeting). Returns how many were queued. */
export async function queueNotice(
  tx: DbOrTx,
  to: Recipient[],
  body: NoticeBody,
  base = noticeBaseUrl,
): Promise<number> {
  for (const r of to) await queueMail(tx, layoutNotice(r, body, base))
  return to.length
}

export interface SetupNoticeInfo {
  setupId: number
  code: string
  name: string
  actorName: string
}

/** A laser setup was registered and waits for sign-off: tell the safety officers. */
export async function noticeSetupSubmitted(tx: DbOrTx, info: SetupNoticeInfo): Promise<void> {
  await queueNotice(tx, await recipientsWithRole(tx, 'safety_officer'), setupSubmittedNotice(info, noticeBaseUrl))
}

/** A laser setup changed; `voided` when the change voided its sign-off. */
export async function noticeSetupChanged(
  tx: DbOrTx,
  info: SetupNoticeInfo & { voided: boolean; fields: string[] },
): Promise<void> {
  await queueNotice(tx, await recipientsWithRole(tx, 'safety_officer'), setupChangedNotice(info, noticeBaseUrl))
}

/** A safety officer approved, rejected or revoked a setup: tell the person who submitted it. */
export async function noticeSignoffDecision(
  tx: DbOrTx,
  info: SetupNoticeInfo & {
    decision: 'approved' | 'rejected' | 'revoked'
    note: string | null
    expiresOn: string | null
    submitterId: number
  },
): Promise<void> {
  await queueNotice(tx, await recipientById(tx, info.submitterId), signoffDecisionNotice(info, noticeBaseUrl))
}

/** A wafer, chip or box was handed to a person: tell them (unless they opted out). */
export async function noticeHandOff(
  tx: DbOrTx,
  info: {
    toUserId: number
    itemCode: string
    actorName: string
    path: string
    locationCode: string
    note?: string | null
  },
  base = noticeBaseUrl,
): Promise<void> {
  await queueNotice(
    tx,
    await recipientById(tx, info.toUserId),
    handOffNotice({ ...info, note: info.note ?? null }, base),
    base,
  )
}

/** The person's notice preferences. */
export async function getPreferences(db: Db, userId: number): Promise<Preferences> {
  const [u] = await db.select({ notifyByMail: users.notifyByMail }).from(users).where(eq(users.id, userId))
  return { notifyByMail: u?.notifyByMail ?? false }
}

/** Turn one's own mail notices on or off (audited like any change to a person). */
export async function setPreferences(db: Db, userId: number, input: PreferencesInput): Promise<Preferences> {
  await db.transaction(async (tx) => {
    const [before] = await tx
      .select({ notifyByMail: users.notifyByMail })
      .from(users)
      .where(eq(users.id, userId))
      .for('update')
    if (!before || before.notifyByMail === input.notifyByMail) return
    await tx.update(users).set({ notifyByMail: input.notifyByMail, updatedAt: new Date() }).where(eq(users.id, userId))
    await writeAudit(tx, {
      userId,
      entity: 'user',
      entityId: userId,
      action: 'update',
      changes: diffFields(before, input),
      reason: 'own notice preference',
    })
  })
  return getPreferences(db, userId)
}
