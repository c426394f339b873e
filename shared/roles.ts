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
