import type { SignoffState, SignoffSummary } from '../../../shared/records'

/** Chip colours and words for sign-off states. */
export const SIGNOFF_LOOK: Record<SignoffState, { color: string; icon: string; label: string }> = {
  draft: { color: 'blue-grey-6', icon: 'edit_note', label: 'Draft, not submitted' },
  waiting: { color: 'grey-7', icon: 'hourglass_empty', label: 'Waiting for sign-off' },
  approved: { color: 'positive', icon: 'verified', label: 'Signed off' },
  expired: { color: 'negative', icon: 'event_busy', label: 'Sign-off expired' },
  rejected: { color: 'negative', icon: 'block', label: 'Rejected' },
  revoked: { color: 'negative', icon: 'gpp_bad', label: 'Sign-off revoked' },
  voided: { color: 'orange-9', icon: 'published_with_changes', label: 'Voided by a hazard change' },
}

/** Why a setup cannot carry sessions (null when it can). */
export function signoffBlocker(s: SignoffSummary): string | null {
  if (s.isValid) return null
  if (s.state === 'expired') return `sign-off expired on ${s.expiresOn}`
  return SIGNOFF_LOOK[s.state].label.toLowerCase()
}

/** Today in UTC plus n days, as YYYY-MM-DD. */
export const isoDay = (n = 0) => new Date(Date.now() + n * 86400_000).toISOString().slice(0, 10)
