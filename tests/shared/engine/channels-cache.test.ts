import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import {
  clearEngineCaches,
  computeChannels,
  evaluateChannels,
  parseChannelRequest,
  findAllowedHarmonics,
  sumProjections,
  getPointGroup,
  solveTensorForm,
  prepareSampleTensor,
} from '../../../shared/engine'
import type { ChannelResponse } from '../../../shared/engine'
import { BoundedCache } from '../../../shared/engine/bounded-cache'

// Caching must never change an answer: every response computed with all engine caches and memos
// emptied first (cold) must equal, field for field and in field order, the one served from warm caches.

/** Empty every cache of the engine; the solved forms too unless `keepForms`. */
function clearAll(keepForms = false): void {
  clearEngineCaches({ keepForms })
}

const CUTS = [
  { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
  { pointGroup: '-43m', normal: [1, 1, 1], reference: [1, -1, 0] },
  { pointGroup: 'Td', normal: '(110)', reference: '[001]', azimuth: 15 },
  { pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0] },
  { pointGroup: '3m', normal: 'X', reference: 'Y', azimuth: -30 },
  { pointGroup: '-6m2', normal: [0, 0, 1], reference: [0, 1, 0] },
  { pointGroup: 'mm2', normal: [0, 1, 0], reference: [0, 0, 1] },
  { pointGroup: '6mm', normal: [1, 2, 3], reference: [1, 0, 0] },
  { pointGroup: '32', normal: [0, 0, 1], reference: [1, 0, 0], azimuth: 7.5 },
  { pointGroup: '1', normal: [0.3, -0.2, 1], reference: [1, 0, 0] },
  { pointGroup: 'm-3m', normal: [0, 0, 1], reference: [1, 0, 0] },
  { pointGroup: '-42m', normal: [1, 1, 0], reference: [0, 0, 1] },
  { pointGroup: ' C3v ', normal: 'Z', reference: 'X' },
]
const PUMPS = [
  { type: 'circular', m: 1 },
  { type: 'circular', m: -1 },
  { type: 'linear', angle: 0 },
  { type: 'linear', angle: 30 },
  { type: 'linear', angle: 135 },
  { type: 'radial' },
  { type: 'azimuthal' },
  { type: 'vortex', spin: 1, charge: 2 },
  { type: 'vortex', spin: -1, charge: -3 },
  { type: 'elliptical' },
  { type: 'explicit', m: [2, 0, 2, -1] },
  { type: 'explicit', m: [1, -1], parity: { mirror: 30, sign: -1 } },
  { type: 'explicit', m: Array.from({ length: 70 }, (_, i) => (i % 5) - 2) }, // longer than the memoised lists
]
const STRUCTURES = [
  { rotationOrder: 0, mirrors: [0, 90] },
  { rotationOrder: 4, mirrors: [0, 45, 90, 135] },
  { rotationOrder: 3, mirrors: [30, 90, 150] },
  { rotationOrder: 6, mirrors: [] },
  { rotationOrder: 2, mirrors: [0, 90] },
  { rotationOrder: 1 },
  { rotationOrder: 1, mirrors: [45, 225, 45] },
  { rotationOrder: 5, mirrors: [0, 36, 180, -36] },
  { rotationOrder: 6, mirrors: [0, 90, 30] },
  { rotationOrder: 12, mirrors: [15.5] },
  { rotationOrder: 4, mirrors: Array.from({ length: 100 }, (_, i) => (i * 45) % 360) },
]

