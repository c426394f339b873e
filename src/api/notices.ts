import type { DigestResult, MailQueueRow, Preferences, PreferencesInput } from '../../shared/schemas/notices'
import { http } from './http'

export const fetchPreferences = () => http.get<Preferences>('/auth/preferences')
export const savePreferences = (input: PreferencesInput) => http.patch<Preferences>('/auth/preferences', input)
export const listMailQueue = () => http.get<{ queue: MailQueueRow[] }>('/mail/queue')
export const sendDigestNow = () => http.post<DigestResult>('/mail/digest', {})
