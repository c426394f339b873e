import { createHash, randomBytes } from 'node:crypto'
import { and, asc, eq, gt, isNull, like, ne, or, sql } from 'drizzle-orm'
import { users, invitations, sessions, type User } from '../../db/schema/index'
import type { Db, DbOrTx } from '../../db/client'
import type { PublicUser } from '../../../shared/types'
import { PROTECTED_ROLES, ROLES, ROLE_LABELS, grantableRoles, type Role } from '../../../shared/roles'
import type { InviteInput, UpdateUserInput } from '../../../shared/schemas/auth'
import { hashPassword, verifyPassword } from '../../auth/passwords'
import { writeAudit, diffFields } from '../audit/audit'
import { queueMail } from '../mail/mail'
import { AppError, ConflictError, ForbiddenError, NotFoundError, fieldError } from '../../errors'
import { inviteMail, resetMail } from '../mail/mail-templates'
import { requireStrongPassword } from '../../auth/password-strength'
import { plainRows } from '../../db/plain-rows'

/** How long an invitation link stays valid. */
export const INVITE_TTL_MS = 7 * 24 * 3600 * 1000

export function toPublicUser(u: User): PublicUser {
  return publicUserOf(u, u.passwordHash === null)
}

/** The public face of a person's columns (no password hash: only whether one is set). */
function publicUserOf(
  u: Pick<User, 'id' | 'email' | 'name' | 'roles' | 'active' | 'createdAt'>,
  invitePending: boolean,
): PublicUser {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    roles: [...u.roles],
    active: u.active,
    invitePending,
    createdAt: u.createdAt.toISOString(),
  }
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex')

export async function findUserByEmail(db: Db, email: string): Promise<User | undefined> {
  const [u] = await db.select().from(users).where(eq(users.email, email.toLowerCase()))
  return u
}

export async function findUserById(db: Db, id: number): Promise<User | undefined> {
  const [u] = await db.select().from(users).where(eq(users.id, id))
  return u
}

export async function listUsers(db: Db): Promise<PublicUser[]> {
  const rows = await db.select().from(users).orderBy(asc(users.name), asc(users.id))
  return rows.map(toPublicUser)
}

/** People whose name or e-mail contains the text (case-insensitive under the utf8mb4 collation). */
export async function searchUsers(db: Db, q: string, limit = 10): Promise<PublicUser[]> {
  const pattern = `%${q.replace(/[\\%_]/g, (c) => '\\' + c)}%`
  // Only the public columns (not the password hash: whether one is set is decided in SQL), through plainRows.
  const rows = await plainRows(
    db,
    {
      id: users.id,
      email: users.email,
      name: users.name,
      roles: users.roles,
      active: users.active,
      invitePending: sql<number>`(${users.passwordHash} IS NULL)`,
      createdAt: users.createdAt,
    },
    (f) =>
      db
        .select(f)
        .from(users)
        .where(or(like(users.name, pattern), like(users.email, pattern)))
        .orderBy(asc(users.name), asc(users.id))
        .limit(limit),
    { cache: true },
  )
  return rows.map((u) => publicUserOf(u, Number(u.invitePending) === 1))
}

/** Create a person with a pending invitation and queue the invitation mail, all in one transaction. */
export async function inviteUser(db: Db, actor: User, input: InviteInput, publicUrl: string): Promise<PublicUser> {
  const email = input.email.toLowerCase()
  const refused = input.roles.filter((r) => !grantableRoles(actor).includes(r))
  if (refused.length)
    throw fieldError('roles', `Only an administrator grants ${refused.map((r) => ROLE_LABELS[r]).join(' or ')}`)
  if (await findUserByEmail(db, email))
    throw new ConflictError('This e-mail already has an account', { email: ['This e-mail already has an account'] })
  const token = randomBytes(32).toString('base64url')
  const roles = [...new Set(input.roles)] as Role[]
  const id = await db.transaction(async (tx) => {
    const [{ id }] = await tx
      .insert(users)
      .values({ email, name: input.name, roles, passwordHash: null })
      .$returningId()
    await tx.insert(invitations).values({
      userId: id,
      tokenHash: sha256(token),
      createdBy: actor.id,
      expiresAt: new Date(Date.now() + INVITE_TTL_MS),
    })
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'user',
      entityId: id,
      action: 'create',
      changes: {
        email: { from: null, to: email },
        name: { from: null, to: input.name },
        roles: { from: null, to: roles },
        invitation: { from: null, to: 'sent' },
      },
    })
    await queueMail(
      tx,
      inviteMail({ to: email, name: input.name, inviter: actor.name, link: `${publicUrl}/invite/${token}` }),
    )
    return id
  })
  return toPublicUser((await findUserById(db, id))!)
}

