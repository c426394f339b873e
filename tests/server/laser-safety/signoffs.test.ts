import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { and, desc, eq } from 'drizzle-orm'
import { auditLog, laserSetupSignoffs, users } from '../../../server/db/schema/index'
import { demoEmail, signedInAs, startTestApp } from '../helpers'
import { LASER_CAUTION } from '../../../shared/safety'

/** Sign-off of laser setups (issue 5): approve / reject / revoke, separation of duties, voiding, the queue. */
let t: Awaited<ReturnType<typeof startTestApp>>
let safety: TestAgent
let optics: TestAgent
let opticsId: number
let safetyId: number
beforeAll(async () => {
  t = await startTestApp()
  safety = await signedInAs(t.app, 'safety_officer')
  optics = await signedInAs(t.app, 'optics_staff')
  const idOf = async (role: 'optics_staff' | 'safety_officer') =>
    (
      await t.db
        .select()
        .from(users)
        .where(eq(users.email, demoEmail(role)))
    )[0].id
  opticsId = await idOf('optics_staff')
  safetyId = await idOf('safety_officer')
})
afterAll(async () => {
  await t.stop()
})

const unique = (s: string) => `${s} ${Date.now()}-${Math.floor(Math.random() * 1e6)}`
const day = (n: number) => new Date(Date.now() + n * 86400_000).toISOString().slice(0, 10)
/** Check case A (docs/laser-safety.md §9): Ti:sapphire 800 nm, 100 fs, 80 MHz, 1 W, 2 mm, 1 mrad, with SH. */
const exampleA = (extra: Record<string, unknown> = {}) => ({
  name: unique('Ti:Sa example A'),
  room: 'C1.03',
  sourceType: 'mode_locked',
  wavelengthsNm: [800],
  notes: 'Worked example A',
  pulseDurationFs: 100,
  repRateHz: 80e6,
  maxAvgPowerMw: 1000,
  beamDiameterMm: 2,
  divergenceMrad: 1,
  harmonicOrders: [2],
  laserClass: '4',
  eyewear: [{ description: 'NIR goggle', bandsNm: '740–860', od: 5 }],
  interlocks: 'Door interlock',
  controlledAreaNotes: 'Warning light',
  ...extra,
})
/** The optics person describes a setup and submits it for sign-off. */
const create = async (extra: Record<string, unknown> = {}) => {
  const res = await optics.post('/api/laser-setups').send(exampleA(extra))
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  expect(res.body.submitter.id).toBe(opticsId)
  const sub = await optics.post(`/api/laser-setups/${res.body.id}/submit`).send({})
  expect(sub.status, JSON.stringify(sub.body)).toBe(200)
  return res.body as { id: number; code: string }
}
const approve = (id: number, body: object = { expiresOn: day(90), note: 'Checked on site' }) =>
  safety.post(`/api/laser-setups/${id}/approve`).send(body)

