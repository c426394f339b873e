import type { Role } from './roles'

/** A person as the API returns them (never with the password hash). */
export interface PublicUser {
  id: number
  email: string
  name: string
  roles: Role[]
  active: boolean
  invitePending: boolean
  createdAt: string
}

/** Error body of every 4xx/5xx JSON answer. `fields` maps a dotted field path to its messages. */
export interface ApiErrorBody {
  error: string
  message: string
  fields?: Record<string, string[]>
  requestId?: string
}

export interface MailSummary {
  id: number
  from: string
  to: string
  subject: string
  receivedAt: string
}
export interface MailMessage extends MailSummary {
  text: string
  html: string | null
}

export interface SearchHit {
  kind: 'person' | 'wafer' | 'chip' | 'array' | 'session' | 'material' | 'location' | 'laser_setup'
  id: number
  label: string
  detail: string
  /** Client route path to open the record. */
  to: string
}

export interface HealthStatus {
  status: 'ok' | 'degraded'
  database: 'up' | 'down'
  mail: 'up' | 'down'
  /** Can this server write to the file storage (uploads, exports)? */
  storage: 'up' | 'down'
  /** What is wrong, in words, when something is down. */
  message?: string
  uptimeS: number
  version: string
}
