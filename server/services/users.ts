import { createHash, randomBytes } from 'node:crypto'
import { and, asc, eq, gt, isNull, like, or, sql } from 'drizzle-orm'
import { users, invitations, type User } from '../db/schema/index'
import type { Db } from '../db/client'
import type { PublicUser } from '../../shared/types'
import type { Role } from '../../shared/roles'
import type { InviteInput, UpdateUserInput } from '../../shared/schemas/auth'
import { hashPassword, verifyPassword } from '../auth/passwords'
import { writeAudit, diffFields } from './audit'
import { queueMail } from './mail'
import { ConflictError, ForbiddenError, NotFoundError, fieldError } from '../errors'
import { inviteMail } from './mail-templates'
import { plainRows } from '../db/plain-rows'

/** How long an invitation link stays valid. */
export const INVITE_TTL_MS = 7 * 24 * 3600 * 1000

export function toPublicUser(u: User): PublicUser {
  return publicUserOf(u, u.passwordHash === null)
}

/** The public face of a person's columns (no password hash: only whether one is set). */
function publicUserOf(u: Pick<User, 'id' | 'email' | 'name' | 'roles' | 'active' | 'createdAt'>, invitePending: boolean): PublicUser {
  return { id: u.id, email: u.email, name: u.name, roles: [...u.roles], active: u.active, invitePending, createdAt: u.createdAt.toISOString() }
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
  const rows = await plainRows(db, { id: users.id, email: users.email, name: users.name, roles: users.roles, active: users.active, invitePending: sql<number>`(${users.passwordHash} IS NULL)`, createdAt: users.createdAt },
    (f) => db.select(f).from(users).where(or(like(users.name, pattern), like(users.email, pattern))).orderBy(asc(users.name), asc(users.id)).limit(limit), { cache: true })
  return rows.map((u) => publicUserOf(u, Number(u.invitePending) === 1))
}

/** Create a person with a pending invitation and queue the invitation mail, all in one transaction. */
export async function inviteUser(db: Db, actor: User, input: InviteInput, publicUrl: string): Promise<PublicUser> {
  const email = input.email.toLowerCase()
  if (input.roles.includes('admin') && !actor.roles.includes('admin')) {
    throw fieldError('roles', 'Only an administrator can grant the administrator role')
  }
  if (await findUserByEmail(db, email)) throw new ConflictError('This e-mail already has an account', { email: ['This e-mail already has an account'] })
  const token = randomBytes(32).toString('base64url')
  const roles = [...new Set(input.roles)] as Role[]
  const id = await db.transaction(async (tx) => {
    const [{ id }] = await tx.insert(users).values({ email, name: input.name, roles, passwordHash: null }).$returningId()
    await tx.insert(invitations).values({ userId: id, tokenHash: sha256(token), createdBy: actor.id, expiresAt: new Date(Date.now() + INVITE_TTL_MS) })
    await writeAudit(tx, { userId: actor.id, entity: 'user', entityId: id, action: 'create', changes: { email: { from: null, to: email }, name: { from: null, to: input.name }, roles: { from: null, to: roles } } })
    await queueMail(tx, inviteMail({ to: email, name: input.name, inviter: actor.name, link: `${publicUrl}/invite/${token}` }))
    return id
  })
  return toPublicUser((await findUserById(db, id))!)
}

async function activeAdminCount(db: Db): Promise<number> {
  const [row] = await db.select({ n: sql<number>`count(*)` }).from(users)
    .where(and(eq(users.active, true), sql`JSON_CONTAINS(${users.roles}, '"admin"')`))
  return Number(row.n)
}

/** Change a person's name, roles or active flag, with an audit row. Guards the last administrator. */
export async function updateUser(db: Db, actor: User, id: number, input: UpdateUserInput): Promise<PublicUser> {
  const target = await findUserById(db, id)
  if (!target) throw new NotFoundError('No such person')
  const touchesAdmin = input.roles && (input.roles.includes('admin') !== target.roles.includes('admin'))
  if (touchesAdmin && !actor.roles.includes('admin')) throw new ForbiddenError('Only an administrator can grant or remove the administrator role.')
  if (target.roles.includes('admin') && !actor.roles.includes('admin') && input.active === false) {
    throw new ForbiddenError('Only an administrator can deactivate an administrator.')
  }
  if (actor.id === id && input.active === false) throw fieldError('active', 'You cannot deactivate your own account')
  const losesAdmin = target.roles.includes('admin') && target.active && ((input.roles && !input.roles.includes('admin')) || input.active === false)
  if (losesAdmin && (await activeAdminCount(db)) <= 1) throw fieldError(input.active === false ? 'active' : 'roles', 'Overtone needs at least one active administrator')
  const next = { name: input.name, roles: input.roles ? [...new Set(input.roles)] : undefined, active: input.active }
  const changes = diffFields(target as unknown as Record<string, unknown>, next)
  if (Object.keys(changes).length) {
    await db.transaction(async (tx) => {
      await tx.update(users).set({ ...next, updatedAt: new Date() }).where(eq(users.id, id))
      await writeAudit(tx, { userId: actor.id, entity: 'user', entityId: id, action: 'update', changes })
    })
  }
  return toPublicUser((await findUserById(db, id))!)
}

async function findOpenInvitation(db: Db, token: string) {
  const [row] = await db.select({ inv: invitations, user: users }).from(invitations)
    .innerJoin(users, eq(users.id, invitations.userId))
    .where(and(eq(invitations.tokenHash, sha256(token)), isNull(invitations.usedAt), gt(invitations.expiresAt, new Date())))
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
  const hash = await hashPassword(password)
  await db.transaction(async (tx) => {
    const res = await tx.update(invitations).set({ usedAt: new Date() }).where(and(eq(invitations.id, row.inv.id), isNull(invitations.usedAt)))
    if ((res[0] as { affectedRows: number }).affectedRows !== 1) throw new NotFoundError('This invitation link has just been used.')
    await tx.update(users).set({ passwordHash: hash, updatedAt: new Date() }).where(eq(users.id, row.user.id))
    await writeAudit(tx, { userId: row.user.id, entity: 'user', entityId: row.user.id, action: 'update', changes: { password: { from: '(none)', to: '(set from invitation)' } } })
  })
  return (await findUserById(db, row.user.id))!
}

export async function changePassword(db: Db, user: User, current: string, next: string): Promise<void> {
  if (!(await verifyPassword(current, user.passwordHash))) throw fieldError('currentPassword', 'The current password is not right')
  if (current === next) throw fieldError('newPassword', 'Choose a password different from the current one')
  const hash = await hashPassword(next)
  await db.transaction(async (tx) => {
    await tx.update(users).set({ passwordHash: hash, updatedAt: new Date() }).where(eq(users.id, user.id))
    await writeAudit(tx, { userId: user.id, entity: 'user', entityId: user.id, action: 'update', changes: { password: { from: '(hidden)', to: '(changed)' } } })
  })
}
