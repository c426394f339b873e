import { describe, it, expect } from 'vitest'
import { defineAbilityFor } from '../../shared/abilities'

describe('abilities', () => {
  it('gives nothing to nobody or to a deactivated person', () => {
    expect(defineAbilityFor(null).can('read', 'Wafer')).toBe(false)
    expect(defineAbilityFor({ roles: ['admin'], active: false }).can('read', 'Wafer')).toBe(false)
  })
  it('lets every role read lab records but write only its own', () => {
    const fab = defineAbilityFor({ roles: ['fab_technician'] })
    expect(fab.can('read', 'Session')).toBe(true)
    expect(fab.can('create', 'Wafer')).toBe(true)
    expect(fab.can('create', 'Session')).toBe(false)
    const optics = defineAbilityFor({ roles: ['optics_staff'] })
    expect(optics.can('create', 'Session')).toBe(true)
    expect(optics.can('create', 'Wafer')).toBe(false)
    expect(optics.can('signoff', 'LaserSetup')).toBe(false)
    expect(defineAbilityFor({ roles: ['safety_officer'] }).can('signoff', 'LaserSetup')).toBe(true)
  })
  it('combines the abilities of several roles', () => {
    const both = defineAbilityFor({ roles: ['fab_technician', 'optics_staff'] })
    expect(both.can('create', 'Wafer') && both.can('create', 'Session')).toBe(true)
  })
  it('lets group leads manage people and export, admins do everything', () => {
    const lead = defineAbilityFor({ roles: ['group_lead'] })
    expect(lead.can('invite', 'User')).toBe(true)
    expect(lead.can('export', 'Inventory')).toBe(true)
    expect(lead.can('read', 'Mail')).toBe(false)
    expect(defineAbilityFor({ roles: ['admin'] }).can('read', 'Mail')).toBe(true)
  })
})
