import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import { and, eq } from 'drizzle-orm'
import { auditLog, users } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makePerson, mailTo, retirePeople, NOTICE_PASSWORD } from './notices-helpers'
import {
  noticeHandOff,
  noticeSetupChanged,
  noticeSetupSubmitted,
  noticeSignoffDecision,
  setNoticeBaseUrl,
} from '../../../server/services/mail/notices'

let t: Awaited<ReturnType<typeof startTestApp>>
const made: number[] = []
let officer: Awaited<ReturnType<typeof makePerson>>
let quietOfficer: Awaited<ReturnType<typeof makePerson>>
let formerOfficer: Awaited<ReturnType<typeof makePerson>>
let submitter: Awaited<ReturnType<typeof makePerson>>
beforeAll(async () => {
  t = await startTestApp()
  setNoticeBaseUrl('http://overtone.test')
  officer = await makePerson(t.db, ['safety_officer'], { name: 'Olu <b>Officer</b> & Co' })
  quietOfficer = await makePerson(t.db, ['safety_officer', 'optics_staff'], { notifyByMail: false })
  formerOfficer = await makePerson(t.db, ['safety_officer'], { active: false })
  submitter = await makePerson(t.db, ['optics_staff'], { password: true })
  made.push(officer.id, quietOfficer.id, formerOfficer.id, submitter.id)
})
afterAll(async () => {
  await retirePeople(t.db, made)
  await t.stop()
})

const setup = (tag: string) => ({
  setupId: 4242,
  code: `LS-${tag}`,
  name: '<script>alert(1)</script>',
  actorName: 'Eve "<i>" Actor',
})
const tag = () => Math.random().toString(36).slice(2, 8).toUpperCase()

/** The one mail to `email` whose subject contains `code`. */
async function only(email: string, code: string) {
  const rows = (await mailTo(t.db, email)).filter((m) => m.subject.includes(code))
  expect(rows).toHaveLength(1)
  return rows[0]
}

function expectEscaped(html: string | null) {
  expect(html).toBeTruthy()
  expect(html).not.toContain('<script>')
  expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;')
  expect(html).toContain('My account')
}

