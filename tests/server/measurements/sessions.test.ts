import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { and, count, eq, sql } from 'drizzle-orm'
import { auditLog, measurementSessions, sessionResults } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makeLaserSetup, makeSample, sessionBody } from './fixtures-measurements'
import { deriveEfficiency } from '../../../server/services/measurements/session-compare'

let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent
let fab: TestAgent
let setup: { id: number; code: string }
let gaas001: Awaited<ReturnType<typeof makeSample>>
beforeAll(async () => {
  t = await startTestApp()
  optics = await signedInAs(t.app, 'optics_staff')
  fab = await signedInAs(t.app, 'fab_technician')
  setup = await makeLaserSetup(t.db)
  // GaAs (001), flat along [110]; B1: single disks (C∞v, a body of revolution), B2: disks on a square lattice (C4v).
  gaas001 = await makeSample(t.db, {
    arrays: [
      { shape: 'disk', lattice: 'single' },
      { shape: 'disk', lattice: 'square' },
      { shape: 'square', lattice: 'square' },
    ],
  })
})
afterAll(async () => {
  await t.stop()
})

const counts = async () => {
  const [s] = await t.db.select({ n: count() }).from(measurementSessions)
  const [r] = await t.db.select({ n: count() }).from(sessionResults)
  const [a] = await t.db.select({ n: count() }).from(auditLog).where(eq(auditLog.entity, 'session'))
  return { sessions: s.n, results: r.n, audit: a.n }
}

describe('POST /api/sessions', () => {
  it('creates a session on several arrays with the signed-in person as operator, predictions and an audit row', async () => {
    const ids = gaas001.arrays.map((a) => a.id)
    const res = await optics.post('/api/sessions').send(sessionBody(setup.id, ids))
    expect(res.status).toBe(201)
    expect(res.body.code).toMatch(/^S-\d{4,}$/)
    expect(res.body.operator.name).toBe('Priya Halvorsen')
    expect(res.body.laserSetup).toEqual({ id: setup.id, code: setup.code, name: expect.any(String) })
    expect(res.body.results).toHaveLength(3)
    expect(res.body.isBackdated).toBe(false)
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'session'), eq(auditLog.entityId, res.body.id)))
    expect(audit.action).toBe('create')
  })

  // SHG selection rules for a body of revolution on (001) -43m (common practice, e.g. the AlGaAs
  // nanodisk literature): Q = {±2}, so circular m = +1 gives SH m ∈ {0, 4}: no emission along the normal.
  it('GaAs (001) disks, circular +1, order 2: m ∈ {0, 4}; normal emission forbidden, so observed "co" is flagged', async () => {
    const [single] = gaas001.arrays
    const body = sessionBody(setup.id, [single.id])
    body.results = [{ arrayId: single.id, observedNormal: 'co', observedM: [0, 2] } as never]
    const res = await optics.post('/api/sessions').send(body)
    expect(res.status).toBe(201)
    const r = res.body.results[0]
    expect(r.predicted.m).toEqual([0, 4])
    expect(r.predicted.normalEmission.allowed).toBe(false)
    expect(
      r.flags.some((f: string) => f.startsWith('Emission along the normal observed where the engine forbids it')),
    ).toBe(true)
    expect(r.flags.some((f: string) => f.includes('m = 2'))).toBe(true)
  })

  it('GaAs (111) triangles, circular +1: counter-rotating normal SH is consistent; co-rotating raises a handedness flag', async () => {
    const s = await makeSample(t.db, {
      cutNormal: [1, 1, 1],
      flatDirection: [1, -1, 0],
      arrays: [{ shape: 'triangle', lattice: 'hexagonal' }],
    })
    const a = s.arrays[0].id
    const ok = await optics
      .post('/api/sessions')
      .send({ ...sessionBody(setup.id, [a]), results: [{ arrayId: a, observedNormal: 'counter' }] })
    expect(ok.status).toBe(201)
    expect(ok.body.results[0].predicted.normalEmission.handedness).toEqual(['counter-rotating'])
    expect(ok.body.results[0].flags).toEqual([])
    const bad = await optics
      .post('/api/sessions/preview')
      .send({ pump: { type: 'circular', m: 1 }, harmonicOrder: 2, results: [{ arrayId: a, observedNormal: 'co' }] })
    expect(bad.status).toBe(200)
    expect(bad.body.results[0].flags[0]).toMatch(/^Handedness mismatch/)
    const none = await optics
      .post('/api/sessions/preview')
      .send({ pump: { type: 'circular', m: 1 }, harmonicOrder: 2, results: [{ arrayId: a, observedNormal: 'none' }] })
    expect(none.body.results[0].flags[0]).toMatch(/allowed but was not seen/)
  })

  it('derives η = P_SH/P_pump and P_SH/P_pump² (10 mW pump, 1 nW SH: 1e-7 and 1e-5 W⁻¹)', async () => {
    const a = gaas001.arrays[1].id
    const res = await optics
      .post('/api/sessions')
      .send({ ...sessionBody(setup.id, [a]), results: [{ arrayId: a, harmonicPowerW: 1e-9 }] })
    expect(res.status).toBe(201)
    expect(res.body.derived[0].efficiency).toBeCloseTo(1e-7, 15)
    expect(res.body.derived[0].normalisedW).toBeCloseTo(1e-5, 12)
    expect(deriveEfficiency(10, null, 2)).toEqual({ efficiency: null, normalisedW: null })
    expect(deriveEfficiency(10, 1e-12, 3).normalisedW).toBeNull()
  })

  it('is all-or-nothing: one unknown array among several → 400 on that row and nothing written', async () => {
    const before = await counts()
    const res = await optics
      .post('/api/sessions')
      .send(sessionBody(setup.id, [gaas001.arrays[0].id, 999999999, gaas001.arrays[1].id]))
    expect(res.status).toBe(400)
    expect(res.body.fields['results.1.arrayId']).toEqual(['No such array'])
    expect(await counts()).toEqual(before)
  })

  it('answers field-level 400s for bad input', async () => {
    const a = gaas001.arrays[0].id
    const cases: [Record<string, unknown>, string][] = [
      [{ results: [] }, 'results'],
      [{ pump: { type: 'sideways' } }, 'pump'],
      [{ harmonicOrder: 7 }, 'harmonicOrder'],
      [{ avgPowerMw: 'lots' }, 'avgPowerMw'],
      [{ performedAt: 'yesterday-ish' }, 'performedAt'],
      [{ performedAt: new Date(Date.now() + 86400_000).toISOString() }, 'performedAt'],
      [{ laserSetupId: 999999999 }, 'laserSetupId'],
      [{ results: [{ arrayId: a }, { arrayId: a }] }, 'results.1.arrayId'],
    ]
    for (const [extra, field] of cases) {
      const res = await optics.post('/api/sessions').send(sessionBody(setup.id, [a], extra))
      expect(res.status, JSON.stringify(extra)).toBe(400)
      expect(
        Object.keys(res.body.fields).some((k) => k === field || k.startsWith(field + '.')),
        `${field}: ${JSON.stringify(res.body.fields)}`,
      ).toBe(true)
    }
    const retired = await makeLaserSetup(t.db, true)
    const res = await optics.post('/api/sessions').send(sessionBody(retired.id, [a]))
    expect(res.body.fields.laserSetupId).toEqual(['This laser setup is retired'])
  })

  it('flags back-dated entries (performed more than 24 h before entry)', async () => {
    const res = await optics.post('/api/sessions').send(
      sessionBody(setup.id, [gaas001.arrays[0].id], {
        performedAt: new Date(Date.now() - 3 * 86400_000).toISOString(),
      }),
    )
    expect(res.body.isBackdated).toBe(true)
    expect(res.body.flags[0]).toMatch(/^Back-dated entry/)
  })
})

