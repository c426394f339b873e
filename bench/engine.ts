/**
 * Engine throughput benchmark (not a test). Targets from the engine issue: ≥ 100 000 channel
 * evaluations per second with the tensor content cached per (group, cut); a cold new
 * (group, cut, order ≤ 3) in < 5 ms. The bare cost of as many JSON.parse calls is printed as a floor.
 */
import { clearEngineCaches, computeChannels, evaluateChannels, parseChannelRequest } from '../shared/engine'

/** One result row; `target` is in the same unit, and ratio = value / target is printed by the runner. */
export interface BenchRow {
  name: string
  value: number
  unit: string
  target?: number
  /** 'higher' (default) when bigger is better, 'lower' for times. */
  better?: 'higher' | 'lower'
  note?: string
}

const PUMPS = [
  { type: 'circular', m: 1 },
  { type: 'circular', m: -1 },
  { type: 'linear', angle: 0 },
  { type: 'linear', angle: 30 },
  { type: 'radial' },
  { type: 'vortex', spin: 1, charge: 2 },
  { type: 'elliptical' },
]
const STRUCTURES = [
  { rotationOrder: 0, mirrors: [0, 90] },
  { rotationOrder: 4, mirrors: [0, 45, 90, 135] },
  { rotationOrder: 3, mirrors: [30, 90, 150] },
  { rotationOrder: 6, mirrors: [] },
  { rotationOrder: 2, mirrors: [0, 90] },
]
const CUTS = [
  { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
  { pointGroup: '-43m', normal: [1, 1, 1], reference: [1, -1, 0] },
  { pointGroup: '3m', normal: [0, 0, 1], reference: [1, 0, 0] },
  { pointGroup: '-6m2', normal: [0, 0, 1], reference: [0, 1, 0] },
]

function requests(): unknown[] {
  const out: unknown[] = []
  for (const crystal of CUTS)
    for (const pump of PUMPS)
      for (const structure of STRUCTURES)
        for (const order of [2, 3]) out.push({ crystal, structure, pump, order, lmax: 4, window: 8 })
  return out
}

function timeLoop(count: number, body: (i: number) => void): number {
  const t0 = performance.now()
  for (let i = 0; i < count; i++) body(i)
  return (performance.now() - t0) / 1000
}

/** Run the engine benchmarks and return rows for the table printer. */
export function runEngineBench(iterations = 100_000): BenchRow[] {
  const reqs = requests()
  const texts = reqs.map((r) => JSON.stringify(r))
  const parsed = reqs.map(parseChannelRequest)
  for (const p of parsed) evaluateChannels(p) // warm the caches and the JIT
  timeLoop(20_000, (i) => computeChannels(reqs[i % reqs.length]))

  const hot = timeLoop(iterations, (i) => computeChannels(reqs[i % reqs.length]))
  const hotParsed = timeLoop(iterations, (i) => evaluateChannels(parsed[i % parsed.length]))
  const jsonOnly = timeLoop(iterations, (i) => JSON.parse(texts[i % texts.length]))
  const withJson = timeLoop(iterations, (i) => computeChannels(JSON.parse(texts[i % texts.length])))

  const coldCut = (order: number, clearForms: boolean) => {
    const times: number[] = []
    for (let round = 0; round < 5; round++) {
      let k = 0
      for (const group of ['-43m', '3m', '6mm', 'mm2', '1', '-42m', '32', '23']) {
        clearEngineCaches({ keepForms: !clearForms })
        k++
        const req = {
          crystal: { pointGroup: group, normal: [1, 2 + k, 3 + round], reference: [1, 0, 0] },
          structure: { rotationOrder: 0, mirrors: [0] },
          pump: { type: 'linear', angle: 10 },
          order,
        }
        times.push(timeLoop(1, () => computeChannels(req)) * 1000)
      }
    }
    times.sort((a, b) => a - b)
    return {
      median: times[Math.floor(times.length / 2)],
      p90: times[Math.floor(times.length * 0.9)],
      max: times[times.length - 1],
    }
  }
  const cold2 = coldCut(2, true)
  const cold3 = coldCut(3, true)
  const cold3cut = coldCut(3, false)
  const spread = (c: { p90: number; max: number }) =>
    `median of 40 (8 groups × 5 cuts); p90 ${c.p90.toFixed(2)} ms, max ${c.max.toFixed(2)} ms`

  return [
    {
      name: 'channel evaluations, cached (group, cut), incl. validation',
      value: iterations / hot,
      unit: 'eval/s',
      target: 100_000,
      note: `${reqs.length} distinct requests, orders 2–3`,
    },
    {
      name: 'channel evaluations, cached, pre-validated',
      value: iterations / hotParsed,
      unit: 'eval/s',
      target: 100_000,
    },
    {
      name: 'JSON.parse of the same requests (floor)',
      value: iterations / jsonOnly,
      unit: 'parse/s',
      note: 'bare parsing cost, for scale',
    },
    { name: 'JSON.parse + channel evaluation', value: iterations / withJson, unit: 'eval/s', target: 100_000 },
    {
      name: 'cold new (group, cut), order 2, form solved too',
      value: cold2.median,
      unit: 'ms',
      target: 5,
      better: 'lower',
      note: spread(cold2),
    },
    {
      name: 'cold new (group, cut), order 3, form solved too',
      value: cold3.median,
      unit: 'ms',
      target: 5,
      better: 'lower',
      note: spread(cold3),
    },
    {
      name: 'new cut of an already solved group, order 3',
      value: cold3cut.median,
      unit: 'ms',
      target: 5,
      better: 'lower',
      note: spread(cold3cut),
    },
  ]
}
