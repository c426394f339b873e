import { describe, it, expect } from 'vitest'
import { z } from 'zod'
import { zodRule } from '../../../src/composables/useFieldErrors'
import { diceSchema, laserSetupSchema, materialSchema } from '../../../shared/schemas/records'

describe('zodRule (an input rule from the shared schema)', () => {
  it('a blank required number input is "Required", not judged as 0', () => {
    expect(zodRule(diceSchema.shape.widthMm)('')).toBe('Required')
    expect(zodRule(diceSchema.shape.count)(null)).toBe('Required')
    expect(zodRule(diceSchema.shape.widthMm)(500)).toBe('At most 300 mm')
    expect(zodRule(diceSchema.shape.widthMm)(5)).toBe(true)
  })

  it('a blank optional input passes; a blank required text keeps the schema word', () => {
    expect(zodRule(laserSetupSchema.shape.beamDiameterMm)('')).toBe(true)
    expect(zodRule(materialSchema.shape.notes)('')).toBe(true)
    expect(zodRule(materialSchema.shape.name)('')).toBe('Enter a name')
    expect(zodRule(z.string())('')).toBe(true)
    expect(zodRule(z.string().max(3))('abcd')).toBe('At most 3 characters')
    expect(zodRule(z.number().max(1e6), 'valuePmV')(2e6)).toBe('At most 1\u00a0000\u00a0000 pm/V')
    expect(zodRule(z.number().max(1e6), 'valuePmV')('')).toBe('Required')
  })
})
