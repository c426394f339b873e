import { describe, it, expect } from 'vitest'
import { spawnSync } from 'node:child_process'
import { resolve } from 'node:path'

const root = resolve(__dirname, '../../..')
const run = (stdin: string) =>
  spawnSync(resolve(root, 'node_modules/.bin/tsx'), [resolve(root, 'server/scripts/polar.ts')], {
    input: stdin,
    encoding: 'utf8',
    cwd: root,
  })

describe('CLI server/scripts/polar.ts (contract: JSON on stdout + exit 0, one-line stderr + exit 2)', () => {
  it('good request → exit 0 and one JSON object', () => {
    // (001) zinc blende, p-in/s-out at 45°: I ∝ cos²2φ (Stehlin et al., Opt. Lett. 13, 389 (1988)).
    const r = run(
      JSON.stringify({
        crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
        surface: false,
        order: 2,
        incidence: { angleDeg: 45, detect: 'reflection' },
        pump: 'p',
        analyser: 's',
        stepDeg: 1,
        fresnel: false,
      }),
    )
    expect(r.status).toBe(0)
    expect(r.stdout.trimEnd().split('\n')).toHaveLength(1)
    const body = JSON.parse(r.stdout)
    expect(body.harmonics).toEqual([0, 4])
    expect(body.points).toHaveLength(360)
    expect(body.points[0]).toEqual({ azimuthDeg: 0, intensity: 1 })
    expect(body.points[45].intensity).toBe(0)
  })

  it('bad request → exit 2 and exactly one line on stderr', () => {
    const r = run(
      JSON.stringify({
        crystal: { pointGroup: '-43m', normal: [0, 0, 1], reference: [1, 0, 0] },
        order: 2,
        incidence: { angleDeg: 95 },
      }),
    )
    expect(r.status).toBe(2)
    expect(r.stdout).toBe('')
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(r.stderr).toMatch(/OUT_OF_RANGE: incidence\.angleDeg/)
  })

  it('invalid JSON → exit 2, one line', () => {
    const r = run('{ nope')
    expect(r.status).toBe(2)
    expect(r.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(r.stderr).toMatch(/INVALID_JSON/)
  })
})