describe('approve / reject / revoke', () => {
  it('a new setup waits; approval records the expiry, person, note, history and an audit row', async () => {
    const s = await create()
    expect((await safety.get(`/api/laser-setups/${s.id}`)).body.signoff).toMatchObject({
      state: 'waiting',
      isValid: false,
      history: [],
    })
    const res = await approve(s.id)
    expect(res.status).toBe(200)
    expect(res.body.signoff).toMatchObject({
      state: 'approved',
      isValid: true,
      expiresOn: day(90),
      note: 'Checked on site',
      by: { id: safetyId },
    })
    expect(res.body.signoff.history[0]).toMatchObject({ decision: 'approved', expiresOn: day(90) })
    expect(res.body.caution).toBe(LASER_CAUTION)
    const [row] = await t.db.select().from(laserSetupSignoffs).where(eq(laserSetupSignoffs.setupId, s.id))
    expect(row.hazardHash).toMatch(/^[0-9a-f]{64}$/)
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'laser_setup'), eq(auditLog.entityId, s.id), eq(auditLog.action, 'signoff')))
    expect(audit.reason).toBe('Checked on site')
  })

  it('answers field errors: expiry missing, in the past, today, or more than 2 years ahead; notes required to reject and revoke', async () => {
    const s = await create()
    for (const expiresOn of [undefined, '2020-01-01', day(0), day(800), 'soon']) {
      const res = await approve(s.id, { expiresOn })
      expect(res.status, String(expiresOn)).toBe(400)
      expect(res.body.fields.expiresOn).toBeTruthy()
    }
    expect((await safety.post(`/api/laser-setups/${s.id}/reject`).send({})).body.fields.note).toEqual(['Say why'])
    expect((await safety.post(`/api/laser-setups/${s.id}/revoke`).send({ note: ' ' })).body.fields.note).toEqual([
      'Say why',
    ])
    expect((await t.db.select().from(laserSetupSignoffs).where(eq(laserSetupSignoffs.setupId, s.id))).length).toBe(0)
  })

  it('rejects with a note; revokes an approval with a note; revoking a setup that is not signed off is a 409', async () => {
    const a = await create()
    const rej = await safety.post(`/api/laser-setups/${a.id}/reject`).send({ note: 'No eyewear for 400 nm' })
    expect(rej.body.signoff).toMatchObject({ state: 'rejected', note: 'No eyewear for 400 nm', isValid: false })
    expect((await safety.post(`/api/laser-setups/${a.id}/revoke`).send({ note: 'x' })).status).toBe(409)
    const b = await create()
    await approve(b.id)
    const rev = await safety.post(`/api/laser-setups/${b.id}/revoke`).send({ note: 'Interlock broken' })
    expect(rev.body.signoff).toMatchObject({ state: 'revoked', isValid: false })
    expect(rev.body.signoff.history.map((h: { decision: string }) => h.decision)).toEqual(['revoked', 'approved'])
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entityId, b.id), eq(auditLog.entity, 'laser_setup'), eq(auditLog.action, 'revoke')))
    expect(audit.reason).toBe('Interlock broken')
  })

  it("refuses approval by the author: a safety officer's own setup needs another safety officer", async () => {
    const own = await safety.post('/api/laser-setups').send(exampleA())
    expect((await safety.post(`/api/laser-setups/${own.body.id}/submit`).send({})).status).toBe(200)
    const res = await approve(own.body.id)
    expect(res.status).toBe(403)
    expect(res.body.message).toMatch(/You described this setup, so another safety officer must approve it/)
  })
})

describe('editing a signed-off setup', () => {
  it('a hazard change needs a reason (400 fields.reason), then voids the approval with a voided row and an audit row', async () => {
    const s = await create()
    await approve(s.id)
    const noReason = await safety.patch(`/api/laser-setups/${s.id}`).send({ maxAvgPowerMw: 1500 })
    expect(noReason.status).toBe(400)
    expect(noReason.body.fields.reason[0]).toMatch(/maxAvgPowerMw/)
    const res = await safety.patch(`/api/laser-setups/${s.id}`).send({ maxAvgPowerMw: 1500, reason: 'New pump laser' })
    expect(res.status).toBe(200)
    expect(res.body.signoff).toMatchObject({ state: 'voided', isValid: false })
    const [last] = await t.db
      .select()
      .from(laserSetupSignoffs)
      .where(eq(laserSetupSignoffs.setupId, s.id))
      .orderBy(desc(laserSetupSignoffs.id))
    expect(last).toMatchObject({ decision: 'voided', note: 'New pump laser' })
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'laser_setup'), eq(auditLog.entityId, s.id), eq(auditLog.action, 'update')))
      .orderBy(desc(auditLog.id))
    expect(audit.changes).toMatchObject({
      maxAvgPowerMw: { from: 1000, to: 1500 },
      signoff: { from: 'approved', to: 'voided' },
    })
    expect(audit.reason).toBe('New pump laser')
  })

  it('a non-hazard change (name, notes) keeps the approval and needs no reason', async () => {
    const s = await create()
    await approve(s.id)
    const res = await safety
      .patch(`/api/laser-setups/${s.id}`)
      .send({ notes: 'Moved the power meter', name: unique('Renamed') })
    expect(res.status).toBe(200)
    expect(res.body.signoff.state).toBe('approved')
  })

  it('eyewear changes are hazard changes too', async () => {
    const s = await create()
    await approve(s.id)
    const res = await safety.patch(`/api/laser-setups/${s.id}`).send({ eyewear: [], reason: 'Goggle broken' })
    expect(res.body.signoff.state).toBe('voided')
  })
})

