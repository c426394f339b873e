import type { Action, Subject } from '../../../shared/abilities'
import type { RouteName } from '../../router/routes'

/** One entry of the left navigation: an area of the lab's work, in plain lab words. */
export interface LabArea {
  name: RouteName
  label: string
  caption: string
  icon: string
  /** Shown only to people allowed to do this. */
  requires?: [Action, Subject]
  isReady: boolean
}

export const WORK_AREAS: LabArea[] = [
  { name: 'home', label: 'Overview', caption: 'Your day at a glance', icon: 'space_dashboard', isReady: true },
  {
    name: 'inventory',
    label: 'Sample store',
    caption: 'Wafers, chips, arrays, materials',
    icon: 'mdi-chip',
    isReady: true,
  },
  {
    name: 'fabrication',
    label: 'Cleanroom work',
    caption: 'Process steps per chip',
    icon: 'mdi-layers-triple-outline',
    isReady: true,
  },
  {
    name: 'measurements',
    label: 'Optical measurements',
    caption: 'Sessions, data, predicted vs observed',
    icon: 'mdi-chart-bell-curve',
    isReady: true,
  },
  {
    name: 'laser-safety',
    label: 'Laser safety',
    caption: 'Setup register and sign-off',
    icon: 'mdi-safety-goggles',
    isReady: true,
  },
  {
    name: 'labels',
    label: 'Labels & scanning',
    caption: 'Print labels, scan QR codes',
    icon: 'mdi-qrcode-scan',
    isReady: true,
  },
  {
    name: 'channels',
    label: 'Harmonic channels',
    caption: 'Calculator and fabrication planner',
    icon: 'mdi-sine-wave',
    requires: ['read', 'Channels'],
    isReady: true,
  },
]

export const ADMIN_AREAS: LabArea[] = [
  {
    name: 'people',
    label: 'People',
    caption: 'Invite, roles, access',
    icon: 'group',
    requires: ['read', 'User'],
    isReady: true,
  },
  {
    name: 'mail-outbox',
    label: 'Mail outbox',
    caption: 'Mail the server has sent',
    icon: 'forward_to_inbox',
    requires: ['read', 'Mail'],
    isReady: true,
  },
  {
    name: 'audit-search',
    label: 'Audit trail',
    caption: 'Who changed what, when and why',
    icon: 'mdi-history',
    requires: ['read', 'Audit'],
    isReady: true,
  },
  {
    name: 'excel',
    label: 'Export & import',
    caption: 'Inventory to Excel, legacy sheets in',
    icon: 'mdi-file-excel-outline',
    requires: ['export', 'Inventory'],
    isReady: true,
  },
]
