import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { eq } from 'drizzle-orm'
import {
  chips,
  laserSetupSignoffs,
  measurementSessions,
  noticeLog,
  sessionResults,
  users,
  wafers,
} from '../../../server/db/schema/index'
import { startTestApp, demoEmail, signedInAs } from '../helpers'
import { makeLaserSetup, makeSample } from '../measurements/fixtures-measurements'
import { makePerson, mailTo, retirePeople } from './notices-helpers'
import { NoticeScheduler, isoWeek, digestTimeOfWeek } from '../../../server/services/mail/notice-scheduler'
import { createLogger } from '../../../server/logger'

let t: Awaited<ReturnType<typeof startTestApp>>
let scheduler: NoticeScheduler
const made: number[] = []
/** The JSON lines the scheduler logs (level error and up). */
const logged: string[] = []
const log = createLogger('error', {
  write: (line: string) => {
    logged.push(line)
  },
})
const DAY = 24 * 3600 * 1000
beforeAll(async () => {
  t = await startTestApp()
  scheduler = new NoticeScheduler(t.db, log)
})
afterAll(async () => {
  await retirePeople(t.db, made)
  await t.stop()
})

/** A Monday 08:00 UTC in a random past week nobody has sent a digest for (tests never share a week). */
async function freeMonday(): Promise<Date> {
  for (;;) {
    const monday = digestTimeOfWeek(
      new Date(Date.UTC(2001 + Math.floor(Math.random() * 20), 0, 1) + Math.floor(Math.random() * 360) * DAY),
    )
    const at = new Date(monday.getTime() + 3600_000)
    const [used] = await t.db
      .select()
      .from(noticeLog)
      .where(eq(noticeLog.noticeKey, `digest:${isoWeek(at)}`))
    if (!used) return at
  }
}

describe('ISO weeks', () => {
  it('numbers weeks as ISO 8601 does (week 1 holds the first Thursday)', () => {
    expect(isoWeek(new Date('2026-12-02T10:00:00Z'))).toBe('2026-W49')
    expect(isoWeek(new Date('2021-01-03T10:00:00Z'))).toBe('2020-W53')
    expect(isoWeek(new Date('2024-12-30T10:00:00Z'))).toBe('2025-W01')
    expect(digestTimeOfWeek(new Date('2026-12-06T23:00:00Z')).toISOString()).toBe('2026-11-30T07:00:00.000Z')
  })
})

describe('expiring sign-offs', () => {
  it('mails every officer once per setup and expiry date, however often the scheduler runs', async () => {
    const officer = await makePerson(t.db, ['safety_officer'])
    const quiet = await makePerson(t.db, ['safety_officer'], { notifyByMail: false })
    made.push(officer.id, quiet.id)
    const [safety] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('safety_officer')))
    // A Monday 06:00 in the past: before the digest hour, so only the expiry pass acts.
    const now = new Date((await freeMonday()).getTime() - 2 * 3600_000)
    const soon = await makeLaserSetup(t.db)
    const later = await makeLaserSetup(t.db)
    const day = (ms: number) => new Date(now.getTime() + ms).toISOString().slice(0, 10)
    await t.db.insert(laserSetupSignoffs).values([
      {
        setupId: soon.id,
        decision: 'approved',
        byId: safety.id,
        at: new Date(now.getTime() - 300 * DAY),
        expiresOn: day(5 * DAY),
        hazardHash: 'x'.repeat(64),
      },
      {
        setupId: later.id,
        decision: 'approved',
        byId: safety.id,
        at: new Date(now.getTime() - 300 * DAY),
        expiresOn: day(40 * DAY),
        hazardHash: 'x'.repeat(64),
      },
    ])
    const first = await scheduler.runOnce(now)
    const second = await scheduler.runOnce(new Date(now.getTime() + 10 * 60_000))
    expect(first.digest).toBeNull()
    expect(first.expiring).toBeGreaterThanOrEqual(1)
    const mine = (await mailTo(t.db, officer.email)).filter((m) => m.subject.includes(soon.code))
    expect(mine).toHaveLength(1)
    expect(mine[0].subject).toContain('expires in 5 days')
    expect(mine[0].textBody).toContain(day(5 * DAY))
    expect(mine[0].htmlBody).toContain(soon.code)
    expect(second.expiring).toBe(0)
    expect((await mailTo(t.db, officer.email)).filter((m) => m.subject.includes(later.code))).toHaveLength(0)
    expect((await mailTo(t.db, quiet.email)).filter((m) => m.subject.includes(soon.code))).toHaveLength(0)
    expect(logged).toEqual([])
  })
})

