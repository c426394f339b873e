import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import type TestAgent from 'supertest/lib/agent'
import { and, eq } from 'drizzle-orm'
import { analysisFits, sessionResults } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makeLaserSetup, makeSample, sessionBody } from './fixtures-measurements'

/**
 * A session's recorded harmonic power is a measured value: it is never replaced without the
 * person saying so (an edit that would change it is a 409 unless `confirmOverwrite: true`), both
 * through a session edit and through "Record as harmonic signal" from a spectrum.
 */
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ovt-overwrite-'))
let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent
let setupId: number
beforeAll(async () => {
  process.env.DATA_DIR = dataDir
  t = await startTestApp()
  optics = await signedInAs(t.app, 'optics_staff')
  setupId = (await makeLaserSetup(t.db)).id
})
afterAll(async () => {
  await t.stop()
  fs.rmSync(dataDir, { recursive: true, force: true })
})

async function session(results: { arrayId: number; harmonicPowerW?: number | null }[]) {
  const res = await optics
    .post('/api/sessions')
    .send(sessionBody(setupId, [], { results: results.map((r) => ({ observedNormal: 'none', ...r })) }))
  if (res.status !== 201) throw new Error(`session: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body as { id: number; results: { arrayId: number; harmonicPowerW: number | null }[] }
}
const powerOf = async (sessionId: number, arrayId: number) =>
  (
    await t.db
      .select()
      .from(sessionResults)
      .where(and(eq(sessionResults.sessionId, sessionId), eq(sessionResults.arrayId, arrayId)))
  )[0]?.harmonicPowerW

describe('PATCH /api/sessions/:id and a recorded harmonic power', () => {
  it('refuses to change or clear a recorded power without confirmOverwrite (409 on the result row), and does it with', async () => {
    const {
      arrays: [a, b],
    } = await makeSample(t.db, { arrays: [{}, {}] })
    const s = await session([{ arrayId: a.id, harmonicPowerW: 2e-9 }, { arrayId: b.id }])
    // b had none: filling it in is not an overwrite
    const fill = await optics.patch(`/api/sessions/${s.id}`).send({
      results: [
        { arrayId: a.id, harmonicPowerW: 2e-9, observedNormal: 'none' },
        { arrayId: b.id, harmonicPowerW: 5e-10, observedNormal: 'none' },
      ],
    })
    expect(fill.status, JSON.stringify(fill.body)).toBe(200)

    const change = await optics.patch(`/api/sessions/${s.id}`).send({
      results: [
        { arrayId: b.id, harmonicPowerW: 5e-10, observedNormal: 'none' },
        { arrayId: a.id, harmonicPowerW: 3e-9, observedNormal: 'none' },
      ],
    })
    expect(change.status).toBe(409)
    expect(change.body.fields['results.1.harmonicPowerW'][0]).toMatch(
      new RegExp(`${a.code} already has a harmonic power of 2 nW`),
    )
    expect(await powerOf(s.id, a.id)).toBe(2e-9)

    const clear = await optics.patch(`/api/sessions/${s.id}`).send({
      results: [
        { arrayId: a.id, harmonicPowerW: null, observedNormal: 'none' },
        { arrayId: b.id, harmonicPowerW: 5e-10, observedNormal: 'none' },
      ],
    })
    expect(clear.status).toBe(409)
    expect(clear.body.fields).toHaveProperty(['results.0.harmonicPowerW'])

    const drop = await optics
      .patch(`/api/sessions/${s.id}`)
      .send({ results: [{ arrayId: b.id, harmonicPowerW: 5e-10, observedNormal: 'none' }] })
    expect(drop.status).toBe(409)
    expect(drop.body.fields.results[0]).toMatch(new RegExp(`${a.code}`))

    const ok = await optics.patch(`/api/sessions/${s.id}`).send({
      confirmOverwrite: true,
      results: [
        { arrayId: b.id, harmonicPowerW: 5e-10, observedNormal: 'none' },
        { arrayId: a.id, harmonicPowerW: 3e-9, observedNormal: 'none' },
      ],
    })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    expect(await powerOf(s.id, a.id)).toBe(3e-9)
  })

  it('an edit that leaves the powers as they are needs no confirmation', async () => {
    const {
      arrays: [a],
    } = await makeSample(t.db)
    const s = await session([{ arrayId: a.id, harmonicPowerW: 1e-9 }])
    const res = await optics
      .patch(`/api/sessions/${s.id}`)
      .send({ notes: 'aligned again', results: [{ arrayId: a.id, harmonicPowerW: 1e-9, observedNormal: 'present' }] })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
  })
})

function spectrumCsv(): string {
  const lines = ['wavelength_nm,counts']
  for (let x = 700; x <= 850; x += 0.5)
    lines.push(`${x.toFixed(2)},${(50 + 1000 * Math.exp(-(((x - 775) / 1.2) ** 2) / 2)).toFixed(3)}`)
  return lines.join('\n')
}

describe('"Record as harmonic signal" and a recorded harmonic power', () => {
  it('records into an empty result, refuses to replace a different value without confirmOverwrite (nothing saved), replaces with it', async () => {
    const {
      arrays: [a],
    } = await makeSample(t.db)
    const s = await session([{ arrayId: a.id }])
    const up = await optics
      .post('/api/files')
      .field('entity', 'session')
      .field('entityId', String(s.id))
      .field('kind', 'spectrum')
      .attach('file', Buffer.from(spectrumCsv()), 'spectrum.csv')
    expect(up.status).toBe(201)
    const record = (extra: object) =>
      optics
        .post(`/api/analysis/sessions/${s.id}/spectrum`)
        .send({ fileId: up.body.id, arrayId: a.id, record: true, ...extra })

    const first = await record({ wattsPerCount: 1e-12 })
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    const p1 = await powerOf(s.id, a.id)
    expect(p1).toBeGreaterThan(0)
    // the same value again is no overwrite
    expect((await record({ wattsPerCount: 1e-12 })).status).toBe(200)

    const saves = async () => (await t.db.select().from(analysisFits).where(eq(analysisFits.sessionId, s.id))).length
    const before = await saves()
    const second = await record({ wattsPerCount: 2e-12 })
    expect(second.status).toBe(409)
    expect(second.body.fields.harmonicPowerW[0]).toMatch(
      new RegExp(`${a.code} already has a harmonic power of .*W recorded; this spectrum gives .*W`),
    )
    expect(await powerOf(s.id, a.id)).toBe(p1)
    expect(await saves()).toBe(before)

    const confirmed = await record({ wattsPerCount: 2e-12, confirmOverwrite: true })
    expect(confirmed.status).toBe(200)
    expect(await powerOf(s.id, a.id)).toBeCloseTo(2 * p1!, 20)
  })
})
