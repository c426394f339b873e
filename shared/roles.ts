/** The roles a person can hold in Overtone; a person may hold several. */
export const ROLES = ['admin', 'group_lead', 'fab_technician', 'optics_staff', 'safety_officer'] as const
export type Role = (typeof ROLES)[number]

/** Plain-language names shown in the UI. */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  group_lead: 'Group lead',
  fab_technician: 'Fab technician',
  optics_staff: 'Optics staff',
  safety_officer: 'Safety officer',
}

/** Roles only an administrator grants or removes (they decide who manages the app and who signs off lasers). */
export const PROTECTED_ROLES: readonly Role[] = ['admin', 'safety_officer']

/**
 * The roles `actor` may grant or remove on someone else: an administrator all of them, a group
 * lead every role but the protected ones, anyone else none. Nobody but an administrator changes
 * their own roles.
 */
export function grantableRoles(actor: { roles: readonly Role[] } | null | undefined): Role[] {
  if (!actor) return []
  if (actor.roles.includes('admin')) return [...ROLES]
  if (actor.roles.includes('group_lead')) return ROLES.filter((r) => !PROTECTED_ROLES.includes(r))
  return []
}
