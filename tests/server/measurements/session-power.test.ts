import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { makeLaserSetup, makeSample, sessionBody } from './fixtures-measurements'

/**
 * A session's pump power must stay within what its laser setup was signed off for: the sign-off
 * is a decision on the hazard as described (IEC 60825-1 classifies by the accessible emission,
 * which scales with the power), so a higher power is outside it.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent
let setup: { id: number; code: string }
let arrayId: number
beforeAll(async () => {
  t = await startTestApp()
  optics = await signedInAs(t.app, 'optics_staff')
  setup = await makeLaserSetup(t.db, false, 'approved', { maxAvgPowerMw: 500 })
  arrayId = (await makeSample(t.db)).arrays[0].id
})
afterAll(async () => {
  await t.stop()
})

describe("pump power and the setup's registered maximum", () => {
  it('refuses a session above the maximum, naming it, and accepts one at the maximum', async () => {
    const over = await optics.post('/api/sessions').send(sessionBody(setup.id, [arrayId], { avgPowerMw: 500.5 }))
    expect(over.status).toBe(400)
    expect(over.body.fields.avgPowerMw[0]).toMatch(
      new RegExp(`maximum average power registered for ${setup.code} \\(500 mW\\)`),
    )
    const at = await optics.post('/api/sessions').send(sessionBody(setup.id, [arrayId], { avgPowerMw: 500 }))
    expect(at.status).toBe(201)
  })

  it('refuses an edit that raises the power above the maximum, or moves the session to a setup with a lower one', async () => {
    const s = await optics.post('/api/sessions').send(sessionBody(setup.id, [arrayId], { avgPowerMw: 100 }))
    expect(s.status).toBe(201)
    const up = await optics.patch(`/api/sessions/${s.body.id}`).send({ avgPowerMw: 800 })
    expect(up.status).toBe(400)
    expect(up.body.fields.avgPowerMw[0]).toMatch(/500 mW/)
    const small = await makeLaserSetup(t.db, false, 'approved', { maxAvgPowerMw: 50 })
    const move = await optics.patch(`/api/sessions/${s.body.id}`).send({ laserSetupId: small.id })
    expect(move.status).toBe(400)
    expect(move.body.fields.avgPowerMw[0]).toMatch(new RegExp(`${small.code} \\(50 mW\\)`))
    expect((await optics.get(`/api/sessions/${s.body.id}`)).body.avgPowerMw).toBe(100)
  })
})
