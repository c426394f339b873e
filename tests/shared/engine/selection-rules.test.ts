import { describe, it, expect } from 'vitest'
import {
  findAllowedHarmonics,
  harmonicParity,
  findNormalEmission,
  findAllowedMultipoles,
  sumProjections,
  computeChannels,
} from '../../../shared/engine'

describe('rules 4–7', () => {
  it('rule 4: sums of pump projections, q and k·n within the window', () => {
    expect(sumProjections([-1, 1], 2)).toEqual([-2, 0, 2])
    expect(findAllowedHarmonics({ pumpProjections: [1], order: 2, q: [-2, 2], rotationOrder: 0, window: 8 })).toEqual([
      0, 4,
    ])
    expect(findAllowedHarmonics({ pumpProjections: [1], order: 2, q: [0], rotationOrder: 3, window: 5 })).toEqual([
      -4, -1, 2, 5,
    ])
    expect(findAllowedHarmonics({ pumpProjections: [1], order: 2, q: [0], rotationOrder: 1, window: 2 })).toEqual([
      -2, -1, 0, 1, 2,
    ])
    expect(findAllowedHarmonics({ pumpProjections: [1], order: 2, q: [], rotationOrder: 1, window: 2 })).toEqual([])
  })

  it('rule 5: tensor parity × pump parity^N, none unless both defined', () => {
    expect(harmonicParity(-1, 1, 2)).toBe(-1)
    expect(harmonicParity(1, -1, 3)).toBe(-1)
    expect(harmonicParity(1, -1, 2)).toBe(1)
    expect(harmonicParity(0, 1, 2)).toBe(0)
    expect(harmonicParity(1, 0, 2)).toBe(0)
  })

  it('rule 6: normal emission and co-/counter-rotation relative to a circular pump', () => {
    expect(findNormalEmission([-1, 2], 1)).toEqual({ allowed: true, m: [-1], handedness: ['counter-rotating'] })
    expect(findNormalEmission([0, 4], 1)).toEqual({ allowed: false, m: [] })
  })

  it('rule 7: at m = 0 odd keeps only M, even only E; m ≠ 0 keeps both', () => {
    expect(findAllowedMultipoles([0], [-1], 1)).toEqual([{ type: 'M', l: 1, m: 0 }])
    expect(findAllowedMultipoles([0], [1], 1)).toEqual([{ type: 'E', l: 1, m: 0 }])
    expect(findAllowedMultipoles([0], [1, -1], 2)).toEqual([])
    expect(findAllowedMultipoles([2], [], 2)).toEqual([
      { type: 'E', l: 2, m: 2 },
      { type: 'M', l: 2, m: 2 },
    ])
  })

  // Bhagavantam & Chandrasekhar 1972; Alon, Averbukh & Moiseyev, PRL 80, 3743 (1998): circularly
  // polarised harmonics of an n-fold system appear only for N = kn ± 1, co-rotating when
  // N − 1 ≡ 0 and counter-rotating when N + 1 ≡ 0 (mod n). Checked with the isotropic-interface
  // tensor (Q = {0}) so only the structure's n acts.
  describe('harmonics of circularly polarised light in n-fold systems (Alon, Averbukh & Moiseyev, PRL 80, 3743 (1998))', () => {
    for (let n = 2; n <= 6; n++)
      for (let N = 2; N <= 5; N++) {
        const co = (N - 1) % n === 0
        const counter = (N + 1) % n === 0
        it(`n = ${n}, N = ${N}: ${co ? 'co-rotating' : ''}${co && counter ? ' and ' : ''}${counter ? 'counter-rotating' : ''}${!co && !counter ? 'forbidden' : ''}`, () => {
          const r = computeChannels({
            crystal: { pointGroup: 'm-3m', normal: [0, 0, 1], reference: [1, 0, 0] },
            surface: true,
            structure: { rotationOrder: n, mirrors: [] },
            pump: { type: 'circular', m: 1 },
            order: N,
          })
          expect(r.normalEmission.allowed).toBe(co || counter)
          expect(r.normalEmission.m.includes(1)).toBe(co)
          expect(r.normalEmission.m.includes(-1)).toBe(counter)
          if (r.normalEmission.allowed)
            expect(r.normalEmission.handedness).toEqual(
              r.normalEmission.m.map((m) => (m === 1 ? 'co-rotating' : 'counter-rotating')),
            )
        })
      }

    const surfaceCase = (n: number, N: number) =>
      computeChannels({
        crystal: { pointGroup: 'm-3m', normal: [0, 0, 1], reference: [1, 0, 0] },
        surface: true,
        structure: { rotationOrder: n, mirrors: [] },
        pump: { type: 'circular', m: 1 },
        order: N,
      }).normalEmission
    it('SHG from C3 meta-atoms is counter-rotating (Alon et al. 1998)', () =>
      expect(surfaceCase(3, 2).handedness).toEqual(['counter-rotating']))
    it('THG from C4 meta-atoms is counter-rotating (Alon et al. 1998)', () =>
      expect(surfaceCase(4, 3).handedness).toEqual(['counter-rotating']))
    it('SHG from C4 meta-atoms is forbidden at normal incidence (Alon et al. 1998)', () =>
      expect(surfaceCase(4, 2).allowed).toBe(false))
  })
})
