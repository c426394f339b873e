import { describe, it, expect } from 'vitest'
import { spawnSync } from 'node:child_process'
import { resolve } from 'node:path'

const root = resolve(__dirname, '../../..')
const run = (stdin: string) =>
  spawnSync(resolve(root, 'node_modules/.bin/tsx'), [resolve(root, 'server/scripts/channels.ts')], {
    input: stdin,
    encoding: 'utf8',
    cwd: root,
  })

describe('CLI server/scripts/channels.ts (contract: JSON on stdout + exit 0, one-line stderr + exit 2)', () => {
  it('good request → exit 0 and one JSON object', () => {
    const r = run(
      JSON.stringify({
        crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
        surface: false,
        structure: { rotationOrder: 0, mirrors: [0, 90] },
        pump: { type: 'circular', m: 1 },
        order: 2,
        lmax: 4,
        window: 8,
      }),
    )
    expect(r.status).toBe(0)
    const body = JSON.parse(r.stdout)
    expect(body.q).toEqual([-2, 2])
    expect(body.m).toEqual([0, 4])
    expect(body.normalEmission).toMatchObject({ allowed: false, m: [] })
  })

  it('bad request → exit 2 and exactly one line on stderr', () => {
    const r = run(
      JSON.stringify({
        crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [0, 0, 1] },
        structure: { rotationOrder: 0 },
        pump: { type: 'circular', m: 1 },
        order: 2,
      }),
    )
    expect(r.status).toBe(2)
    expect(r.stdout).toBe('')
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(r.stderr).toMatch(/REFERENCE_PARALLEL_TO_NORMAL: crystal\.reference/)
  })

  it('invalid JSON → exit 2, one line', () => {
    const r = run('{ nope')
    expect(r.status).toBe(2)
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(r.stderr).toMatch(/INVALID_JSON/)
  })
})