/** A seeded generator (LCG), so the request list is the same on every run. */
function random(seed: number): () => number {
  let state = seed
  return () => (state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32
}

/**
 * A few hundred varied requests, plus two sweeps that differ in one field only (the in-plane
 * azimuth of one cut; mirror lists that are prefixes of one another or differ in the last mirror, under
 * many rotation orders): more distinct inputs than
 * the memo tables have slots, so look-ups that compared too little would serve a wrong answer.
 */
function requests(): Record<string, unknown>[] {
  const next = random(20240611)
  const pick = <T>(list: readonly T[]): T => list[Math.floor(next() * list.length)]
  const out: Record<string, unknown>[] = []
  for (let i = 0; i < 200; i++) {
    const req: Record<string, unknown> = {
      crystal: pick(CUTS),
      pump: pick(PUMPS),
      structure: pick(STRUCTURES),
      order: pick([2, 2, 3, 3, 4]),
    }
    if (next() < 0.3) req.lmax = pick([1, 2, 3, 8])
    if (next() < 0.4) req.window = pick([1, 3, 8, 12, 64])
    if (next() < 0.1) req.surface = true
    if (next() < 0.1) req.kleinman = true
    out.push(req)
  }
  const structure = { rotationOrder: 0, mirrors: [0, 90] }
  for (let k = 0; k < 270; k++)
    out.push({ crystal: { ...CUTS[1], azimuth: k * 0.6 }, pump: { type: 'linear', angle: 0 }, structure, order: 2 })
  const nested = [1, 2, 3, 4, 5]
    .map((k) => [5, 20, 35, 50, 65].slice(0, k))
    .concat([0, 1, 2, 3, 4, 5].map((j) => [5, 20, 35, 50, 70 + 10 * j]))
  // Only the mirror lists that agree with the rotation order (the others are refused, see below).
  for (let n = 0; n < 24; n++)
    for (const mirrors of nested) {
      const req = {
        crystal: CUTS[0],
        pump: { type: 'linear', angle: 5 },
        structure: { rotationOrder: n, mirrors },
        order: 2,
        window: 12,
      }
      if (isConsistent(req)) out.push(req)
    }
  return out
}

function isConsistent(req: unknown): boolean {
  try {
    parseChannelRequest(req)
    return true
  } catch {
    return false
  }
}

/** Serialise with key order (toEqual ignores it; the CLI contract does not). */
const text = (r: ChannelResponse) => JSON.stringify(r)

describe('caches never change an answer', () => {
  const reqs = requests()

  it('cold (caches emptied before each request) equals warm, for several hundred varied requests', () => {
    clearAll()
    // Before each request every cache is emptied except the solved forms (χ(N) per class and
    // order, which the cut-dependent caches start from); they were emptied once above.
    const cold = reqs.map((r) => {
      clearAll(true)
      return computeChannels(r)
    })
    clearAll()
    // Warm the caches in another order, then read every request from them, validated and pre-validated.
    for (let i = reqs.length - 1; i >= 0; i--) computeChannels(reqs[i])
    reqs.forEach((r, i) => {
      const warm = computeChannels(r)
      expect(warm).toStrictEqual(cold[i])
      expect(text(warm)).toBe(text(cold[i]))
    })
    reqs.forEach((r, i) => expect(text(evaluateChannels(parseChannelRequest(r)))).toBe(text(cold[i])))
  })

  it('a caller changing a response cannot change later answers', () => {
    clearAll()
    const req = { crystal: CUTS[1], pump: PUMPS[3], structure: STRUCTURES[2], order: 2 }
    const first = computeChannels(req)
    const copy = JSON.parse(JSON.stringify(first))
    first.q.push(99)
    first.m.splice(0, first.m.length, 42)
    first.parity.push({ mirror: 1, sign: 1 })
    first.normalEmission.m.push(7)
    first.multipoles.length = 0
    first.explain.fill('changed')
    first.qWeights[0].weight = -1
    expect(JSON.parse(JSON.stringify(computeChannels(req)))).toEqual(copy)
    const parsed = parseChannelRequest(req)
    evaluateChannels(parsed)
    parsed.structure.mirrors.push(45) // a caller re-using its request object after changing it
    const changed = evaluateChannels(parsed)
    clearAll()
    expect(changed).toStrictEqual(evaluateChannels(parsed))
  })

  it('bad requests are refused with the same message cold and warm', () => {
    const bad = [
      { crystal: { ...CUTS[0], pointGroup: 'x' }, pump: PUMPS[0], structure: STRUCTURES[0], order: 2 },
      { crystal: { ...CUTS[3], normal: '(111)' }, pump: PUMPS[0], structure: STRUCTURES[0], order: 2 },
      { crystal: { ...CUTS[0], reference: [0, 0, 3] }, pump: PUMPS[0], structure: STRUCTURES[0], order: 2 },
      { crystal: CUTS[0], pump: { type: 'circular', m: 2 }, structure: STRUCTURES[0], order: 2 },
      { crystal: CUTS[0], pump: PUMPS[0], structure: { rotationOrder: 2, mirrors: [0, 'a'] }, order: 2 },
      { crystal: CUTS[0], pump: PUMPS[0], structure: STRUCTURES[0], order: 6 },
      { crystal: CUTS[0], pump: PUMPS[0], structure: { rotationOrder: 2, mirrors: [0, 45] }, order: 2 },
    ]
    const message = (r: unknown) => {
      try {
        computeChannels(r)
      } catch (e) {
        return (e as Error).message
      }
      return 'accepted'
    }
    const cold = bad.map((r) => {
      clearAll()
      return message(r)
    })
    reqs.forEach((r) => computeChannels(r))
    expect(bad.map(message)).toEqual(cold)
    expect(cold.every((m) => m !== 'accepted')).toBe(true)
  })
})

describe('rule 4 fast path (seeded)', () => {
  // Reference: rule 4 written out term by term (m = Σ m_i + q + k·n, |m| ≤ window), docs/physics.md §3.
  function reference(pump: number[], order: number, q: number[], n: number, window: number): number[] {
    const out = new Set<number>()
    for (const s of sumProjections(pump, order))
      for (const dq of q)
        for (let k = -200; k <= 200; k++) {
          const m = s + dq + (n === 0 ? 0 : k * n)
          if (Math.abs(m) <= window && (n !== 0 || k === 0)) out.add(m)
        }
    return [...out].sort((a, b) => a - b)
  }

  it('equals the term-by-term rule for integer inputs, and repeated calls agree', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -6, max: 6 }), { minLength: 1, maxLength: 4 }),
        fc.integer({ min: 1, max: 4 }),
        fc.uniqueArray(fc.integer({ min: -6, max: 6 }), { maxLength: 6 }),
        fc.integer({ min: 0, max: 12 }),
        fc.integer({ min: 1, max: 20 }),
        (pump, order, q, n, window) => {
          const input = { pumpProjections: pump, order, q, rotationOrder: n, window }
          const expected = reference(pump, order, q, n, window)
          expect(findAllowedHarmonics(input)).toEqual(expected)
          expect(findAllowedHarmonics(input)).toEqual(expected)
        },
      ),
      { seed: 42, numRuns: 300 },
    )
  })
})

