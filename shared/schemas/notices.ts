import { z } from 'zod'

/** A person's own notice preferences (My account). */
export const preferencesSchema = z.object({
  notifyByMail: z.boolean({ error: 'Say yes or no' }),
})
export type PreferencesInput = z.infer<typeof preferencesSchema>
export interface Preferences {
  notifyByMail: boolean
}

/** What "send the digest now" answers. */
export interface DigestResult {
  isSent: boolean
  recipients: number
  since: string
  until: string
}

/** One row of the outgoing mail queue (Mail outbox → Queue). */
export interface MailQueueRow {
  id: number
  to: string
  subject: string
  status: 'queued' | 'sent' | 'failed'
  attempts: number
  lastError: string | null
  createdAt: string
  sentAt: string | null
}
