import { formatNumber } from '../../../shared/format'
import { formatDateTime } from '../../utils/format'

/** Plain words for the Overview's dates, days and sizes. */
export const when = (iso: string) => formatDateTime(iso)

/** "expires 2027-01-10 (in 37 days)", "expired 2026-11-30 (4 days ago)". */
export function expiryText(expiresOn: string | null, daysLeft: number | null): string {
  if (!expiresOn || daysLeft === null) return 'no expiry recorded'
  if (daysLeft < 0) return `expired ${expiresOn} (${-daysLeft} day${daysLeft === -1 ? '' : 's'} ago)`
  if (daysLeft === 0) return `expires ${expiresOn} (today)`
  return `expires ${expiresOn} (in ${daysLeft} day${daysLeft === 1 ? '' : 's'})`
}

/** Bytes with decimal prefixes (1 kB = 1000 B, as disk makers count): "12.4 MB". */
export function bytesText(n: number | null): string {
  if (n === null) return '—'
  const units = ['B', 'kB', 'MB', 'GB', 'TB', 'PB']
  let i = 0
  let v = n
  while (v >= 1000 && i < units.length - 1) {
    v /= 1000
    i++
  }
  return `${formatNumber(v, 3)} ${units[i]}`
}

export const STEP_KINDS: Record<string, string> = {
  resist: 'Resist',
  exposure: 'Exposure',
  etch: 'Etch',
  deposition: 'Deposition',
  lift_off: 'Lift-off',
  inspection: 'Inspection',
  other: 'Other step',
}

export const SIGNOFF_WORDS: Record<string, string> = {
  draft: 'draft',
  waiting: 'waiting for sign-off',
  approved: 'signed off',
  expired: 'sign-off expired',
  rejected: 'rejected',
  revoked: 'sign-off revoked',
  voided: 'sign-off voided by a hazard change',
}

/** "SHG at 1550 nm", "THG at 1560 nm". */
export function harmonicText(order: number, wavelengthNm: number): string {
  const name = order === 2 ? 'SHG' : order === 3 ? 'THG' : `harmonic ${order}`
  return `${name} at ${formatNumber(wavelengthNm, 5)} nm`
}

/** "A-0001-01-B2, A-0001-01-B3 and 4 more". */
export function arraysText(codes: string[]): string {
  if (!codes.length) return 'no arrays'
  return codes.length <= 2 ? codes.join(', ') : `${codes.slice(0, 2).join(', ')} and ${codes.length - 2} more`
}
