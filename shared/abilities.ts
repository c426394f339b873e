import { AbilityBuilder, createMongoAbility, subject, type ForcedSubject, type MongoAbility } from '@casl/ability'
import type { Role } from './roles'

/**
 * Permissions, defined once and used by the server (403 on forbidden routes) and the client
 * (hide or disable what a person may not do). Subjects are record kinds; `all` matches any.
 */
export type Action = 'read' | 'create' | 'update' | 'retire' | 'manage' | 'invite' | 'signoff' | 'export' | 'import'
export type Subject =
  | 'User'
  | 'Mail'
  | 'Audit'
  | 'Inventory'
  | 'Channels'
  | 'Material'
  | 'Wafer'
  | 'Chip'
  | 'Array'
  | 'FabStep'
  | 'Location'
  | 'Label'
  | 'Session'
  | 'File'
  | 'LaserSetup'
  | 'all'
/** A file as the subject of a rule with conditions (retiring is decided on who uploaded it). */
type FileSubject = ForcedSubject<'File'> & { uploadedById: number }
export type AppAbility = MongoAbility<[Action, Subject | FileSubject]>

/** A stored file as a subject: `ability.can('retire', fileSubject(f))`. */
export const fileSubject = (f: { uploadedBy: { id: number } }): FileSubject =>
  subject('File', { uploadedById: f.uploadedBy.id })

/** Lab records every signed-in person may read. */
const LAB_RECORDS: Subject[] = [
  'Material',
  'Wafer',
  'Chip',
  'Array',
  'FabStep',
  'Location',
  'Label',
  'Session',
  'File',
  'LaserSetup',
]

/** Build the ability of a person from their roles (no roles, or no person: nothing at all). */
export function defineAbilityFor(
  user: { id?: number; roles: readonly Role[]; active?: boolean } | null | undefined,
): AppAbility {
  const { can, cannot, build } = new AbilityBuilder<AppAbility>(createMongoAbility)
  if (!user || user.active === false) return build()
  const roles = new Set(user.roles)

  can('read', LAB_RECORDS)
  can('read', 'Channels')

  if (roles.has('admin')) {
    can('manage', 'all')
    // The administrator role alone never signs off a laser setup: only a safety officer does.
    cannot('signoff', 'LaserSetup')
  }
  if (roles.has('group_lead')) {
    can(['read', 'invite', 'update'], 'User')
    can(['read'], 'Audit')
    can(['export', 'import', 'read'], 'Inventory')
    // A group lead may retire any file (the administrator may anyway); others only their own.
    can('retire', 'File')
    // Group leads run lasers too: they describe setups and submit them for sign-off.
    can(['create', 'update'], 'LaserSetup')
  }
  if (roles.has('fab_technician') || roles.has('optics_staff')) {
    can('create', 'File')
    // Only a file's uploader retires it (checked against the file: `fileSubject(f)`).
    if (user.id !== undefined) can('retire', 'File', { uploadedById: user.id })
  }
  if (roles.has('fab_technician')) {
    can(['create', 'update', 'retire'], ['Material', 'Wafer', 'Chip', 'Array', 'FabStep', 'Location', 'Label'])
  }
  if (roles.has('optics_staff')) {
    can(['create', 'update'], 'Session')
    // The people who run a laser describe their setups and submit them; they never sign them off.
    can(['create', 'update'], 'LaserSetup')
  }
  if (roles.has('safety_officer')) {
    can(['create', 'update', 'retire', 'signoff'], 'LaserSetup')
  }
  return build()
}
