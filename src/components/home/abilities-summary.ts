import type { Action, AppAbility, Subject } from '../../../shared/abilities'

/** Plain sentences for "what you can do here", each tied to the permission that allows it. */
const CAPABILITIES: { can: [Action, Subject]; text: string; isReady: boolean }[] = [
  { can: ['read', 'Wafer'], text: 'Look up wafers, chips and nanostructure arrays', isReady: false },
  { can: ['create', 'FabStep'], text: 'Record cleanroom process steps', isReady: false },
  { can: ['create', 'Session'], text: 'Log laser measurement sessions and their data', isReady: false },
  { can: ['signoff', 'LaserSetup'], text: 'Review and sign off laser setups', isReady: false },
  { can: ['create', 'Label'], text: 'Print and scan sample labels', isReady: false },
  { can: ['export', 'Inventory'], text: 'Export and import the sample inventory', isReady: false },
  { can: ['read', 'Channels'], text: 'Work out which harmonic orders a structure allows', isReady: false },
  { can: ['invite', 'User'], text: 'Invite people and give them roles', isReady: true },
  { can: ['read', 'Mail'], text: 'Read the mail the server has sent', isReady: true },
]

export function summariseAbilities(ability: AppAbility): { text: string; isReady: boolean }[] {
  return CAPABILITIES.filter((c) => ability.can(...c.can)).map(({ text, isReady }) => ({ text, isReady }))
}