describe('GET /api/laser-setups/queue', () => {
  it('lists waiting (and voided) setups, approvals expiring within 30 days and expired ones', async () => {
    const waiting = await create()
    const soon = await create()
    await approve(soon.id, { expiresOn: day(12), note: null })
    const later = await create()
    await approve(later.id, { expiresOn: day(200) })
    const expired = await create()
    await approve(expired.id, { expiresOn: day(5) })
    await t.db
      .update(laserSetupSignoffs)
      .set({ expiresOn: day(-3) })
      .where(eq(laserSetupSignoffs.setupId, expired.id))
    const q = (await safety.get('/api/laser-setups/queue')).body
    const codes = (k: string) => q[k].map((s: { code: string }) => s.code)
    expect(codes('waiting')).toContain(waiting.code)
    expect(codes('expiring')).toContain(soon.code)
    expect(codes('expiring')).not.toContain(later.code)
    expect(codes('expired')).toContain(expired.code)
    expect(q.expired.find((s: { code: string }) => s.code === expired.code).signoff.state).toBe('expired')
    expect(q.caution).toBe(LASER_CAUTION)
  })
})

describe('computed figures through the API (check case A, docs/laser-safety.md §9)', () => {
  it('800 nm, 100 fs, 80 MHz, 1 W: E_p = 12.5 nJ, P_pk ≈ 117 kW, Class 4 hint, OD ≈ 3.21, D 800 LB5 + M 800 LB4; 400 nm uncovered', async () => {
    const s = await create()
    const { body } = await safety.get(`/api/laser-setups/${s.id}?spotUm=2`)
    const c = body.computed
    expect(c.edition).toBe('IEC-60825-1:2014')
    expect(c.pulseEnergy.value).toBeCloseTo(12.5e-9, 12)
    expect(c.peakPower.value).toBeCloseTo(117.5e3, -2)
    expect(c.peakPower.formula).toMatch(/P_pk = k·E\/τ/)
    expect(c.peakIntensity.value).toBeCloseTo((2 * 117.5e3) / (Math.PI * 1e-12), -12)
    expect(c.classHint).toBe('4')
    const w800 = c.wavelengths.find((w: { order: number }) => w.order === 1)
    expect(w800.od.value).toBeCloseTo(3.21, 2)
    expect(w800.od.formula).toMatch(/^OD = log10/)
    expect(w800.od.edition).toBe('IEC-60825-1:2014')
    expect(w800.en207.labels).toEqual(['D 800 LB5', 'M 800 LB4'])
    expect(w800.coverage.isCovered).toBe(true)
    const w400 = c.wavelengths.find((w: { order: number }) => w.order === 2)
    expect(w400).toMatchObject({
      wavelengthNm: 400,
      isWorstCase: true,
      coverage: { isCovered: false, message: 'No eyewear covers 400 nm' },
    })
    expect(c.warnings).toContain('No eyewear covers 400 nm')
    expect(c.assumptions.some((a: string) => /WORST CASE/.test(a))).toBe(true)
    expect(c.isDeclaredBelowHint).toBe(false)
    expect(body.caution).toBe(LASER_CAUTION)
  })

  it('flags a declared class below the hint, and the EU edition gives its own MPE', async () => {
    const s = await create({ laserClass: '3R' })
    const { body } = await safety.get(`/api/laser-setups/${s.id}?edition=EU-2006/25/EC`)
    expect(body.computed.isDeclaredBelowHint).toBe(true)
    expect(body.computed.warnings[0]).toMatch(/Declared class 3R is lower than the indicative hint 4/)
    expect(body.computed.wavelengths[0].mpe.edition).toBe('EU-2006/25/EC')
  })
})