describe('setup notices to safety officers', () => {
  it('a submitted setup queues text and HTML to every active officer who wants mail, escaping names', async () => {
    const info = setup(tag())
    await t.db.transaction((tx) => noticeSetupSubmitted(tx, info))
    const m = await only(officer.email, info.code)
    expect(m.subject).toContain('waits for sign-off')
    expect(m.textBody).toContain('<script>alert(1)</script>')
    expect(m.textBody).toContain('http://overtone.test/laser-setups/4242')
    expect(m.textBody).toMatch(/turn off "Mail notices" in My account/)
    expectEscaped(m.htmlBody)
    expect(m.htmlBody).toContain('Olu &lt;b&gt;Officer&lt;/b&gt; &amp; Co')
    expect(m.htmlBody).toContain('Eve &quot;&lt;i&gt;&quot; Actor')
    expect((await mailTo(t.db, quietOfficer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
    expect((await mailTo(t.db, formerOfficer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
  })

  it('a change that voids the sign-off says so and lists the fields', async () => {
    const info = { ...setup(tag()), voided: true, fields: ['maxAvgPowerMw', 'laserClass'] }
    await t.db.transaction((tx) => noticeSetupChanged(tx, info))
    const m = await only(officer.email, info.code)
    expect(m.subject).toContain('sign-off voided')
    expect(m.textBody).toContain('maxAvgPowerMw')
    expect(m.htmlBody).toContain('<li>laserClass</li>')
    expectEscaped(m.htmlBody)
    expect((await mailTo(t.db, quietOfficer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
  })

  it('nothing is queued when the caller’s transaction rolls back', async () => {
    const info = setup(tag())
    await expect(
      t.db.transaction(async (tx) => {
        await noticeSetupSubmitted(tx, info)
        throw new Error('action failed')
      }),
    ).rejects.toThrow('action failed')
    expect((await mailTo(t.db, officer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
  })
})

describe('sign-off decisions to the submitter', () => {
  for (const decision of ['approved', 'rejected', 'revoked'] as const) {
    it(`${decision}: the submitter gets text and HTML with the escaped note`, async () => {
      const info = {
        ...setup(tag()),
        decision,
        note: 'Check the <iframe> interlock',
        expiresOn: decision === 'approved' ? '2027-03-31' : null,
        submitterId: submitter.id,
      }
      await t.db.transaction((tx) => noticeSignoffDecision(tx, info))
      const m = await only(submitter.email, info.code)
      expect(m.textBody).toContain('Check the <iframe> interlock')
      expect(m.htmlBody).toContain('Check the &lt;iframe&gt; interlock')
      if (decision === 'approved') expect(m.textBody).toContain('valid until 2027-03-31')
      else expect(m.textBody).toContain('may not be used until it is signed off again')
      expectEscaped(m.htmlBody)
      expect((await mailTo(t.db, officer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
    })
  }

  it('a submitter who opted out gets nothing', async () => {
    const info = {
      ...setup(tag()),
      decision: 'approved' as const,
      note: null,
      expiresOn: '2027-01-01',
      submitterId: quietOfficer.id,
    }
    await t.db.transaction((tx) => noticeSignoffDecision(tx, info))
    expect((await mailTo(t.db, quietOfficer.email)).filter((x) => x.subject.includes(info.code))).toHaveLength(0)
  })
})

describe('hand-off notices', () => {
  it('queues text and HTML with the item link; nothing for someone who opted out', async () => {
    const code = `C-9${tag()}-01`
    const info = {
      itemCode: code,
      actorName: 'Tomasz <Lindqvist>',
      path: 'Room › Cabinet › Box',
      locationCode: 'L-0001',
      note: '<b>fragile</b>',
    }
    await t.db.transaction(async (tx) => {
      await noticeHandOff(tx, { ...info, toUserId: submitter.id }, 'http://lab.test')
      await noticeHandOff(tx, { ...info, toUserId: quietOfficer.id }, 'http://lab.test')
    })
    const m = await only(submitter.email, code)
    expect(m.subject).toBe(`Overtone: ${code} was handed to you`)
    expect(m.textBody).toContain(`http://lab.test/s/${code}`)
    expect(m.textBody).toContain('Note: <b>fragile</b>')
    expect(m.htmlBody).toContain('Tomasz &lt;Lindqvist&gt;')
    expect(m.htmlBody).toContain('&lt;b&gt;fragile&lt;/b&gt;')
    expect((await mailTo(t.db, quietOfficer.email)).filter((x) => x.subject.includes(code))).toHaveLength(0)
  })
})

describe('GET/PATCH /api/auth/preferences', () => {
  it('reads and changes the signed-in person’s own notice preference, with an audit row', async () => {
    const agent = await signedInAs(t.app, submitter.email, NOTICE_PASSWORD)
    expect((await agent.get('/api/auth/preferences')).body).toEqual({ notifyByMail: true })
    const off = await agent.patch('/api/auth/preferences').send({ notifyByMail: false })
    expect(off.status).toBe(200)
    expect(off.body).toEqual({ notifyByMail: false })
    const [u] = await t.db.select().from(users).where(eq(users.id, submitter.id))
    expect(u.notifyByMail).toBe(false)
    const audit = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'user'), eq(auditLog.entityId, submitter.id)))
    expect(audit.some((a) => JSON.stringify(a.changes).includes('notifyByMail'))).toBe(true)
    expect((await agent.patch('/api/auth/preferences').send({ notifyByMail: true })).body).toEqual({
      notifyByMail: true,
    })
  })

  it('rejects a bad body with a field error', async () => {
    const agent = await signedInAs(t.app, submitter.email, NOTICE_PASSWORD)
    const res = await agent.patch('/api/auth/preferences').send({ notifyByMail: 'maybe' })
    expect(res.status).toBe(400)
    expect(res.body.fields.notifyByMail).toBeTruthy()
  })
})

describe('route × role matrix (notices)', () => {
  const ROLES = ['admin', 'group_lead', 'fab_technician', 'optics_staff', 'safety_officer'] as const
  const MATRIX = [
    { method: 'get' as const, path: '/api/auth/preferences', body: undefined, allowed: [...ROLES] as string[] },
    { method: 'patch' as const, path: '/api/auth/preferences', body: {}, allowed: [...ROLES] as string[] },
    { method: 'post' as const, path: '/api/mail/digest', body: {}, allowed: ['admin', 'group_lead'] },
    { method: 'get' as const, path: '/api/mail/queue', body: undefined, allowed: ['admin'] },
  ]
  for (const route of MATRIX) {
    it(`${route.method.toUpperCase()} ${route.path}: anonymous 401`, async () => {
      expect((await request(t.app)[route.method](route.path).send(route.body)).status).toBe(401)
    })
    for (const role of ROLES) {
      const allowed = route.allowed.includes(role)
      it(`${route.method.toUpperCase()} ${route.path} as ${role}: ${allowed ? 'allowed' : '403'}`, async () => {
        const agent = await signedInAs(t.app, role)
        // PATCH with an empty body is a 400 (nothing changes); the digest is a real send (201).
        const res = await agent[route.method](route.path).send(route.body)
        if (allowed) expect([200, 201, 400]).toContain(res.status)
        else expect(res.status).toBe(403)
      })
    }
  }
})