describe('GET/PATCH /api/sessions', () => {
  it('lists with filters (array, chip, setup, date range, q) sorted by performedAt', async () => {
    const s = await makeSample(t.db)
    const other = await makeLaserSetup(t.db)
    const a = s.arrays[0]
    const first = await optics
      .post('/api/sessions')
      .send(sessionBody(other.id, [a.id], { performedAt: '2024-03-01T10:00:00Z', notes: 'first run' }))
    const second = await optics
      .post('/api/sessions')
      .send(sessionBody(other.id, [a.id], { performedAt: '2024-03-05T10:00:00Z' }))
    expect(first.status).toBe(201)
    const byArray = await fab.get(`/api/sessions?array=${a.code}`)
    expect(byArray.status).toBe(200)
    expect(byArray.body.rows.map((r: { code: string }) => r.code)).toEqual([second.body.code, first.body.code])
    expect(byArray.body.rows[0].arrayCodes).toEqual([a.code])
    expect((await fab.get(`/api/sessions?chip=${s.chipCode}&sort=performedAt&dir=asc`)).body.rows[0].code).toBe(
      first.body.code,
    )
    expect((await fab.get(`/api/sessions?laserSetupId=${other.id}`)).body.total).toBe(2)
    expect(
      (await fab.get(`/api/sessions?laserSetupId=${other.id}&from=2024-03-02&to=2024-03-05`)).body.rows.map(
        (r: { id: number }) => r.id,
      ),
    ).toEqual([second.body.id])
    expect((await fab.get(`/api/sessions?laserSetupId=${other.id}&q=first run`)).body.total).toBe(1)
    expect((await fab.get('/api/sessions?chip=not-a-code')).status).toBe(400)
  })

  it('shows the detail to everyone and answers 404 for an unknown id', async () => {
    const created = await optics.post('/api/sessions').send(sessionBody(setup.id, [gaas001.arrays[0].id]))
    const res = await fab.get(`/api/sessions/${created.body.id}`)
    expect(res.status).toBe(200)
    expect(res.body.results[0].predicted.engineVersion).toBeTruthy()
    expect((await fab.get('/api/sessions/999999999')).status).toBe(404)
    expect((await optics.patch('/api/sessions/999999999').send({ notes: 'x' })).status).toBe(404)
  })

  it('updates with an audit row; entries older than 24 h need a reason', async () => {
    const created = await optics.post('/api/sessions').send(sessionBody(setup.id, [gaas001.arrays[0].id]))
    const id = created.body.id
    const upd = await optics
      .patch(`/api/sessions/${id}`)
      .send({ notes: 'Filter swapped', results: [{ arrayId: gaas001.arrays[0].id, observedNormal: 'present' }] })
    expect(upd.status).toBe(200)
    expect(upd.body.notes).toBe('Filter swapped')
    expect(upd.body.results[0].flags[0]).toMatch(/^Emission along the normal observed/)
    const audits = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'session'), eq(auditLog.entityId, id), eq(auditLog.action, 'update')))
    expect(Object.keys(audits[0].changes)).toEqual(expect.arrayContaining(['notes', 'results']))
    await t.db
      .update(measurementSessions)
      .set({ createdAt: sql`NOW(3) - INTERVAL 2 DAY` })
      .where(eq(measurementSessions.id, id))
    const refused = await optics.patch(`/api/sessions/${id}`).send({ notes: 'Later edit' })
    expect(refused.status).toBe(400)
    expect(refused.body.fields.reason).toBeTruthy()
    const ok = await optics
      .patch(`/api/sessions/${id}`)
      .send({ notes: 'Later edit', reason: 'Typo in the filter name' })
    expect(ok.status).toBe(200)
    const [last] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'session'), eq(auditLog.entityId, id)))
      .orderBy(sql`id desc`)
      .limit(1)
    expect(last.reason).toBe('Typo in the filter name')
  })

  it('previews without writing anything, and 400s on an unknown array', async () => {
    const before = await counts()
    const res = await request(t.app).post('/api/sessions/preview').send({})
    expect(res.status).toBe(401)
    const bad = await fab
      .post('/api/sessions/preview')
      .send({ pump: { type: 'circular', m: 1 }, harmonicOrder: 2, results: [{ arrayId: 999999999 }] })
    expect(bad.status).toBe(400)
    expect(bad.body.fields['results.0.arrayId']).toBeTruthy()
    expect(await counts()).toEqual(before)
  })
})