async function activeAdminCount(db: Db): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)` })
    .from(users)
    .where(and(eq(users.active, true), sql`JSON_CONTAINS(${users.roles}, '"admin"')`))
  return Number(row.n)
}

/**
 * Change a person's name, roles or active flag, with an audit row (before → after and the reason).
 * Only an administrator grants or removes the protected roles (admin, safety officer) or
 * deactivates a person holding one; nobody but an administrator changes their own roles; the
 * last active administrator stays. A change of roles or of the active flag needs a reason, and
 * ends the person's sessions (they sign in again with what they may now do).
 */
export async function updateUser(db: Db, actor: User, id: number, input: UpdateUserInput): Promise<PublicUser> {
  const target = await findUserById(db, id)
  if (!target) throw new NotFoundError('No such person')
  const isAdmin = actor.roles.includes('admin')
  const nextRoles = input.roles ? [...new Set(input.roles)] : undefined
  const changedRoles = nextRoles ? ROLES.filter((r) => nextRoles.includes(r) !== target.roles.includes(r)) : []
  if (changedRoles.length && actor.id === id && !isAdmin)
    throw new AppError(
      403,
      'forbidden',
      'You cannot change your own roles: another group lead or an administrator does.',
      { roles: ['You cannot change your own roles'] },
    )
  const refused = changedRoles.filter((r) => !grantableRoles(actor).includes(r))
  if (refused.length) {
    const msg = `Only an administrator grants or removes ${refused.map((r) => ROLE_LABELS[r]).join(' or ')}`
    throw new AppError(403, 'forbidden', `${msg}.`, { roles: [msg] })
  }
  const togglesActive = input.active !== undefined && input.active !== target.active
  if (togglesActive && !isAdmin && target.roles.some((r) => PROTECTED_ROLES.includes(r)))
    throw new ForbiddenError(
      `Only an administrator can ${input.active ? 'reactivate' : 'deactivate'} a person who is ${target.roles
        .filter((r) => PROTECTED_ROLES.includes(r))
        .map((r) => ROLE_LABELS[r])
        .join(' and ')}.`,
    )
  if (actor.id === id && input.active === false) throw fieldError('active', 'You cannot deactivate your own account')
  const losesAdmin =
    target.roles.includes('admin') &&
    target.active &&
    ((nextRoles && !nextRoles.includes('admin')) || input.active === false)
  if (losesAdmin && (await activeAdminCount(db)) <= 1)
    throw fieldError(input.active === false ? 'active' : 'roles', 'Overtone needs at least one active administrator')
  if ((changedRoles.length || togglesActive) && !input.reason)
    throw fieldError(
      'reason',
      changedRoles.length
        ? 'Say why the roles change (kept in the audit trail)'
        : `Say why the account is ${input.active ? 'reactivated' : 'deactivated'}`,
    )
  const next = { name: input.name, roles: nextRoles, active: input.active }
  const changes = diffFields(target as unknown as Record<string, unknown>, next)
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx
        .update(users)
        .set({ ...next, updatedAt: new Date() })
        .where(eq(users.id, id))
      await writeAudit(tx, {
        userId: actor.id,
        entity: 'user',
        entityId: id,
        action: 'update',
        changes,
        reason: input.reason ?? null,
      })
      if (changedRoles.length || input.active === false) await endSessions(tx, id)
    })
  }
  return toPublicUser((await findUserById(db, id))!)
}

/**
 * End sessions of a person (all of them, or all but `keepSessionId`): their rows go from the
 * session table, so every app server sees them signed out on the next request.
 */
export async function endSessions(db: DbOrTx, userId: number, keepSessionId?: string): Promise<number> {
  const who = sql`JSON_VALUE(${sessions.data}, '$.passport.user') = ${String(userId)}`
  const [res] = (await db
    .delete(sessions)
    .where(keepSessionId ? and(who, ne(sessions.sessionId, keepSessionId)) : who)) as unknown as [
    { affectedRows: number },
  ]
  return res.affectedRows
}

/** An administrator ends all of a person's sessions (e.g. a lost laptop), with an audit row. */
export async function endSessionsOf(db: Db, actor: User, id: number, reason: string): Promise<{ ended: number }> {
  const target = await findUserById(db, id)
  if (!target) throw new NotFoundError('No such person')
  const ended = await db.transaction(async (tx) => {
    const n = await endSessions(tx, id)
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'user',
      entityId: id,
      action: 'other',
      changes: { sessions: { from: `${n} open`, to: 'ended' } },
      reason,
    })
    return n
  })
  return { ended }
}

/**
 * An administrator sends a person a one-time link to choose a new password (7 days, stored
 * hashed like an invitation) and ends their sessions; the old password works until the new one is set.
 */
export async function sendPasswordReset(
  db: Db,
  actor: User,
  id: number,
  reason: string,
  publicUrl: string,
): Promise<void> {
  const target = await findUserById(db, id)
  if (!target) throw new NotFoundError('No such person')
  if (!target.active) throw new ConflictError('This account is deactivated: reactivate it first.')
  const token = randomBytes(32).toString('base64url')
  await db.transaction(async (tx) => {
    await tx.insert(invitations).values({
      userId: id,
      tokenHash: sha256(token),
      createdBy: actor.id,
      expiresAt: new Date(Date.now() + INVITE_TTL_MS),
    })
    const n = await endSessions(tx, id)
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'user',
      entityId: id,
      action: 'other',
      changes: { password: { from: '(hidden)', to: 'reset link sent' }, sessions: { from: `${n} open`, to: 'ended' } },
      reason,
    })
    await queueMail(
      tx,
      resetMail({ to: target.email, name: target.name, actor: actor.name, link: `${publicUrl}/invite/${token}` }),
    )
  })
}

async function findOpenInvitation(db: Db, token: string) {
  const [row] = await db
    .select({ inv: invitations, user: users })
    .from(invitations)
    .innerJoin(users, eq(users.id, invitations.userId))
    .where(
      and(eq(invitations.tokenHash, sha256(token)), isNull(invitations.usedAt), gt(invitations.expiresAt, new Date())),
    )
  return row && row.user.active ? row : undefined
}

export async function describeInvitation(db: Db, token: string): Promise<{ email: string; name: string }> {
  const row = await findOpenInvitation(db, token)
  if (!row) throw new NotFoundError('This invitation link is not valid any more. Ask for a new one.')
  return { email: row.user.email, name: row.user.name }
}

/** Set the first password from a one-time link; the link is spent in the same transaction. */
export async function acceptInvitation(db: Db, token: string, password: string): Promise<User> {
  const row = await findOpenInvitation(db, token)
  if (!row) throw new NotFoundError('This invitation link is not valid any more. Ask for a new one.')
  await requireStrongPassword('password', password, [row.user.email, row.user.name])
  const hash = await hashPassword(password)
  await db.transaction(async (tx) => {
    const res = await tx
      .update(invitations)
      .set({ usedAt: new Date() })
      .where(and(eq(invitations.id, row.inv.id), isNull(invitations.usedAt)))
    if ((res[0] as { affectedRows: number }).affectedRows !== 1)
      throw new NotFoundError('This invitation link has just been used.')
    await tx.update(users).set({ passwordHash: hash, updatedAt: new Date() }).where(eq(users.id, row.user.id))
    const was = row.user.passwordHash ? '(hidden)' : '(none)'
    await writeAudit(tx, {
      userId: row.user.id,
      entity: 'user',
      entityId: row.user.id,
      action: 'update',
      changes: {
        password: { from: was, to: row.user.passwordHash ? '(reset from a one-time link)' : '(set from invitation)' },
      },
    })
    await endSessions(tx, row.user.id)
  })
  return (await findUserById(db, row.user.id))!
}

/** Change your own password; every other session of yours ends (the one you are using stays). */
export async function changePassword(
  db: Db,
  user: User,
  current: string,
  next: string,
  keepSessionId?: string,
): Promise<void> {
  if (!(await verifyPassword(current, user.passwordHash)))
    throw fieldError('currentPassword', 'The current password is not right')
  if (current === next) throw fieldError('newPassword', 'Choose a password different from the current one')
  await requireStrongPassword('newPassword', next, [user.email, user.name])
  const hash = await hashPassword(next)
  await db.transaction(async (tx) => {
    await tx.update(users).set({ passwordHash: hash, updatedAt: new Date() }).where(eq(users.id, user.id))
    const ended = await endSessions(tx, user.id, keepSessionId)
    await writeAudit(tx, {
      userId: user.id,
      entity: 'user',
      entityId: user.id,
      action: 'update',
      changes: {
        password: { from: '(hidden)', to: '(changed)' },
        ...(ended ? { sessions: { from: `${ended} other open`, to: 'ended' } } : {}),
      },
    })
  })
}
