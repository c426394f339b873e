import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { count, eq, gte, isNull, sql } from 'drizzle-orm'
import {
  arrays,
  auditLog,
  chips,
  files,
  laserSetupSignoffs,
  laserSetups,
  locations,
  mailQueue,
  measurementSessions,
  users,
  wafers,
} from '../../../server/db/schema/index'
import { hazardHash } from '../../../server/services/laser-safety/setup-hazards'
import { startTestApp, signedInAs, createPerson, demoEmail, uniqueEmail } from '../helpers'
import { makeLaserSetup, makeSample, sessionBody } from '../measurements/fixtures-measurements'
import type { Overview } from '../../../shared/overview'

/**
 * GET /api/overview: one panel per role held, each list bounded with its full count. Counts are
 * checked as differences around rows this file adds (the API tests share one database).
 */
let t: Awaited<ReturnType<typeof startTestApp>>
const agents: Record<string, TestAgent> = {}
beforeAll(async () => {
  t = await startTestApp()
  for (const role of ['fab_technician', 'optics_staff', 'safety_officer', 'group_lead', 'admin'] as const)
    agents[role] = await signedInAs(t.app, role)
})
afterAll(async () => {
  await t.stop()
})

const overviewOf = async (agent: TestAgent): Promise<Overview> => {
  const res = await agent.get('/api/overview')
  expect(res.status).toBe(200)
  return res.body as Overview
}
/** `id` is among the shown items, unless the list is longer than what is shown (then exactly 10 are). */
const expectListed = (list: { items: { id: number }[]; total: number }, id: number, isListed = true) => {
  if (list.total > 10) expect(list.items).toHaveLength(10)
  else if (isListed) expect(list.items.map((x) => x.id)).toContain(id)
  else expect(list.items.map((x) => x.id)).not.toContain(id)
}
const day = (offset: number) => new Date(Date.now() + offset * 86400_000).toISOString().slice(0, 10)

describe('GET /api/overview: who sees which panel', () => {
  it('answers 401 to nobody signed in', async () => {
    const res = await request(t.app).get('/api/overview')
    expect(res.status).toBe(401)
  })

  it('gives each demo person only the panel of their role', async () => {
    const expected: Record<string, string[]> = {
      fab_technician: ['fab'],
      optics_staff: ['optics'],
      safety_officer: ['safety'],
      group_lead: ['lead'],
      admin: ['admin'],
    }
    for (const [role, panels] of Object.entries(expected)) {
      const o = await overviewOf(agents[role])
      expect(Object.keys(o.panels).sort(), role).toEqual(panels)
    }
  })

  it('gives a person with several roles one panel per role, and a person without roles none', async () => {
    const both = await createPerson(t.db, ['fab_technician', 'optics_staff', 'safety_officer'], 'multi')
    const o = await overviewOf(await signedInAs(t.app, both.email))
    expect(Object.keys(o.panels).sort()).toEqual(['fab', 'optics', 'safety'])
    const none = await createPerson(t.db, [], 'noroles')
    expect((await overviewOf(await signedInAs(t.app, none.email))).panels).toEqual({})
  })
})

