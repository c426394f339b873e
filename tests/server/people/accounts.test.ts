import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import { and, desc, eq } from 'drizzle-orm'
import { auditLog, users } from '../../../server/db/schema/index'
import { createPerson, deliveredTo, demoEmail, signedInAs, startTestApp, uniqueEmail } from '../helpers'
import { DEMO_PASSWORD } from '../../../server/db/seed/people'

/**
 * Roles, sessions and sign-in tried as a curious insider and a careless user would: granting
 * protected roles, changing one's own roles, leaving no trace, keeping sessions after a password
 * change, guessing over many addresses, reading one-time links from the outbox.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await t.stop()
})

const idOf = async (email: string) => (await t.db.select().from(users).where(eq(users.email, email)))[0].id
const auditOf = (id: number) =>
  t.db
    .select()
    .from(auditLog)
    .where(and(eq(auditLog.entity, 'user'), eq(auditLog.entityId, id)))
    .orderBy(desc(auditLog.id))
describe('who grants which role', () => {
  it('a group lead cannot grant or remove admin or safety officer, by invitation or by change', async () => {
    const lead = await signedInAs(t.app, 'group_lead')
    for (const roles of [['admin'], ['safety_officer'], ['optics_staff', 'safety_officer']]) {
      const inv = await lead
        .post('/api/users/invite')
        .send({ email: uniqueEmail('grant'), name: 'Noor Patel-Berg', roles })
      expect(inv.status, JSON.stringify(roles)).toBe(400)
      expect(inv.body.fields.roles[0]).toMatch(/Only an administrator grants/)
    }
    const p = await createPerson(t.db, ['optics_staff'], 'grant-target')
    const up = await lead
      .patch(`/api/users/${p.id}`)
      .send({ roles: ['optics_staff', 'safety_officer'], reason: 'Needs it' })
    expect(up.status).toBe(403)
    expect(up.body.fields.roles[0]).toMatch(/Only an administrator grants or removes Safety officer/)
    const so = await createPerson(t.db, ['safety_officer'], 'so-target')
    expect((await lead.patch(`/api/users/${so.id}`).send({ roles: ['optics_staff'], reason: 'x' })).status).toBe(403)
    expect((await lead.patch(`/api/users/${so.id}`).send({ active: false, reason: 'x' })).status).toBe(403)
    // The administrator may.
    const admin = await signedInAs(t.app, 'admin')
    expect(
      (
        await admin
          .patch(`/api/users/${p.id}`)
          .send({ roles: ['optics_staff', 'safety_officer'], reason: 'Second safety officer' })
      ).status,
    ).toBe(200)
  })

  it("a group lead manages other people's roles, never their own", async () => {
    const lead = await createPerson(t.db, ['group_lead'], 'lead-self')
    const agent = await signedInAs(t.app, lead.email)
    const self = await agent
      .patch(`/api/users/${lead.id}`)
      .send({ roles: ['group_lead', 'fab_technician'], reason: 'Helping out' })
    expect(self.status).toBe(403)
    expect(self.body.fields.roles[0]).toMatch(/own roles/)
    const other = await createPerson(t.db, ['fab_technician'], 'lead-other')
    expect(
      (
        await agent
          .patch(`/api/users/${other.id}`)
          .send({ roles: ['fab_technician', 'optics_staff'], reason: 'Cross-training' })
      ).status,
    ).toBe(200)
    // Renaming oneself is not a role change.
    expect((await agent.patch(`/api/users/${lead.id}`).send({ name: 'Test lead renamed' })).status).toBe(200)
  })

  it("every role change and (de)activation needs a reason and is in the person's history: who, before → after, why", async () => {
    const admin = await signedInAs(t.app, 'admin')
    const p = await createPerson(t.db, ['fab_technician'], 'audited')
    const noReason = await admin.patch(`/api/users/${p.id}`).send({ roles: ['optics_staff'] })
    expect(noReason.status).toBe(400)
    expect(noReason.body.fields.reason[0]).toMatch(/Say why the roles change/)
    expect(
      (await admin.patch(`/api/users/${p.id}`).send({ roles: ['optics_staff'], reason: 'Moved to the optics bench' }))
        .status,
    ).toBe(200)
    expect((await admin.patch(`/api/users/${p.id}`).send({ active: false })).body.fields.reason[0]).toMatch(
      /deactivated/,
    )
    expect((await admin.patch(`/api/users/${p.id}`).send({ active: false, reason: 'Contract ended' })).status).toBe(200)
    const history = (await admin.get(`/api/audit/records/user/${p.id}`)).body
    const text = JSON.stringify(history)
    expect(text).toContain('Moved to the optics bench')
    expect(text).toContain('Contract ended')
    const rows = await auditOf(p.id)
    expect(rows.find((r) => r.changes.roles)).toMatchObject({
      userId: await idOf(demoEmail('admin')),
      changes: { roles: { from: ['fab_technician'], to: ['optics_staff'] } },
      reason: 'Moved to the optics bench',
    })
    expect(rows.find((r) => r.changes.active)).toMatchObject({
      changes: { active: { from: true, to: false } },
      reason: 'Contract ended',
    })
  })
})

describe('sessions', () => {
  it('changing your password ends your other sessions and keeps this one', async () => {
    const p = await createPerson(t.db, ['optics_staff'], 'pw-change')
    const here = await signedInAs(t.app, p.email)
    const laptop = await signedInAs(t.app, p.email)
    expect((await laptop.get('/api/auth/me')).status).toBe(200)
    const res = await here
      .post('/api/auth/password')
      .send({ currentPassword: DEMO_PASSWORD, newPassword: 'tidal orbit of quiet lenses' })
    expect(res.status).toBe(204)
    expect((await here.get('/api/auth/me')).status).toBe(200)
    expect((await laptop.get('/api/auth/me')).status).toBe(401)
  })

  it("an administrator ends a person's sessions (with a reason, in the history); nobody else can", async () => {
    const p = await createPerson(t.db, ['fab_technician'], 'end-sessions')
    const phone = await signedInAs(t.app, p.email)
    const lead = await signedInAs(t.app, 'group_lead')
    expect((await lead.post(`/api/users/${p.id}/end-sessions`).send({ reason: 'x' })).status).toBe(403)
    const admin = await signedInAs(t.app, 'admin')
    expect((await admin.post(`/api/users/${p.id}/end-sessions`).send({})).body.fields.reason).toEqual(['Say why'])
    const res = await admin.post(`/api/users/${p.id}/end-sessions`).send({ reason: 'Phone lost' })
    expect(res.status).toBe(200)
    expect(res.body.ended).toBeGreaterThanOrEqual(1)
    expect((await phone.get('/api/auth/me')).status).toBe(401)
    expect((await auditOf(p.id))[0]).toMatchObject({ reason: 'Phone lost', changes: { sessions: { to: 'ended' } } })
  })

  it("a role change ends the person's sessions, so they sign in again with what they may now do", async () => {
    const p = await createPerson(t.db, ['optics_staff'], 'role-session')
    const agent = await signedInAs(t.app, p.email)
    const admin = await signedInAs(t.app, 'admin')
    expect(
      (await admin.patch(`/api/users/${p.id}`).send({ roles: ['fab_technician'], reason: 'Moved to the cleanroom' }))
        .status,
    ).toBe(200)
    expect((await agent.get('/api/auth/me')).status).toBe(401)
  })
})

describe('passwords', () => {
  it("refuses a common or guessable password with the estimator's feedback; accepts a long unusual one", async () => {
    const p = await createPerson(t.db, ['optics_staff'], 'weak-pw')
    const agent = await signedInAs(t.app, p.email)
    for (const weak of ['password1234', 'qwertyuiop12', 'Password2026!']) {
      const res = await agent.post('/api/auth/password').send({ currentPassword: DEMO_PASSWORD, newPassword: weak })
      expect(res.status, weak).toBe(400)
      expect(res.body.fields.newPassword[0], weak).toMatch(/too easy to guess\. .+/)
    }
    expect(
      (await agent.post('/api/auth/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'short' })).body
        .fields.newPassword[0],
    ).toMatch(/at least 10/)
    expect(
      (
        await agent
          .post('/api/auth/password')
          .send({ currentPassword: DEMO_PASSWORD, newPassword: 'marble canyon under violet rain' })
      ).status,
    ).toBe(204)
  })

  it("refuses a password made of the person's own name or e-mail", async () => {
    const p = await createPerson(t.db, ['optics_staff'], 'vrendlakor')
    const agent = await signedInAs(t.app, p.email)
    const res = await agent
      .post('/api/auth/password')
      .send({ currentPassword: DEMO_PASSWORD, newPassword: 'Vrendlakor2026' })
    expect(res.status).toBe(400)
    expect(res.body.fields.newPassword[0]).toMatch(/too easy to guess/)
  })

  it('an administrator sends a password-reset link: stored hashed, masked in the outbox, works once, in the history', async () => {
    const p = await createPerson(t.db, ['fab_technician'], 'reset')
    const old = await signedInAs(t.app, p.email)
    const admin = await signedInAs(t.app, 'admin')
    expect(
      (await (await signedInAs(t.app, 'group_lead')).post(`/api/users/${p.id}/password-reset`).send({ reason: 'x' }))
        .status,
    ).toBe(403)
    expect((await admin.post(`/api/users/${p.id}/password-reset`).send({ reason: 'Forgot it' })).status).toBe(204)
    expect((await old.get('/api/auth/me')).status).toBe(401)
    const mail = await deliveredTo(t, p.email)
    const token = /\/invite\/([A-Za-z0-9_-]{20,})/.exec(mail.textBody)![1]
    // The outbox as an administrator sees it: the link is masked, the token appears nowhere.
    const shown = await admin.get(`/api/mail/${mail.id}`)
    expect(shown.status).toBe(200)
    expect(JSON.stringify(shown.body)).not.toContain(token)
    expect(shown.body.text).toContain(`/invite/••••${token.slice(-4)}`)
    // Stored hashed only: the token is in no invitation row.
    const [rows] = (await t.pool.query('SELECT token_hash FROM invitations')) as unknown as [{ token_hash: string }[]]
    expect(JSON.stringify(rows)).not.toContain(token)
    const set = await request(t.app)
      .post('/api/auth/accept-invite')
      .send({ token, password: 'lantern ferry beneath cedar hills' })
    expect(set.status).toBe(200)
    expect(
      (
        await request(t.app)
          .post('/api/auth/accept-invite')
          .send({ token, password: 'lantern ferry beneath cedar hills' })
      ).status,
    ).toBe(404)
    expect(
      (await auditOf(p.id)).some(
        (r) => r.reason === 'Forgot it' && (r.changes.password as { to: string }).to === 'reset link sent',
      ),
    ).toBe(true)
  }, 120_000)

  it('the queue keeps a sent message with its one-time link masked', async () => {
    const admin = await signedInAs(t.app, 'admin')
    const email = uniqueEmail('queue-mask')
    expect(
      (await admin.post('/api/users/invite').send({ email, name: 'Odile Marchetti', roles: ['optics_staff'] })).status,
    ).toBe(201)
    const mail = await deliveredTo(t, email)
    const token = /\/invite\/([A-Za-z0-9_-]{20,})/.exec(mail.textBody)![1]
    const [rows] = (await t.pool.query('SELECT text_body, html_body FROM mail_queue WHERE to_address = ?', [
      email,
    ])) as unknown as [{ text_body: string; html_body: string }[]]
    expect(rows.length).toBe(1)
    expect(JSON.stringify(rows)).not.toContain(token)
  }, 120_000)
})

describe('sign-in throttling per account', () => {
  it('guesses spread over many addresses are throttled for the account, with the stated wait', async () => {
    const p = await createPerson(t.db, ['optics_staff'], 'spread')
    const statuses: number[] = []
    // LOGIN_MAX_FAILURES is 5 in tests: the account allows 10 failures from anywhere in 5 minutes.
    for (let i = 0; i < 11; i++) {
      statuses.push(
        (
          await request(t.app)
            .post('/api/auth/login')
            .set('X-Forwarded-For', `198.51.100.${i + 1}`)
            .send({ email: p.email, password: `guess-number-${i}` })
        ).status,
      )
    }
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(401))
    expect(statuses[10]).toBe(429)
    const fresh = await request(t.app)
      .post('/api/auth/login')
      .set('X-Forwarded-For', '203.0.113.9')
      .send({ email: p.email, password: DEMO_PASSWORD })
    expect(fresh.status).toBe(429)
    expect(fresh.body.message).toMatch(/Wait 5 minutes/)
    // Another account from the same addresses is not affected.
    const other = await createPerson(t.db, ['optics_staff'], 'spread-other')
    expect(
      (
        await request(t.app)
          .post('/api/auth/login')
          .set('X-Forwarded-For', '198.51.100.1')
          .send({ email: other.email, password: DEMO_PASSWORD })
      ).status,
    ).toBe(200)
  })
})
