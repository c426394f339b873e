import { describe, it, expect } from 'vitest'
import { pumpProjections, pumpParity, describeCircularHandedness, parsePump, EngineError } from '../../../shared/engine'

// Pump conventions: docs/physics.md §1 (m on +z, e^{−imα} under rotation by α).
describe('pump projections and parity', () => {
  it('projections of each pump kind', () => {
    expect(pumpProjections({ type: 'circular', m: -1 })).toEqual([-1])
    expect(pumpProjections({ type: 'linear', angle: 30 })).toEqual([-1, 1])
    expect(pumpProjections({ type: 'elliptical' })).toEqual([-1, 1])
    expect(pumpProjections({ type: 'vortex', spin: 1, charge: 2 })).toEqual([3])
    expect(pumpProjections({ type: 'radial' })).toEqual([0])
    expect(pumpProjections({ type: 'azimuthal' })).toEqual([0])
    expect(pumpProjections({ type: 'explicit', m: [2, -1, 2] })).toEqual([-1, 2])
  })

  it('linear at θ: even at ψ = θ (mod 180), odd at θ + 90, none elsewhere', () => {
    const p = { type: 'linear', angle: 30 } as const
    expect(pumpParity(p, 30)).toBe(1)
    expect(pumpParity(p, 210)).toBe(1)
    expect(pumpParity(p, 120)).toBe(-1)
    expect(pumpParity(p, -60)).toBe(-1)
    expect(pumpParity(p, 45)).toBe(0)
  })

  it('radial even and azimuthal odd everywhere; circular, vortex, elliptical none; explicit at its mirror only', () => {
    expect(pumpParity({ type: 'radial' }, 17)).toBe(1)
    expect(pumpParity({ type: 'azimuthal' }, 17)).toBe(-1)
    expect(pumpParity({ type: 'circular', m: 1 }, 0)).toBe(0)
    expect(pumpParity({ type: 'vortex', spin: -1, charge: 1 }, 0)).toBe(0)
    expect(pumpParity({ type: 'elliptical' }, 0)).toBe(0)
    expect(pumpParity({ type: 'explicit', m: [1, -1], parity: { mirror: 45, sign: -1 } }, 225)).toBe(-1)
    expect(pumpParity({ type: 'explicit', m: [1, -1], parity: { mirror: 45, sign: -1 } }, 0)).toBe(0)
  })

  it('m = +1 rotates counter-clockwise seen from +z: positive helicity along +z, negative along −z', () => {
    const h = describeCircularHandedness(1)
    expect(h.rotationSeenFromAbove).toBe('counter-clockwise')
    expect(h.alongPlusZ.helicity).toBe(1)
    expect(h.alongMinusZ.helicity).toBe(-1)
    expect(h.alongMinusZ.words).toMatch(/left-handed \(IEEE/)
    expect(describeCircularHandedness(-1).alongPlusZ.helicity).toBe(-1)
  })

  it('parsePump rejects bad input with field paths', () => {
    expect(() => parsePump({ type: 'circular', m: 2 })).toThrow(
      expect.objectContaining({ code: 'OUT_OF_RANGE', field: 'pump.m' }),
    )
    expect(() => parsePump({ type: 'linear' })).toThrow(
      expect.objectContaining({ code: 'MISSING_FIELD', field: 'pump.angle' }),
    )
    expect(() => parsePump({ type: 'laser' })).toThrow(
      expect.objectContaining({ code: 'UNKNOWN_PUMP_TYPE', field: 'pump.type' }),
    )
    expect(() => parsePump({ type: 'explicit', m: [] })).toThrow(
      expect.objectContaining({ code: 'OUT_OF_RANGE', field: 'pump.m' }),
    )
    expect(() => parsePump({ type: 'explicit', m: [1], parity: { mirror: 0, sign: 0 } })).toThrow(
      expect.objectContaining({ field: 'pump.parity.sign' }),
    )
    expect(() => parsePump({ type: 'vortex', spin: 1, charge: 1.5 })).toThrow(EngineError)
    expect(() => parsePump({ type: 'circular', m: 2 })).toThrow(/^pump\.m: must be 1 or -1, got 2$/)
  })
})