describe('fab technician panel', () => {
  it('counts chips in process, steps of the last 7 days and wafers/chips whose label was never printed', async () => {
    const before = (await overviewOf(agents.fab_technician)).panels.fab!
    const s = await makeSample(t.db)
    const [{ id: chip2 }] = await t.db
      .insert(chips)
      .values({
        code: `${s.chipCode.slice(0, -3)}-02`,
        waferId: s.waferId,
        index: 2,
        widthMm: 5,
        heightMm: 5,
        status: 'in_process',
      })
      .$returningId()
    await t.db.update(chips).set({ status: 'in_process' }).where(eq(chips.id, s.chipId))
    const step = await agents.fab_technician.post(`/api/chips/${s.chipId}/fab-steps`).send({
      chipId: s.chipId,
      kind: 'inspection',
      params: { tool: 'optical microscope' },
      performedAt: new Date(Date.now() - 60_000).toISOString(),
    })
    expect(step.status).toBe(201)
    // A step performed 8 days ago is not "recent".
    await agents.fab_technician.post(`/api/chips/${s.chipId}/fab-steps`).send({
      chipId: s.chipId,
      kind: 'inspection',
      params: {},
      performedAt: new Date(Date.now() - 8 * 86400_000).toISOString(),
    })

    const after = (await overviewOf(agents.fab_technician)).panels.fab!
    expect(after.inProcess.total).toBe(before.inProcess.total + 2)
    expect(after.inProcess.items.map((c) => c.id)).toEqual(expect.arrayContaining([s.chipId, chip2]))
    expect(after.recentSteps.total).toBe(before.recentSteps.total + 1)
    expect(after.recentSteps.items[0]).toMatchObject({
      id: step.body.id,
      chipId: s.chipId,
      chipCode: s.chipCode,
      kind: 'inspection',
      operator: 'Tomasz Lindqvist',
    })
    // New wafer + two chips, none printed yet.
    expect(after.unlabelled.total).toBe(before.unlabelled.total + 3)
    expect(
      after.unlabelled.items
        .slice(0, 3)
        .map((i) => i.kind)
        .sort(),
    ).toEqual(['chip', 'chip', 'wafer'])
    for (const list of [after.inProcess, after.recentSteps, after.unlabelled])
      expect(list.items.length).toBeLessThanOrEqual(10)

    // "Print now" on the print page records a print job: those codes are no longer unprinted.
    const [w] = await t.db.select({ code: wafers.code }).from(wafers).where(eq(wafers.id, s.waferId))
    const job = await agents.fab_technician
      .post('/api/labels/jobs')
      .send({ template: 'chip-box', codes: [s.chipCode, w.code] })
    expect(job.status).toBe(201)
    const printed = (await overviewOf(agents.fab_technician)).panels.fab!
    expect(printed.unlabelled.total).toBe(after.unlabelled.total - 2)
    expect(printed.unlabelled.items.map((i) => i.code)).not.toContain(s.chipCode)
    expect(printed.unlabelled.items.map((i) => i.code)).not.toContain(w.code)

    // A used-up chip needs no label and is not in process.
    await t.db.update(chips).set({ status: 'used_up' }).where(eq(chips.id, chip2))
    const used = (await overviewOf(agents.fab_technician)).panels.fab!
    expect(used.unlabelled.total).toBe(printed.unlabelled.total - 1)
    expect(used.inProcess.total).toBe(printed.inProcess.total - 1)
  })
})

describe('optics staff panel', () => {
  it('lists my sessions, flagged sessions, arrays never measured and the setups I may use with their expiry', async () => {
    const before = (await overviewOf(agents.optics_staff)).panels.optics!
    // Signed off until tomorrow: the soonest expiry, so first in the bounded list.
    const setup = await setupWithSignoff(day(1))
    // GaAs (001), flat along [110]; single disks (a body of revolution). SHG selection rules for a
    // body of revolution of a -43m crystal on (001) (Frizyuk et al., Phys. Rev. B 99, 075425 (2019)):
    // a circular pump with m = +1 gives SH only with m ∈ {0, 4}, so nothing along the normal.
    const s = await makeSample(t.db, {
      arrays: [
        { shape: 'disk', lattice: 'single' },
        { shape: 'disk', lattice: 'single' },
        { shape: 'disk', lattice: 'single' },
      ],
    })
    const [a1, a2] = s.arrays
    const afterSample = (await overviewOf(agents.optics_staff)).panels.optics!
    expect(afterSample.neverMeasured.total).toBe(before.neverMeasured.total + 3)

    const consistent = await agents.optics_staff.post('/api/sessions').send(sessionBody(setup.id, [a1.id]))
    expect(consistent.status).toBe(201)
    const body = sessionBody(setup.id, [a2.id])
    body.results = [{ arrayId: a2.id, observedNormal: 'co' } as never] // forbidden along the normal: a contradiction
    const flagged = await agents.optics_staff.post('/api/sessions').send(body)
    expect(flagged.status).toBe(201)
    expect(flagged.body.results[0].flags.length).toBeGreaterThan(0)

    const after = (await overviewOf(agents.optics_staff)).panels.optics!
    expect(after.mySessions.total).toBe(before.mySessions.total + 2)
    expect(
      after.mySessions.items
        .slice(0, 2)
        .map((x) => x.id)
        .sort(),
    ).toEqual([consistent.body.id, flagged.body.id].sort())
    expect(after.mySessions.items.every((x) => x.operator === 'Priya Halvorsen')).toBe(true)
    expect(after.flagged.total).toBe(before.flagged.total + 1)
    const f = after.flagged.items.find((x) => x.id === flagged.body.id)!
    expect(f.firstFlag).toMatch(/^Emission along the normal observed where the engine forbids it/)
    expect(after.flagged.items.map((x) => x.id)).not.toContain(consistent.body.id)
    expect(after.neverMeasured.total).toBe(afterSample.neverMeasured.total - 2)
    expect(after.neverMeasured.items.map((x) => x.id)).toContain(s.arrays[2].id)
    expect(after.neverMeasured.items.map((x) => x.id)).not.toContain(a1.id)

    const usable = after.usableSetups.items.find((x) => x.code === setup.code)!
    expect(usable).toMatchObject({ state: 'approved', expiresOn: day(1), daysLeft: 1 })
    expect(after.usableSetups.total).toBe(before.usableSetups.total + 1)
    const expiries = after.usableSetups.items.map((x) => x.expiresOn!)
    expect([...expiries].sort()).toEqual(expiries)
  })

  it("does not count another person's sessions as mine", async () => {
    const setup = await makeLaserSetup(t.db)
    const s = await makeSample(t.db, { arrays: [{ shape: 'disk', lattice: 'single' }] })
    const other = await createPerson(t.db, ['optics_staff'], 'optics2')
    const before = (await overviewOf(agents.optics_staff)).panels.optics!
    const res = await (
      await signedInAs(t.app, other.email)
    )
      .post('/api/sessions')
      .send(sessionBody(setup.id, [s.arrays[0].id]))
    expect(res.status).toBe(201)
    const after = (await overviewOf(agents.optics_staff)).panels.optics!
    expect(after.mySessions.total).toBe(before.mySessions.total)
  })
})

