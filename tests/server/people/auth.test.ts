import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import { startTestApp, signedInAs, demoEmail, uniqueEmail } from '../helpers'
import { DEMO_PASSWORD } from '../../../server/db/seed/people'

let t: Awaited<ReturnType<typeof startTestApp>>
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await t.stop()
})

describe('sign-in', () => {
  it('rejects a malformed body with field-level messages', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: 'not-an-email', password: '' })
    expect(res.status).toBe(400)
    expect(res.body.fields.email[0]).toMatch(/valid e-mail/)
    expect(res.body.fields.password[0]).toMatch(/password/)
  })

  it('rejects a wrong password with 401 and no session', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: demoEmail('optics_staff'), password: 'wrong-password' })
    expect(res.status).toBe(401)
    expect(res.headers['set-cookie']).toBeUndefined()
  })

  it('signs in, keeps the session, signs out', async () => {
    const agent = request.agent(t.app)
    const login = await agent
      .post('/api/auth/login')
      .send({ email: demoEmail('fab_technician'), password: DEMO_PASSWORD })
    expect(login.status).toBe(200)
    expect(login.body.user).toMatchObject({ email: demoEmail('fab_technician'), roles: ['fab_technician'] })
    expect(login.body.user.passwordHash).toBeUndefined()
    const cookie = String(login.headers['set-cookie'])
    expect(cookie).toMatch(/sid=/)
    expect(cookie).toMatch(/HttpOnly/)
    expect(cookie).toMatch(/SameSite=Lax/)
    expect((await agent.get('/api/auth/me')).status).toBe(200)
    expect((await agent.post('/api/auth/logout')).status).toBe(204)
    expect((await agent.get('/api/auth/me')).status).toBe(401)
  })

  it('stores sessions in MariaDB, so a second app server accepts them', async () => {
    const login = await request(t.app)
      .post('/api/auth/login')
      .send({ email: demoEmail('safety_officer'), password: DEMO_PASSWORD })
    const sid = String(login.headers['set-cookie']).split(';')[0]
    const other = await startTestApp()
    try {
      const res = await request(other.app).get('/api/auth/me').set('Cookie', sid)
      expect(res.status).toBe(200)
      expect(res.body.user.email).toBe(demoEmail('safety_officer'))
    } finally {
      await other.stop()
    }
  })

  it('issues a new session id on sign-in (no session fixation)', async () => {
    const planted = 's%3Aattacker-chosen-id.invalidsignature'
    const res = await request(t.app)
      .post('/api/auth/login')
      .set('Cookie', `sid=${planted}`)
      .send({ email: demoEmail('group_lead'), password: DEMO_PASSWORD })
    expect(res.status).toBe(200)
    const set = String(res.headers['set-cookie'])
    expect(set).toMatch(/sid=/)
    expect(set).not.toContain('attacker-chosen-id')
  })

  it('throttles repeated failed sign-ins for one e-mail', async () => {
    const email = uniqueEmail('nobody-throttle')
    const statuses: number[] = []
    for (let i = 0; i < 7; i++)
      statuses.push(
        (
          await request(t.app)
            .post('/api/auth/login')
            .send({ email, password: 'guess-' + i })
        ).status,
      )
    expect(statuses.slice(0, 5)).toEqual([401, 401, 401, 401, 401])
    expect(statuses[6]).toBe(429)
  })

  it('counts failed sign-ins in MariaDB: guesses spread over two app servers are throttled together', async () => {
    const other = await startTestApp()
    try {
      const email = uniqueEmail('spread-guesses')
      const statuses: number[] = []
      // LOGIN_MAX_FAILURES is 5 in tests: 3 guesses on one server, then 3 on the other.
      for (let i = 0; i < 6; i++)
        statuses.push(
          (
            await request(i < 3 ? t.app : other.app)
              .post('/api/auth/login')
              .send({ email, password: 'guess-' + i })
          ).status,
        )
      expect(statuses).toEqual([401, 401, 401, 401, 401, 429])
      // The stored key is a hash: the e-mail address is not kept in the table.
      const [rows] = (await t.pool.query('SELECT hit_key, hits FROM throttle_hits WHERE hits >= 5')) as unknown as [
        { hit_key: string; hits: number }[],
      ]
      expect(rows.length).toBeGreaterThan(0)
      expect(JSON.stringify(rows)).not.toContain('spread-guesses')
    } finally {
      await other.stop()
    }
  })

  it('does not sign in a deactivated person', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .send({ email: 'unknown-person@kestrel-lab.example', password: DEMO_PASSWORD })
    expect(res.status).toBe(401)
  })
})

describe('request hygiene', () => {
  it('refuses a cross-site POST by Origin and by Sec-Fetch-Site', async () => {
    const a = await request(t.app)
      .post('/api/auth/login')
      .set('Origin', 'http://evil.example')
      .send({ email: demoEmail('admin'), password: DEMO_PASSWORD })
    expect(a.status).toBe(403)
    const b = await request(t.app)
      .post('/api/auth/login')
      .set('Sec-Fetch-Site', 'cross-site')
      .send({ email: demoEmail('admin'), password: DEMO_PASSWORD })
    expect(b.status).toBe(403)
  })

  it('accepts a same-origin POST', async () => {
    const res = await request(t.app)
      .post('/api/auth/login')
      .set('Host', 'lab.test')
      .set('Origin', 'http://lab.test')
      .send({ email: demoEmail('admin'), password: DEMO_PASSWORD })
    expect(res.status).toBe(200)
  })

  it('sets helmet security headers', async () => {
    const res = await request(t.app).get('/api/health')
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['content-security-policy']).toMatch(/default-src 'self'/)
    expect(res.headers['x-powered-by']).toBeUndefined()
    expect(res.headers['x-request-id']).toMatch(/^[\w-]{8,}$/)
  })

  it('answers unknown API routes with a JSON 404', async () => {
    const res = await request(t.app).get('/api/no-such-thing')
    expect(res.status).toBe(404)
    expect(res.body.error).toBe('not_found')
  })

  it('answers broken JSON with a 400, not a 500', async () => {
    const res = await request(t.app).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email":')
    expect(res.status).toBe(400)
    expect(res.body.message).toMatch(/JSON/)
  })

  it('reports database status on /api/health', async () => {
    const res = await request(t.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'ok', database: 'up' })
  })
})

describe('my account', () => {
  it('refuses a wrong current password with a field message', async () => {
    const agent = await signedInAs(t.app, 'optics_staff')
    const res = await agent
      .post('/api/auth/password')
      .send({ currentPassword: 'not-it-at-all', newPassword: 'a-new-long-password' })
    expect(res.status).toBe(400)
    expect(res.body.fields.currentPassword[0]).toMatch(/not right/)
  })

  it('refuses a short new password', async () => {
    const agent = await signedInAs(t.app, 'optics_staff')
    const res = await agent.post('/api/auth/password').send({ currentPassword: DEMO_PASSWORD, newPassword: 'short' })
    expect(res.status).toBe(400)
    expect(res.body.fields.newPassword[0]).toMatch(/at least 10/)
  })
})