describe('POST /api/sessions: the laser-safety gate (issue 5)', () => {
  const refused = async (setupId: number, pattern: RegExp, extra: Record<string, unknown> = {}) => {
    const before = await counts()
    const res = await optics.post('/api/sessions').send(sessionBody(setupId, [gaas001.arrays[0].id], extra))
    expect(res.status).toBe(409)
    expect(res.body.fields.laserSetupId[0]).toMatch(/^This setup is not signed off/)
    expect(res.body.fields.laserSetupId[0]).toMatch(pattern)
    expect(res.body.fields.laserSetupId[0]).toMatch(/ask a safety officer$/)
    expect(await counts()).toEqual(before)
  }
  it('refuses a setup waiting for sign-off, with the field message, and writes nothing', async () => {
    await refused((await makeLaserSetup(t.db, false, 'none')).id, /not signed off yet/)
  })
  it('refuses a setup whose sign-off expired (naming the date)', async () => {
    const yesterday = new Date(Date.now() - 86400_000).toISOString().slice(0, 10)
    await refused((await makeLaserSetup(t.db, false, 'expired')).id, new RegExp(`expired on ${yesterday}`))
  })
  it('refuses a revoked setup', async () => {
    const safety = await signedInAs(t.app, 'safety_officer')
    const s = await makeLaserSetup(t.db)
    expect(
      (await safety.post(`/api/laser-setups/${s.id}/revoke`).send({ note: 'Interlock failed its check' })).status,
    ).toBe(200)
    await refused(s.id, /revoked/)
  })
  it('refuses a session without the safety-notes confirmation (field safetyNotesRead)', async () => {
    const before = await counts()
    const res = await optics
      .post('/api/sessions')
      .send(sessionBody(setup.id, [gaas001.arrays[0].id], { safetyNotesRead: undefined }))
    expect(res.status).toBe(400)
    expect(res.body.fields.safetyNotesRead).toEqual(["Confirm that you read the setup's safety notes"])
    const no = await optics
      .post('/api/sessions')
      .send(sessionBody(setup.id, [gaas001.arrays[0].id], { safetyNotesRead: false }))
    expect(no.body.fields.safetyNotesRead).toBeTruthy()
    expect(await counts()).toEqual(before)
  })
  it('records the confirmation in the session audit row', async () => {
    const res = await optics.post('/api/sessions').send(sessionBody(setup.id, [gaas001.arrays[0].id]))
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'session'), eq(auditLog.entityId, res.body.id)))
    expect((audit.changes as Record<string, { to: unknown }>).safetyNotesRead.to).toBe(true)
  })
})
