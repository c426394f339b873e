import type { SignoffState } from './records'

/**
 * The Overview (home page): one panel per role the signed-in person holds, each a few bounded
 * worklists (at most `OVERVIEW_LIMIT` items, with the full count in `total`). Answered by
 * `GET /api/overview`; a panel is left out when the person does not hold its role or their
 * abilities do not allow what it lists.
 */
export const OVERVIEW_LIMIT = 10
/** "Recent" fab steps and the group's activity: the last 7 days. */
export const RECENT_DAYS = 7
/** Sign-offs that expire within this many days are "expiring". */
export const EXPIRING_DAYS = 30
/** Sessions checked for contradiction flags: performed within this many days, at most FLAG_SCAN_MAX of them. */
export const FLAG_WINDOW_DAYS = 90
export const FLAG_SCAN_MAX = 300

export interface WorkList<T> {
  items: T[]
  total: number
}

export interface ChipItem {
  id: number
  code: string
  waferCode: string
  holder: string | null
  location: string | null
  updatedAt: string
}
export interface FabStepItem {
  id: number
  chipId: number
  chipCode: string
  kind: string
  operator: string
  performedAt: string
}
export interface UnlabelledItem {
  kind: 'wafer' | 'chip'
  id: number
  code: string
  createdAt: string
}

export interface FabPanel {
  inProcess: WorkList<ChipItem>
  /** Steps performed in the last RECENT_DAYS days, newest first. */
  recentSteps: WorkList<FabStepItem>
  /** Wafers and chips in use whose code is in no recorded print job (a "Print now" on the print page). */
  unlabelled: WorkList<UnlabelledItem>
}

export interface SessionItem {
  id: number
  code: string
  performedAt: string
  operator: string
  setupCode: string
  harmonicOrder: number
  wavelengthNm: number
  arrayCodes: string[]
}
export interface FlaggedSessionItem extends SessionItem {
  flagCount: number
  firstFlag: string
}
export interface ArrayItem {
  id: number
  code: string
  chipCode: string
  shape: string
  createdAt: string
}
export interface SetupItem {
  id: number
  code: string
  name: string
  state: SignoffState
  expiresOn: string | null
  submittedAt: string | null
  daysLeft: number | null
}

export interface OpticsPanel {
  mySessions: WorkList<SessionItem>
  /** Sessions (anyone's) of the last FLAG_WINDOW_DAYS days whose observations contradict the engine. */
  flagged: WorkList<FlaggedSessionItem> & { scanned: number; isCapped: boolean }
  neverMeasured: WorkList<ArrayItem>
  /** Signed-off setups sessions may be logged on, soonest expiry first. */
  usableSetups: WorkList<SetupItem>
}

export interface LapsedSessionItem extends SessionItem {
  setupId: number
  setupState: SignoffState
  setupExpiresOn: string | null
}

export interface SafetyPanel {
  waiting: WorkList<SetupItem>
  expiring: WorkList<SetupItem>
  expired: WorkList<SetupItem>
  /** Sessions logged on setups whose sign-off is no longer valid (expired, revoked, voided, rejected). */
  lapsedSessions: WorkList<LapsedSessionItem>
}

export interface ActivityItem {
  id: number
  at: string
  user: string | null
  action: string
  entity: string
  entityId: number
  code: string | null
  reason: string | null
}

export interface LeadPanel {
  counts: {
    wafers: number
    chips: number
    chipsInProcess: number
    arrays: number
    sessions: number
    locations: number
    laserSetups: number
  }
  /** Audit rows of the last RECENT_DAYS days, newest first, with counts per action. */
  activity: WorkList<ActivityItem> & { from: string; byAction: Record<string, number> }
  canExport: boolean
}

export interface InvitationItem {
  userId: number
  name: string
  email: string
  invitedAt: string
  expiresAt: string
}
export interface MailItem {
  id: number
  to: string
  subject: string
  status: 'queued' | 'failed'
  attempts: number
  lastError: string | null
  createdAt: string
}

export interface AdminPanel {
  /** Invitations not yet accepted whose link is still valid; `expired` counts those whose link ran out. */
  invitations: WorkList<InvitationItem> & { expired: number }
  /** Mail not delivered: still queued (waiting or retrying) or given up; `failed` counts the latter. */
  undelivered: WorkList<MailItem> & { failed: number }
  storage: { kind: 'local' | 's3'; files: number; bytes: number; freeBytes: number | null }
}

export interface Overview {
  panels: { fab?: FabPanel; optics?: OpticsPanel; safety?: SafetyPanel; lead?: LeadPanel; admin?: AdminPanel }
  generatedAt: string
}
