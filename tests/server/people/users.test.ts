import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import { and, eq, inArray } from 'drizzle-orm'
import { startTestApp, signedInAs, uniqueEmail, demoEmail, deliveredTo } from '../helpers'
import { auditLog, users, mailQueue } from '../../../server/db/schema/index'

let t: Awaited<ReturnType<typeof startTestApp>>
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await t.stop()
})

/** Mail from other test files may wait in the shared queue ahead of ours: these tests may take a while to see it. */
const MAIL_WAIT_MS = 120_000

describe('people', () => {
  it('lists people for admins and group leads, never with password hashes', async () => {
    for (const role of ['admin', 'group_lead'] as const) {
      const res = await (await signedInAs(t.app, role)).get('/api/users')
      expect(res.status).toBe(200)
      expect(res.body.users.length).toBeGreaterThanOrEqual(5)
      expect(JSON.stringify(res.body)).not.toMatch(/scrypt\$/)
    }
  })

  it(
    'invites a person by e-mail with a one-time link that signs them in',
    async () => {
      const email = uniqueEmail('invitee')
      const admin = await signedInAs(t.app, 'admin')
      const res = await admin
        .post('/api/users/invite')
        .send({ email, name: 'Lior Castellanos', roles: ['optics_staff'] })
      expect(res.status).toBe(201)
      expect(res.body.user).toMatchObject({ email, invitePending: true, roles: ['optics_staff'] })

      const mail = await deliveredTo(t, email)
      expect(mail.subject).toMatch(/invitation/i)
      const token = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail.textBody)![1]

      const info = await request(t.app).get(`/api/auth/invite/${token}`)
      expect(info.body).toEqual({ email, name: 'Lior Castellanos' })

      const agent = request.agent(t.app)
      const accept = await agent.post('/api/auth/accept-invite').send({ token, password: 'a-long-new-password' })
      expect(accept.status).toBe(200)
      expect(accept.body.user).toMatchObject({ email, invitePending: false })
      expect((await agent.get('/api/auth/me')).body.user.roles).toEqual(['optics_staff'])

      const again = await request(t.app)
        .post('/api/auth/accept-invite')
        .send({ token, password: 'another-long-password' })
      expect(again.status).toBe(404)

      const [row] = await t.db.select().from(users).where(eq(users.email, email))
      const audits = await t.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.entity, 'user'), eq(auditLog.entityId, row.id)))
      expect(audits.map((a) => a.action).sort()).toEqual(['create', 'update'])
    },
    MAIL_WAIT_MS,
  )

  it('refuses a duplicate e-mail and writes nothing', async () => {
    const admin = await signedInAs(t.app, 'admin')
    const before = (await t.db.select().from(mailQueue)).length
    const res = await admin
      .post('/api/users/invite')
      .send({ email: demoEmail('fab_technician'), name: 'Someone Else', roles: ['fab_technician'] })
    expect(res.status).toBe(409)
    expect(res.body.fields.email[0]).toMatch(/already/)
    expect((await t.db.select().from(mailQueue)).length).toBe(before)
  })

  it('gives field-level messages for a bad invitation', async () => {
    const admin = await signedInAs(t.app, 'admin')
    const res = await admin.post('/api/users/invite').send({ email: 'x', name: '', roles: ['wizard'] })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields).sort()).toEqual(['email', 'name', 'roles.0'])
  })

  it('lets only an administrator grant the administrator role', async () => {
    const lead = await signedInAs(t.app, 'group_lead')
    const res = await lead
      .post('/api/users/invite')
      .send({ email: uniqueEmail('would-be-admin'), name: 'Would Be', roles: ['admin'] })
    expect(res.status).toBe(400)
    expect(res.body.fields.roles[0]).toMatch(/administrator/)
  })

  it(
    'assigns roles and deactivates, with audit rows; a deactivated person is signed out and cannot sign in',
    async () => {
      const email = uniqueEmail('leaver')
      const admin = await signedInAs(t.app, 'admin')
      const { body } = await admin
        .post('/api/users/invite')
        .send({ email, name: 'Rafe Montgomery-Ito', roles: ['fab_technician'] })
      const id = body.user.id
      const token = /\/invite\/([A-Za-z0-9_-]+)/.exec((await deliveredTo(t, email)).textBody)![1]
      const leaver = request.agent(t.app)
      expect((await leaver.post('/api/auth/accept-invite').send({ token, password: 'leaver-password-1' })).status).toBe(
        200,
      )

      const lead = await signedInAs(t.app, 'group_lead')
      const upd = await lead
        .patch(`/api/users/${id}`)
        .send({ roles: ['fab_technician', 'optics_staff'], reason: 'Joins the optics team' })
      expect(upd.status).toBe(200)
      expect(upd.body.user.roles).toEqual(['fab_technician', 'optics_staff'])
      const off = await lead.patch(`/api/users/${id}`).send({ active: false, reason: 'Left the lab' })
      expect(off.body.user.active).toBe(false)

      const audits = await t.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.entity, 'user'), eq(auditLog.entityId, id), eq(auditLog.action, 'update')))
      expect(audits.find((a) => a.changes.roles)?.changes.roles).toEqual({
        from: ['fab_technician'],
        to: ['fab_technician', 'optics_staff'],
      })
      expect(audits.find((a) => a.changes.active)?.changes.active).toEqual({ from: true, to: false })

      expect((await leaver.get('/api/auth/me')).status).toBe(401)
      expect((await request(t.app).post('/api/auth/login').send({ email, password: 'leaver-password-1' })).status).toBe(
        401,
      )
    },
    MAIL_WAIT_MS,
  )

  it('keeps at least one active administrator and refuses self-deactivation', async () => {
    const admin = await signedInAs(t.app, 'admin')
    const me = (await admin.get('/api/auth/me')).body.user
    const self = await admin.patch(`/api/users/${me.id}`).send({ active: false })
    expect(self.status).toBe(400)
    expect(self.body.fields.active[0]).toMatch(/your own/)
    // The rule is about the last administrator: other files may have left active administrators behind.
    const others = (await t.db.select({ id: users.id, roles: users.roles }).from(users).where(eq(users.active, true)))
      .filter((u) => u.id !== me.id && u.roles.includes('admin'))
      .map((u) => u.id)
    if (others.length) await t.db.update(users).set({ active: false }).where(inArray(users.id, others))
    try {
      const demote = await admin.patch(`/api/users/${me.id}`).send({ roles: ['group_lead'], reason: 'Hand over' })
      expect(demote.status).toBe(400)
      expect(demote.body.fields.roles[0]).toMatch(/at least one active administrator/)
    } finally {
      await t.db
        .update(users)
        .set({ roles: ['admin'] })
        .where(eq(users.id, me.id))
      if (others.length) await t.db.update(users).set({ active: true }).where(inArray(users.id, others))
    }
  })

  it('rejects a non-numeric id with 400 and an unknown one with 404', async () => {
    const admin = await signedInAs(t.app, 'admin')
    expect((await admin.patch('/api/users/abc').send({ name: 'Xx Yy' })).status).toBe(400)
    expect((await admin.patch('/api/users/999999').send({ name: 'Xx Yy' })).status).toBe(404)
  })

  it('finds people from the global search', async () => {
    const agent = await signedInAs(t.app, 'fab_technician')
    const res = await agent.get('/api/search').query({ q: 'okafor' })
    expect(res.status).toBe(200)
    expect(res.body.hits[0]).toMatchObject({ kind: 'person', label: 'Maren Okafor' })
    expect((await agent.get('/api/search').query({ q: '' })).status).toBe(400)
    // LIKE wildcards typed in the box are plain characters (and no word for the notes' FULLTEXT search)
    expect((await agent.get('/api/search').query({ q: '%_%' })).body.hits).toEqual([])
  })
})
