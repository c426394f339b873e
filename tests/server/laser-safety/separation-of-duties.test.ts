import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { and, eq, ne, sql } from 'drizzle-orm'
import { laserSetups, users } from '../../../server/db/schema/index'
import { createPerson, demoEmail, signedInAs, startTestApp } from '../helpers'
import { ROLES, type Role } from '../../../shared/roles'

/**
 * Separation of duties on the laser-safety register: the person who describes a hazard never
 * approves it. Tried as a curious insider would: naming someone else as submitter, editing then
 * approving, approving with the administrator role alone, approving a draft.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
const agents = {} as Record<Role, TestAgent>
let safety2: TestAgent
let safety2Id: number
const idOf = async (role: Role) =>
  (
    await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail(role)))
  )[0].id

beforeAll(async () => {
  t = await startTestApp()
  for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
  const second = await createPerson(t.db, ['safety_officer'], 'second-safety')
  safety2Id = second.id
  safety2 = await signedInAs(t.app, second.email)
})
afterAll(async () => {
  await t.stop()
})

const day = (n: number) => new Date(Date.now() + n * 86400_000).toISOString().slice(0, 10)
const setup = (extra: Record<string, unknown> = {}) => ({
  name: `SoD bench ${Date.now()}-${Math.floor(Math.random() * 1e6)}`,
  room: 'C1.03',
  sourceType: 'cw',
  wavelengthsNm: [532],
  maxAvgPowerMw: 50,
  beamDiameterMm: 1,
  eyewear: [{ description: 'Green goggle', bandsNm: '520–540', od: 4 }],
  interlocks: 'Key switch',
  ...extra,
})
/** `who` describes a setup and submits it. */
async function described(who: TestAgent, extra: Record<string, unknown> = {}): Promise<number> {
  const res = await who.post('/api/laser-setups').send(setup(extra))
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  expect((await who.post(`/api/laser-setups/${res.body.id}/submit`).send({})).status).toBe(200)
  return res.body.id
}
const approve = (who: TestAgent, id: number) =>
  who.post(`/api/laser-setups/${id}/approve`).send({ expiresOn: day(60), note: 'Seen on site' })

describe('the submitter is the signed-in author, set by the server', () => {
  it('a submitterId in a create body is 400, also null', async () => {
    const opticsId = await idOf('optics_staff')
    for (const submitterId of [opticsId, null]) {
      const res = await agents.safety_officer.post('/api/laser-setups').send(setup({ submitterId }))
      expect(res.status).toBe(400)
      expect(res.body.fields.submitterId[0]).toMatch(/cannot be named/)
    }
  })

  it('a submitterId in an update body is 400 and changes nothing', async () => {
    const id = await described(agents.safety_officer)
    const res = await agents.safety_officer
      .patch(`/api/laser-setups/${id}`)
      .send({ submitterId: await idOf('optics_staff') })
    expect(res.status).toBe(400)
    const [row] = await t.db.select().from(laserSetups).where(eq(laserSetups.id, id))
    expect(row.submittedById).toBe(await idOf('safety_officer'))
    // …and its author still cannot approve it.
    expect((await approve(agents.safety_officer, id)).status).toBe(403)
  })

  it('optics staff and group leads describe setups; they are the submitter of record', async () => {
    for (const role of ['optics_staff', 'group_lead'] as const) {
      const res = await agents[role].post('/api/laser-setups').send(setup())
      expect(res.status).toBe(201)
      expect(res.body.submitter.id).toBe(await idOf(role))
      expect(res.body.signoff.state).toBe('draft')
    }
  })
})