describe('BoundedCache', () => {
  it('keeps at most `limit` entries, dropping the oldest first', () => {
    const c = new BoundedCache<string, number>(3)
    for (const [i, k] of ['a', 'b', 'c', 'd'].entries()) c.set(k, i)
    expect(c.size).toBe(3)
    expect(c.get('a')).toBeUndefined()
    expect([c.get('b'), c.get('c'), c.get('d')]).toEqual([1, 2, 3])
    c.set('b', 9) // replacing a key evicts nothing
    expect([c.size, c.get('c'), c.get('b')]).toEqual([3, 2, 9])
  })

  it('keeps an entry that is read while others come and go, and never holds more than `limit`', () => {
    const c = new BoundedCache<number, number>(10)
    c.set(-1, -1)
    for (let i = 0; i < 1000; i++) {
      c.set(i, i)
      expect(c.get(-1)).toBe(-1) // in use: survives every turn-over
      expect(c.size).toBeLessThanOrEqual(10)
    }
    expect(c.get(0)).toBeUndefined() // not read again: dropped
    expect(c.get(999)).toBe(999)
  })
})

describe("what the engine hands out is the caller's own", () => {
  it('point groups are frozen', () => {
    const g = getPointGroup('-43m')
    expect(Object.isFrozen(g) && Object.isFrozen(g.elements) && Object.isFrozen(g.elements[0])).toBe(true)
    expect(() => {
      ;(g.elements[1] as number[])[0] = 5
    }).toThrow(TypeError)
    expect(getPointGroup('Td').elements[1]).toEqual(getPointGroup('-43m').elements[1])
  })

  it('changing a solved form or a sample tensor changes neither later answers nor the channels', () => {
    clearAll()
    const req = { crystal: CUTS[0], pump: PUMPS[2], structure: STRUCTURES[0], order: 2 }
    const before = text(computeChannels(req))
    const form = solveTensorForm('-43m', 2)
    const original = form.tensors[0].slice()
    form.tensors[0].fill(7)
    form.space.parameterOf.fill(0)
    expect(solveTensorForm('-43m', 2).tensors[0]).toEqual(original)
    const input = {
      pointGroup: CUTS[0].pointGroup,
      normal: CUTS[0].normal as [number, number, number],
      reference: CUTS[0].reference as [number, number, number],
      order: 2,
    }
    const sample = prepareSampleTensor(input)
    const rotated = sample.tensors[0].slice()
    sample.tensors[0].fill(3)
    expect(prepareSampleTensor(input).tensors[0]).toEqual(rotated)
    expect(() => {
      ;(sample.content.q as number[]).push(9)
    }).toThrow(TypeError)
    expect(text(computeChannels(req))).toBe(before)
  })
})
