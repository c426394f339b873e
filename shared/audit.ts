import { z } from 'zod'
import type { Subject } from './abilities'
import { idValue, safeString } from './schemas/common'

/**
 * The audit trail as the API shows it: record history (`GET /api/audit/records/:entity/:id`) and
 * the audit search for group leads (`GET /api/audit/search`). Shared by the server and the client.
 */

/** Record kinds in the audit log (the `entity` column) → the CASL subject whose `read` opens their history. */
export const AUDIT_ENTITIES = {
  material: 'Material',
  location: 'Location',
  wafer: 'Wafer',
  chip: 'Chip',
  array: 'Array',
  fab_step: 'FabStep',
  session: 'Session',
  laser_setup: 'LaserSetup',
  file: 'File',
  label_job: 'Label',
  user: 'User',
} as const satisfies Record<string, Subject>
export type AuditEntity = keyof typeof AUDIT_ENTITIES
export const AUDIT_ENTITY_NAMES = Object.keys(AUDIT_ENTITIES) as AuditEntity[]

/** Plain words for each record kind. */
export const AUDIT_ENTITY_LABELS: Record<AuditEntity, string> = {
  material: 'Material',
  location: 'Location',
  wafer: 'Wafer',
  chip: 'Chip',
  array: 'Array',
  fab_step: 'Fab step',
  session: 'Session',
  laser_setup: 'Laser setup',
  file: 'File',
  label_job: 'Label job',
  user: 'Person',
}

export const AUDIT_ACTIONS = ['create', 'update', 'retire', 'signoff', 'revoke', 'login', 'other'] as const
export type AuditAction = (typeof AUDIT_ACTIONS)[number]

/** Client path of a record's page, or null when the kind has none. */
export function auditRecordPath(entity: string, id: number): string | null {
  switch (entity) {
    case 'material':
      return `/materials/${id}`
    case 'location':
      return `/locations/${id}`
    case 'wafer':
      return `/wafers/${id}`
    case 'chip':
      return `/chips/${id}`
    case 'array':
      return `/arrays/${id}`
    case 'session':
      return `/sessions/${id}`
    case 'laser_setup':
      return `/laser-setups/${id}`
    case 'user':
      return `/people?focus=${id}`
    default:
      return null
  }
}

/** One audit row: who, when, what (field → before/after) and why. */
export interface AuditRow {
  id: number
  /** Server clock, ISO (UTC). */
  at: string
  user: { id: number; name: string } | null
  entity: string
  entityId: number
  /** The record's code (W-0001 …) or name, when it has one. */
  code: string | null
  action: AuditAction
  changes: Record<string, { from: unknown; to: unknown }>
  reason: string | null
}

const isoDate = z
  .string()
  .trim()
  .refine((s) => !Number.isNaN(Date.parse(s)), 'Enter a date (YYYY-MM-DD) or a date and time')

/** Filters, sort and paging of the audit search. Dates are UTC: a bare `to` date includes that whole day. */
export const auditSearchSchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
  sort: z.enum(['at', 'entity', 'action', 'user']).default('at'),
  dir: z.enum(['asc', 'desc']).default('desc'),
  userId: idValue().optional(),
  entity: z.enum(AUDIT_ENTITY_NAMES as [AuditEntity, ...AuditEntity[]], { error: 'Pick a record kind' }).optional(),
  entityId: idValue().optional(),
  /** A record code (W-0001, C-0001-01, A-…, L-…, LS-…, S-…) or a material name. */
  code: safeString()
    .max(80)
    .optional()
    .transform((v) => v || undefined),
  action: z.enum(AUDIT_ACTIONS, { error: 'Pick an action' }).optional(),
  from: isoDate.optional(),
  to: isoDate.optional(),
  /** Text in the reason or in a changed field's name. */
  q: z
    .string()
    .trim()
    .max(100)
    .optional()
    .transform((v) => v || undefined),
})
export type AuditSearchQuery = z.infer<typeof auditSearchSchema>