/** A submitted setup with every hazard field, approved until `expiresOn` (or not decided). */
async function setupWithSignoff(expiresOn: string | null) {
  const s = await makeLaserSetup(t.db, false, 'none')
  if (expiresOn) {
    const [row] = await t.db.select().from(laserSetups).where(eq(laserSetups.id, s.id))
    const [safety] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('safety_officer')))
    await t.db.insert(laserSetupSignoffs).values({
      setupId: s.id,
      decision: 'approved',
      byId: safety.id,
      expiresOn,
      note: 'test',
      hazardHash: hazardHash(row),
    })
  }
  return s
}

describe('safety officer panel', () => {
  it('counts setups waiting, expiring within 30 days and expired, and sessions on setups that have since lapsed', async () => {
    const before = (await overviewOf(agents.safety_officer)).panels.safety!
    const waiting = await setupWithSignoff(null)
    const soon = await setupWithSignoff(day(29))
    const later = await setupWithSignoff(day(31))
    const lapsing = await setupWithSignoff(day(5))
    const s = await makeSample(t.db, { arrays: [{ shape: 'disk', lattice: 'single' }] })
    const session = await agents.optics_staff.post('/api/sessions').send(sessionBody(lapsing.id, [s.arrays[0].id]))
    expect(session.status).toBe(201)
    // Its sign-off lapses after the session was logged (a later decision row, as a renewal that ran out would leave).
    const [row] = await t.db.select().from(laserSetups).where(eq(laserSetups.id, lapsing.id))
    const [safety] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('safety_officer')))
    await t.db.insert(laserSetupSignoffs).values({
      setupId: lapsing.id,
      decision: 'approved',
      byId: safety.id,
      expiresOn: day(-1),
      note: 'lapsed',
      hazardHash: hazardHash(row),
    })

    const after = (await overviewOf(agents.safety_officer)).panels.safety!
    expect(after.waiting.total).toBe(before.waiting.total + 1)
    expectListed(after.waiting, waiting.id)
    expect(after.expiring.total).toBe(before.expiring.total + 1)
    expectListed(after.expiring, soon.id)
    expectListed(after.expiring, later.id, false)
    expect(after.expiring.items.every((x) => x.daysLeft !== null && x.daysLeft >= 0 && x.daysLeft <= 30)).toBe(true)
    expect(after.expired.total).toBe(before.expired.total + 1)
    expectListed(after.expired, lapsing.id)
    expect(after.lapsedSessions.total).toBe(before.lapsedSessions.total + 1)
    expect(after.lapsedSessions.items.find((x) => x.id === session.body.id)).toMatchObject({
      setupId: lapsing.id,
      setupState: 'expired',
      setupExpiresOn: day(-1),
    })
  })
})