describe('weekly digest', () => {
  it('goes to active group leads once per ISO week, with the week’s wafers, chips, sessions and anomalies', async () => {
    const lead = await makePerson(t.db, ['group_lead'])
    const quietLead = await makePerson(t.db, ['group_lead'], { notifyByMail: false })
    made.push(lead.id, quietLead.id)
    const now = await freeMonday()
    const inWeek = new Date(now.getTime() - 2 * DAY)
    // GaAs (001) single disks, circular pump, SHG: emission along the normal is forbidden, so "co" is a contradiction.
    const sample = await makeSample(t.db, { arrays: [{ shape: 'disk', lattice: 'single' }] })
    await t.db.update(wafers).set({ createdAt: inWeek }).where(eq(wafers.id, sample.waferId))
    await t.db.update(chips).set({ createdAt: inWeek }).where(eq(chips.id, sample.chipId))
    const setup = await makeLaserSetup(t.db)
    const [optics] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('optics_staff')))
    const code = `S-T${Date.now().toString(36).toUpperCase()}`
    const [{ id: sessionId }] = await t.db
      .insert(measurementSessions)
      .values({
        code,
        laserSetupId: setup.id,
        operatorId: optics.id,
        performedAt: inWeek,
        wavelengthNm: 1550,
        avgPowerMw: 10,
        pump: { type: 'circular', m: 1 } as never,
        harmonicOrder: 2,
        geometry: 'reflection',
        collection: 'normal',
        createdAt: inWeek,
      })
      .$returningId()
    await t.db
      .insert(sessionResults)
      .values({ sessionId, arrayId: sample.arrays[0].id, observedNormal: 'co', observedM: [0] })
    const [wafer] = await t.db.select().from(wafers).where(eq(wafers.id, sample.waferId))

    const early = await scheduler.runOnce(new Date(now.getTime() - 2 * 3600_000))
    expect(early.digest).toBeNull()
    const first = await scheduler.runOnce(now)
    expect(first.digest).toMatchObject({ isSent: true, key: `digest:${isoWeek(now)}` })
    const second = await scheduler.runOnce(new Date(now.getTime() + 2 * DAY))
    expect(second.digest?.isSent).toBe(false)

    const digests = (await mailTo(t.db, lead.email)).filter((m) => m.subject.includes('lab digest'))
    expect(digests).toHaveLength(1)
    const [m] = digests
    for (const part of [m.textBody, m.htmlBody!]) {
      expect(part).toContain(wafer.code)
      expect(part).toContain(sample.chipCode)
      expect(part).toContain(code)
      expect(part).toContain('Anomalies (1)')
      expect(part).toContain(sample.arrays[0].code)
    }
    expect(m.textBody).toMatch(
      /1 new wafer\(s\), 1 chip\(s\) diced, 1 new measurement session\(s\), 1 with results that contradict/,
    )
    expect((await mailTo(t.db, quietLead.email)).filter((x) => x.subject.includes('lab digest'))).toHaveLength(0)
  })

  it('POST /api/mail/digest sends one now (group lead), with its own key', async () => {
    const lead = await makePerson(t.db, ['group_lead'])
    made.push(lead.id)
    const agent = await signedInAs(t.app, 'group_lead')
    const res = await agent.post('/api/mail/digest').send({})
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ isSent: true })
    expect(res.body.recipients).toBeGreaterThanOrEqual(2)
    const [m] = (await mailTo(t.db, lead.email)).filter((x) => x.subject.includes('lab digest'))
    expect(m.htmlBody).toContain('Laser setups waiting for sign-off')
  })

  it('a failing pass is logged and never throws', async () => {
    const broken = new NoticeScheduler(
      {
        select: () => {
          throw new Error('database gone')
        },
        transaction: () => {
          throw new Error('database gone')
        },
      } as never,
      log,
    )
    await expect(broken.runOnce(new Date())).resolves.toEqual({ expiring: 0, digest: null })
    const lines = logged.map((l) => JSON.parse(l) as { level: number; msg: string; err?: { message: string } })
    expect(lines.some((l) => l.level === 50 && l.err?.message === 'database gone' && /notices/.test(l.msg))).toBe(true)
  })
})
