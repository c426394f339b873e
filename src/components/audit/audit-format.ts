import type { AuditAction } from '../../../shared/audit'
import { AUDIT_ENTITY_LABELS, type AuditEntity } from '../../../shared/audit'

/** Plain words and colours for audit actions and field names. */
export const ACTION_LABELS: Record<AuditAction, string> = {
  create: 'Created',
  update: 'Changed',
  retire: 'Retired',
  signoff: 'Signed off',
  revoke: 'Sign-off revoked',
  login: 'Signed in',
  other: 'Other',
}
export const ACTION_COLORS: Record<AuditAction, string> = {
  create: 'positive',
  update: 'primary',
  retire: 'negative',
  signoff: 'teal',
  revoke: 'orange-9',
  login: 'blue-grey',
  other: 'grey-7',
}
export const ACTION_ICONS: Record<AuditAction, string> = {
  create: 'add_circle',
  update: 'edit',
  retire: 'archive',
  signoff: 'verified',
  revoke: 'gpp_bad',
  login: 'login',
  other: 'more_horiz',
}

const UNITS: [RegExp, string][] = [
  [/Nm$/, ' (nm)'],
  [/Um$/, ' (µm)'],
  [/Mm$/, ' (mm)'],
  [/Deg$/, ' (°)'],
  [/Hz$/, ' (Hz)'],
  [/Mw$/, ' (mW)'],
  [/Fs$/, ' (fs)'],
  [/PmV$/, ' (pm/V)'],
  [/Ev$/, ' (eV)'],
  [/S$/, ' (s)'],
]

/** `thicknessUm` → "Thickness (µm)", `materialId` → "Material", `retiredAt` → "Retired at". */
export function fieldLabel(field: string): string {
  let unit = ''
  let name = field
  for (const [re, u] of UNITS)
    if (re.test(name) && name.length > 3) {
      unit = u
      name = name.replace(re, '')
      break
    }
  name = name
    .replace(/Id$/, '')
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/_/g, ' ')
    .toLowerCase()
  return name.charAt(0).toUpperCase() + name.slice(1) + unit
}

export const entityLabel = (entity: string): string => AUDIT_ENTITY_LABELS[entity as AuditEntity] ?? entity

/** A value as readable text: JSON pretty-printed, strings as they are. */
export function valueText(value: unknown): string {
  if (value === undefined || value === null) return ''
  if (typeof value === 'string') return value
  if (typeof value === 'number' || typeof value === 'boolean') return String(value)
  return JSON.stringify(value, null, 2)
}
