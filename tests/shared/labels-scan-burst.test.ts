import { describe, it, expect } from 'vitest'
import { emptyBurst, feedKey, MAX_GAP_MS } from '../../labels/scan-burst'

/** Feed keys at the given gaps (ms); return what was scanned. */
function run(keys: string[], gapMs: number | number[]): string[] {
  let state = emptyBurst()
  let at = 1000
  const out: string[] = []
  keys.forEach((key, i) => {
    at += Array.isArray(gapMs) ? gapMs[i] : gapMs
    const step = feedKey(state, key, at)
    state = step.state
    if (step.scanned) out.push(step.scanned)
  })
  return out
}
const keysOf = (s: string) => [...s, 'Enter']

describe('keyboard-wedge burst detector', () => {
  it('recognises a fast burst ending in Enter', () => {
    expect(run(keysOf('W-0001'), 5)).toEqual(['W-0001'])
  })
  it('ignores normal typing speed', () => {
    expect(run(keysOf('W-0001'), 120)).toEqual([])
  })
  it('needs at least 5 characters', () => {
    expect(run(keysOf('W-01'), 5)).toEqual([])
  })
  it('starts over after a pause, keeping only the fast tail', () => {
    expect(run([...'ab', ...keysOf('C-0001-01')], [5, 5, 500, ...Array(9).fill(5)])).toEqual(['C-0001-01'])
  })
  it('lets Shift through, breaks on other special keys', () => {
    expect(run(['Shift', 'W', 'Shift', '-', '0', '0', '0', '1', 'Enter'], 5)).toEqual(['W-0001'])
    expect(run(['W', '-', '0', 'Backspace', '0', '0', '1', 'Enter'], 5)).toEqual([])
  })
  it('a slow Enter after a fast burst is not a scan', () => {
    expect(run(keysOf('W-0001'), [...Array(6).fill(5), MAX_GAP_MS + 60])).toEqual([])
  })
  it('two scans in a row give two codes', () => {
    expect(run([...keysOf('W-0001'), ...keysOf('L-0002')], 5)).toEqual(['W-0001', 'L-0002'])
  })
})