describe('only a safety officer signs off, never their own description', () => {
  it('the administrator role alone cannot approve, reject, revoke or read the queue', async () => {
    const id = await described(agents.optics_staff)
    expect((await approve(agents.admin, id)).status).toBe(403)
    expect((await agents.admin.post(`/api/laser-setups/${id}/reject`).send({ note: 'x' })).status).toBe(403)
    expect((await agents.admin.get('/api/laser-setups/queue')).status).toBe(403)
    expect((await approve(agents.safety_officer, id)).status).toBe(200)
    expect((await agents.admin.post(`/api/laser-setups/${id}/revoke`).send({ note: 'x' })).status).toBe(403)
  })

  it('the role × approve matrix: who may approve a setup described by the optics person, and one described by a safety officer', async () => {
    const byOptics = await described(agents.optics_staff)
    const bySafety = await described(agents.safety_officer)
    for (const role of ROLES) {
      const expected = role === 'safety_officer' ? 200 : 403
      expect((await approve(agents[role], byOptics)).status, `${role} on the optics person's setup`).toBe(expected)
      expect((await approve(agents[role], bySafety)).status, `${role} on the safety officer's own setup`).toBe(403)
    }
    expect((await approve(safety2, bySafety)).status, 'another safety officer').toBe(200)
  })

  it('whoever changed the hazard fields since the last decision cannot approve; a non-hazard edit does not bar', async () => {
    const id = await described(agents.optics_staff)
    expect((await safety2.patch(`/api/laser-setups/${id}`).send({ notes: 'Checked the label' })).status).toBe(200)
    const edited = await agents.safety_officer.patch(`/api/laser-setups/${id}`).send({ maxAvgPowerMw: 80 })
    expect(edited.status).toBe(200)
    expect(edited.body.approval).toMatchObject({ canApprove: false })
    expect(edited.body.approval.reason).toMatch(/You changed its hazard fields since its last decision/)
    const refused = await approve(agents.safety_officer, id)
    expect(refused.status).toBe(403)
    expect(refused.body.message).toMatch(/another safety officer must approve it/)
    expect((await safety2.get(`/api/laser-setups/${id}`)).body.approval).toMatchObject({
      canApprove: true,
      reason: null,
    })
    expect((await approve(safety2, id)).status).toBe(200)
  })

  it('a hazard edit of an approved setup lapses its sign-off back into the queue; its editor cannot approve it again', async () => {
    const id = await described(agents.optics_staff)
    expect((await approve(agents.safety_officer, id)).status).toBe(200)
    const edit = await safety2.patch(`/api/laser-setups/${id}`).send({ maxAvgPowerMw: 120, reason: 'Stronger pump' })
    expect(edit.body.signoff.state).toBe('voided')
    const queue = (await agents.safety_officer.get('/api/laser-setups/queue')).body
    expect(queue.waiting.map((s: { id: number }) => s.id)).toContain(id)
    expect((await approve(safety2, id)).status).toBe(403)
    expect((await approve(agents.safety_officer, id)).status).toBe(200)
  })

  it('when no other safety officer is left, the reason says so and how to fix it', async () => {
    const id = await described(agents.safety_officer)
    const soloId = await idOf('safety_officer')
    const others = await t.db
      .select({ id: users.id })
      .from(users)
      .where(and(eq(users.active, true), ne(users.id, soloId), sql`JSON_CONTAINS(${users.roles}, '"safety_officer"')`))
    try {
      for (const o of others) await t.db.update(users).set({ active: false }).where(eq(users.id, o.id))
      const { body } = await agents.safety_officer.get(`/api/laser-setups/${id}`)
      expect(body.approval).toMatchObject({ canApprove: false, eligibleOfficers: 0 })
      expect(body.approval.reason).toMatch(/no other safety officer.*an administrator adds a second safety officer/)
    } finally {
      for (const o of others) await t.db.update(users).set({ active: true }).where(eq(users.id, o.id))
    }
    expect(others.map((o) => o.id)).toContain(safety2Id)
  })
})

describe('a draft until its author submits it', () => {
  it('a new setup is a draft: not in the queue, cannot be approved or rejected, no mail to the safety officers', async () => {
    const res = await agents.optics_staff.post('/api/laser-setups').send(setup())
    expect(res.body).toMatchObject({ submittedAt: null, signoff: { state: 'draft' } })
    const queue = (await agents.safety_officer.get('/api/laser-setups/queue')).body
    expect(queue.waiting.map((s: { id: number }) => s.id)).not.toContain(res.body.id)
    expect((await approve(agents.safety_officer, res.body.id)).status).toBe(409)
    expect(
      (await agents.safety_officer.post(`/api/laser-setups/${res.body.id}/reject`).send({ note: 'x' })).status,
    ).toBe(409)
  })

  it('only its author submits, and only a complete description: every missing field is named at once', async () => {
    const res = await agents.optics_staff
      .post('/api/laser-setups')
      .send({ name: `Half-filled ${Date.now()}`, room: 'C1.03', sourceType: 'mode_locked', wavelengthsNm: [1030] })
    expect(res.status).toBe(201)
    expect((await agents.group_lead.post(`/api/laser-setups/${res.body.id}/submit`).send({})).status).toBe(403)
    const sub = await agents.optics_staff.post(`/api/laser-setups/${res.body.id}/submit`).send({})
    expect(sub.status).toBe(400)
    expect(Object.keys(sub.body.fields).sort()).toEqual([
      'beamDiameterMm',
      'eyewear',
      'interlocks',
      'maxAvgPowerMw',
      'pulseDurationFs',
      'repRateHz',
    ])
    expect((await agents.optics_staff.get(`/api/laser-setups/${res.body.id}`)).body.signoff.state).toBe('draft')
  })

  it('a rejected setup goes back to its author, who submits it again into the queue', async () => {
    const id = await described(agents.optics_staff)
    const rej = await agents.safety_officer
      .post(`/api/laser-setups/${id}/reject`)
      .send({ note: 'Name the goggle model' })
    expect(rej.body).toMatchObject({ submittedAt: null, signoff: { state: 'rejected' } })
    const again = await agents.optics_staff.post(`/api/laser-setups/${id}/submit`).send({})
    expect(again.body.signoff.state).toBe('waiting')
    const queue = (await agents.safety_officer.get('/api/laser-setups/queue')).body
    expect(queue.waiting.map((s: { id: number }) => s.id)).toContain(id)
    expect((await agents.optics_staff.post(`/api/laser-setups/${id}/submit`).send({})).status).toBe(409)
  })
})
