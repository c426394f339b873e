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
  { name: 'inventory', label: 'Sample store', caption: 'Wafers, chips, arrays', icon: 'mdi-chip', isReady: false },
  { name: 'fabrication', label: 'Cleanroom work', caption: 'Process steps per wafer', icon: 'mdi-layers-triple-outline', isReady: false },
  { name: 'measurements', label: 'Optical measurements', caption: 'Laser sessions and data', icon: 'mdi-chart-bell-curve', isReady: false },
  { name: 'laser-safety', label: 'Laser safety', caption: 'Setups and sign-off', icon: 'mdi-safety-goggles', isReady: false },
  { name: 'labels', label: 'Labels & scanning', caption: 'Print and scan tags', icon: 'mdi-qrcode-scan', isReady: false },
  { name: 'channels', label: 'Harmonic channels', caption: 'Which orders a structure allows', icon: 'mdi-sine-wave', requires: ['read', 'Channels'], isReady: false },
]

export const ADMIN_AREAS: LabArea[] = [
  { name: 'people', label: 'People', caption: 'Invite, roles, access', icon: 'group', requires: ['read', 'User'], isReady: true },
  { name: 'mail-outbox', label: 'Mail outbox', caption: 'Mail the server has sent', icon: 'forward_to_inbox', requires: ['read', 'Mail'], isReady: true },
]
