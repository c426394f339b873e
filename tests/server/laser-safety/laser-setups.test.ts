import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { and, eq } from 'drizzle-orm'
import { auditLog } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { LASER_CAUTION } from '../../../shared/safety'

let t: Awaited<ReturnType<typeof startTestApp>>
let safety: TestAgent
let optics: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  safety = await signedInAs(t.app, 'safety_officer')
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

const body = (name: string) => ({
  name,
  room: 'B2.14',
  sourceType: 'mode_locked',
  wavelengthsNm: [1550, 775],
  notes: 'Tunable OPO line',
})
const unique = (s: string) => `${s} ${Date.now()}-${Math.floor(Math.random() * 1e6)}`

describe('/api/laser-setups', () => {
  it('creates with the next LS code, an audit row and the caution', async () => {
    const a = await safety.post('/api/laser-setups').send(body(unique('OPO bench')))
    const b = await safety.post('/api/laser-setups').send(body(unique('Ti:Sa bench')))
    expect(a.status).toBe(201)
    expect(a.body.code).toMatch(/^LS-\d{3,}$/)
    expect(Number(b.body.code.slice(3))).toBe(Number(a.body.code.slice(3)) + 1)
    expect(a.body.caution).toBe(LASER_CAUTION)
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'laser_setup'), eq(auditLog.entityId, a.body.id)))
    expect(audit.action).toBe('create')
  })

  it('lists (Page + caution) and shows the detail to everyone; 404 for an unknown id', async () => {
    const name = unique('Listed setup')
    const created = await safety.post('/api/laser-setups').send(body(name))
    const list = await optics.get(`/api/laser-setups?q=${encodeURIComponent(name)}`)
    expect(list.status).toBe(200)
    expect(list.body).toMatchObject({ total: 1, page: 1, pageSize: 25, caution: LASER_CAUTION })
    expect(list.body.rows[0].code).toBe(created.body.code)
    const detail = await optics.get(`/api/laser-setups/${created.body.id}`)
    expect(detail.body).toMatchObject({ name, wavelengthsNm: [1550, 775], retiredAt: null, caution: LASER_CAUTION })
    expect((await optics.get('/api/laser-setups/999999999')).status).toBe(404)
  })

  it('answers field-level 400s', async () => {
    const res = await safety
      .post('/api/laser-setups')
      .send({ name: '', room: 'B2', sourceType: 'lamp', wavelengthsNm: [] })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(['name', 'sourceType', 'wavelengthsNm']))
  })

  it('updates with an audit diff, retires only with a reason, and hides retired setups from the default list', async () => {
    const name = unique('Retiring setup')
    const { body: s } = await safety.post('/api/laser-setups').send(body(name))
    const upd = await safety.patch(`/api/laser-setups/${s.id}`).send({ room: 'B2.16' })
    expect(upd.body.room).toBe('B2.16')
    const audits = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'laser_setup'), eq(auditLog.entityId, s.id), eq(auditLog.action, 'update')))
    expect(audits[0].changes).toEqual({ room: { from: 'B2.14', to: 'B2.16' } })
    const noReason = await safety.post(`/api/laser-setups/${s.id}/retire`).send({})
    expect(noReason.status).toBe(400)
    expect(noReason.body.fields.reason).toBeTruthy()
    const retired = await safety.post(`/api/laser-setups/${s.id}/retire`).send({ reason: 'Laser head sent back' })
    expect(retired.status).toBe(200)
    expect(retired.body.retiredAt).toBeTruthy()
    expect((await optics.get(`/api/laser-setups?q=${encodeURIComponent(name)}`)).body.total).toBe(0)
    expect((await optics.get(`/api/laser-setups?includeRetired=true&q=${encodeURIComponent(name)}`)).body.total).toBe(1)
    expect((await safety.patch(`/api/laser-setups/${s.id}`).send({ room: 'X' })).status).toBe(400)
  })
})