describe('group lead panel', () => {
  it("counts the inventory in use and the week's audit trail, and offers the export", async () => {
    const lead = (await overviewOf(agents.group_lead)).panels.lead!
    const n = async (q: Promise<{ n: number }[]>) => Number((await q)[0].n)
    expect(lead.counts).toEqual({
      wafers: await n(
        t.db
          .select({ n: count() })
          .from(wafers)
          .where(sql`${wafers.status} NOT IN ('used_up', 'retired')`),
      ),
      chips: await n(
        t.db
          .select({ n: count() })
          .from(chips)
          .where(sql`${chips.status} NOT IN ('used_up', 'retired')`),
      ),
      chipsInProcess: await n(t.db.select({ n: count() }).from(chips).where(eq(chips.status, 'in_process'))),
      arrays: await n(t.db.select({ n: count() }).from(arrays).where(isNull(arrays.retiredAt))),
      sessions: await n(t.db.select({ n: count() }).from(measurementSessions)),
      locations: await n(t.db.select({ n: count() }).from(locations).where(isNull(locations.retiredAt))),
      laserSetups: await n(t.db.select({ n: count() }).from(laserSetups).where(isNull(laserSetups.retiredAt))),
    })
    const since = new Date(Date.now() - 7 * 86400_000)
    expect(lead.activity.total).toBeGreaterThan(0)
    expect(lead.activity.total).toBeLessThanOrEqual(
      await n(t.db.select({ n: count() }).from(auditLog).where(gte(auditLog.at, since))),
    )
    expect(Object.values(lead.activity.byAction).reduce((a, b) => a + b, 0)).toBe(lead.activity.total)
    expect(lead.activity.items.length).toBe(Math.min(10, lead.activity.total))
    expect(lead.canExport).toBe(true)

    // One more change shows at the top of the week's activity, with its code.
    const s = await makeSample(t.db)
    const res = await agents.fab_technician
      .patch(`/api/chips/${s.chipId}`)
      .send({ notes: 'overview test', reason: 'overview test' })
    expect(res.status).toBe(200)
    const next = (await overviewOf(agents.group_lead)).panels.lead!
    expect(next.activity.total).toBe(lead.activity.total + 1)
    expect(next.activity.items[0]).toMatchObject({
      entity: 'chip',
      entityId: s.chipId,
      code: s.chipCode,
      action: 'update',
      user: 'Tomasz Lindqvist',
    })
  })
})

describe('administrator panel', () => {
  it('counts pending invitations, undelivered mail and the stored files', async () => {
    const before = (await overviewOf(agents.admin)).panels.admin!
    const email = uniqueEmail('invitee')
    const inv = await agents.admin
      .post('/api/users/invite')
      .send({ email, name: 'Overview Invitee', roles: ['optics_staff'] })
    expect(inv.status).toBe(201)
    // An invitation whose link ran out is counted apart.
    const lapsedEmail = uniqueEmail('lapsed')
    const inv2 = await agents.admin
      .post('/api/users/invite')
      .send({ email: lapsedEmail, name: 'Lapsed Invitee', roles: ['fab_technician'] })
    expect(inv2.status).toBe(201)
    await t.db.execute(
      sql`UPDATE invitations SET expires_at = ${new Date(Date.now() - 1000)} WHERE user_id = ${inv2.body.user.id}`,
    )
    await t.db.insert(mailQueue).values({
      toAddress: 'nobody@kestrel-lab.example',
      subject: 'Overview test failed',
      textBody: 'x',
      status: 'failed',
      attempts: 5,
      lastError: 'refused',
    })

    const after = (await overviewOf(agents.admin)).panels.admin!
    expect(after.invitations.total).toBe(before.invitations.total + 1)
    expect(after.invitations.items[0]).toMatchObject({ email, name: 'Overview Invitee' })
    expect(after.invitations.expired).toBe(before.invitations.expired + 1)
    // Two invitation mails queued (the worker is not ticked here) and one given up.
    expect(after.undelivered.total).toBe(before.undelivered.total + 3)
    expect(after.undelivered.failed).toBe(before.undelivered.failed + 1)
    expect(after.undelivered.items.find((m) => m.subject === 'Overview test failed')).toMatchObject({
      status: 'failed',
      attempts: 5,
    })
    // Delivered mail is not listed.
    await t.worker.tick()
    const sent = (await overviewOf(agents.admin)).panels.admin!
    expect(sent.undelivered.total).toBe(after.undelivered.total - 2)

    // Storage holds each content once, also of retired files (they are never deleted).
    const blobs = await t.db
      .select({ sha: files.sha256, size: sql<number>`MAX(${files.sizeBytes})` })
      .from(files)
      .groupBy(files.sha256)
    expect(after.storage).toMatchObject({
      kind: 'local',
      files: blobs.length,
      bytes: blobs.reduce((a, b) => a + Number(b.size), 0),
    })
    expect(after.storage.freeBytes).toBeGreaterThan(0)
  })

  it('an administrator who is also a group lead gets both panels; neither shows to a fab technician', async () => {
    const p = await createPerson(t.db, ['admin', 'group_lead'], 'adminlead')
    const o = await overviewOf(await signedInAs(t.app, p.email))
    // a second active administrator would change what other files' tests may do (the last admin rule)
    await t.db.update(users).set({ active: false }).where(eq(users.id, p.id))
    expect(Object.keys(o.panels).sort()).toEqual(['admin', 'lead'])
    const fab = await overviewOf(agents.fab_technician)
    expect(fab.panels.admin).toBeUndefined()
    expect(fab.panels.lead).toBeUndefined()
    expect(JSON.stringify(fab)).not.toContain('invitations')
  })
})
