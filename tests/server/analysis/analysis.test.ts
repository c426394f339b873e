import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import type TestAgent from 'supertest/lib/agent'
import { and, eq } from 'drizzle-orm'
import { analysisFits, auditLog, sessionResults } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makeLaserSetup, makeSample, sessionBody } from '../measurements/fixtures-measurements'
import { seededNormal } from '../../shared/analysis/seeded'

const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ovt-analysis-'))
let t: Awaited<ReturnType<typeof startTestApp>>
let optics: TestAgent
let lead: TestAgent
let setup: { id: number }
beforeAll(async () => {
  process.env.DATA_DIR = dataDir
  t = await startTestApp()
  optics = await signedInAs(t.app, 'optics_staff')
  lead = await signedInAs(t.app, 'group_lead')
  setup = await makeLaserSetup(t.db)
})
afterAll(async () => {
  await t.stop()
  fs.rmSync(dataDir, { recursive: true, force: true })
})

const rad = (d: number) => (d * Math.PI) / 180
const wrap = (d: number, p: number) => (((d % p) + p + p / 2) % p) - p / 2

async function sessionOn(sample: Awaited<ReturnType<typeof makeSample>>, extra: Record<string, unknown> = {}) {
  const res = await optics.post('/api/sessions').send(
    sessionBody(
      setup.id,
      sample.arrays.map((a) => a.id),
      extra,
    ),
  )
  if (res.status !== 201) throw new Error(`session: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body as { id: number }
}
async function upload(sessionId: number, text: string, name: string, kind: 'sweep' | 'spectrum') {
  const res = await optics
    .post('/api/files')
    .field('entity', 'session')
    .field('entityId', String(sessionId))
    .field('kind', kind)
    .attach('file', Buffer.from(text), name)
  if (res.status !== 201) throw new Error(`upload: ${res.status} ${JSON.stringify(res.body)}`)
  return res.body as { id: number }
}

describe('predicted patterns', () => {
  it('bare -6m2 monolayer: parallel ∝ cos²(3θ), perpendicular ∝ sin²(3θ) (Li et al., Nano Lett. 13, 3329 (2013))', async () => {
    const res = await lead
      .post('/api/analysis/pattern')
      .send({ pointGroup: '-6m2', normal: [0, 0, 1], reference: [0, 1, 0], order: 2, step: 5 })
    expect(res.status).toBe(200)
    const max = Math.max(...res.body.points.map((p: { parallel: number }) => p.parallel))
    for (const p of res.body.points) {
      expect(p.parallel / max).toBeCloseTo(Math.cos(3 * rad(p.angleDeg)) ** 2, 9)
      expect(p.perpendicular / max).toBeCloseTo(Math.sin(3 * rad(p.angleDeg)) ** 2, 9)
    }
    expect(res.body.assumptions.length).toBeGreaterThan(3)
  })

  it('array pattern is in the chip frame: a chip turned by ρ shifts the pattern by −ρ', async () => {
    const s = await makeSample(t.db, { pointGroup: '-6m2', flatDirection: [0, 1, 0], chipRotationDeg: 10 })
    const res = await lead.get(`/api/analysis/arrays/${s.arrays[0].id}/pattern?order=2&step=1`)
    expect(res.status).toBe(200)
    expect(res.body.azimuthDeg).toBe(-10)
    const max = Math.max(...res.body.points.map((p: { parallel: number }) => p.parallel))
    for (const p of res.body.points.slice(0, 90))
      expect(p.parallel / max).toBeCloseTo(Math.cos(3 * rad(p.angleDeg + 10)) ** 2, 9)
    expect(res.body.assumptions.join(' ')).toMatch(/unit ratios/)
    const thg = await lead.get(`/api/analysis/arrays/${s.arrays[0].id}/pattern?order=3`)
    expect(thg.status).toBe(200)
    expect((await lead.get(`/api/analysis/arrays/${s.arrays[0].id}/pattern?order=4`)).status).toBe(400)
  })

  it('bad bare-crystal input is a field-level 400', async () => {
    const res = await lead
      .post('/api/analysis/pattern')
      .send({ pointGroup: 'q9', normal: [0, 0, 1], reference: [1, 0, 0], order: 2 })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields)).toContain('pointGroup')
  })
})

describe('polar fit through the API', () => {
  it('recovers a known azimuth within 3σ from an uploaded sweep, saves it with an audit row', async () => {
    const sample = await makeSample(t.db, { pointGroup: '-6m2', flatDirection: [0, 1, 0], chipRotationDeg: 5 })
    const session = await sessionOn(sample)
    const gauss = seededNormal(6021)
    const phi = 17.3
    const lines = ['angle_deg,I_par,I_perp']
    for (let a = 0; a < 360; a += 2) {
      const par = 1000 * Math.cos(3 * rad(a - phi)) ** 2 + 40 + 30 * gauss()
      const perp = 1000 * Math.sin(3 * rad(a - phi)) ** 2 + 40 + 30 * gauss()
      lines.push(`${a},${par.toFixed(3)},${perp.toFixed(3)}`)
    }
    const file = await upload(session.id, lines.join('\n'), 'sweep.csv', 'sweep')
    const res = await optics
      .post(`/api/analysis/sessions/${session.id}/fit`)
      .send({ fileId: file.id, arrayId: sample.arrays[0].id, save: true })
    expect(res.status).toBe(200)
    expect(res.body.azimuth.periodDeg).toBeCloseTo(60, 6)
    expect(Math.abs(wrap(res.body.azimuth.value - phi, 60))).toBeLessThan(3 * res.body.azimuth.sigma)
    expect(res.body.rSquared).toBeGreaterThan(0.95)
    expect(res.body.isSymmetryMatch).toBe(true)
    expect(res.body.sentence).toMatch(/\[0 1 0\] direction .* counter-clockwise from the chip's reference edge/)
    expect(res.body.expectedAzimuthDeg).toBeCloseTo(55, 9)
    expect(res.body.residuals).toHaveLength(360)
    expect(res.body.curves).toHaveLength(2)
    const [row] = await t.db.select().from(analysisFits).where(eq(analysisFits.id, res.body.savedId))
    expect(row).toMatchObject({ sessionId: session.id, fileId: file.id, kind: 'polar_fit' })
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'analysis'), eq(auditLog.entityId, row.id)))
    expect(audit.action).toBe('create')
    const list = await lead.get(`/api/analysis/sessions/${session.id}`)
    expect(list.body.map((a: { id: number }) => a.id)).toContain(row.id)
    const sheet = await lead.get(`/api/analysis/arrays/${sample.arrays[0].id}/sheet`)
    expect(sheet.body[0].sessions[0].analyses[0].summary).toMatch(/counter-clockwise/)
  })

  it('hostile CSVs give field-level 400s and write nothing', async () => {
    const sample = await makeSample(t.db, { pointGroup: '-6m2', flatDirection: [0, 1, 0] })
    const session = await sessionOn(sample)
    const arrayId = sample.arrays[0].id
    const fit = (fileId: number, extra = {}) =>
      optics.post(`/api/analysis/sessions/${session.id}/fit`).send({ fileId, arrayId, save: true, ...extra })
    const twoRows = await upload(session.id, 'angle,I\n0,1\n10,2\nx,NaN\nfoo,bar\n', 'short.csv', 'sweep')
    let res = await fit(twoRows.id)
    expect(res.status).toBe(400)
    expect(res.body.fields.file[0]).toMatch(/readable rows|line/)
    const flat = await upload(
      session.id,
      Array.from({ length: 20 }, (_, i) => `${i * 10},0`).join('\n'),
      'zeros.csv',
      'sweep',
    )
    res = await fit(flat.id)
    expect(res.status).toBe(400)
    expect(res.body.fields.file[0]).toMatch(/zero/)
    res = await fit(flat.id, { columns: { angle: 'nope' } })
    expect(res.status).toBe(400)
    expect(res.body.fields['columns.angle']).toBeDefined()
    res = await fit(999999999)
    expect(res.status).toBe(400)
    expect(res.body.fields.fileId).toBeDefined()
    const rows = await t.db.select().from(analysisFits).where(eq(analysisFits.sessionId, session.id))
    expect(rows).toHaveLength(0)
  })
})

function spectrumCsv(peakHeight: number): string {
  const gauss = seededNormal(775)
  const lines = ['wavelength_nm,counts']
  for (let x = 700; x <= 850; x += 0.1)
    lines.push(
      `${x.toFixed(2)},${(50 + 0.1 * (x - 700) + peakHeight * Math.exp(-(((x - 775) / 1.2) ** 2) / 2) + 2 * gauss()).toFixed(3)}`,
    )
  return lines.join('\n')
}

describe('spectrum peak through the API', () => {
  it('finds and integrates the SH peak, flags it on GaAs (001) under a linear pump, records power only with a calibration', async () => {
    const sample = await makeSample(t.db) // GaAs (001), disk on a square lattice
    const session = await sessionOn(sample, { pump: { type: 'linear', angle: 0 } })
    const file = await upload(session.id, spectrumCsv(1000), 'spectrum.csv', 'spectrum')
    const arrayId = sample.arrays[0].id
    const res = await optics.post(`/api/analysis/sessions/${session.id}/spectrum`).send({ fileId: file.id, arrayId })
    expect(res.status).toBe(200)
    expect(res.body.peak.peakWavelengthNm).toBeCloseTo(775, 0)
    const area = 1000 * 1.2 * Math.sqrt(2 * Math.PI)
    expect(Math.abs(res.body.peak.integral - area) / area).toBeLessThan(0.05)
    expect(res.body.peak.snr).toBeGreaterThan(50)
    expect(res.body.channel.normalAllowed).toBe(false)
    expect(res.body.flags.map((f: { code: string }) => f.code)).toContain('PEAK_IN_FORBIDDEN_CHANNEL')
    expect(res.body.calibrationNeeded).toBe(true)

    const noCal = await optics
      .post(`/api/analysis/sessions/${session.id}/spectrum`)
      .send({ fileId: file.id, arrayId, record: true })
    expect(noCal.status).toBe(200)
    let [result] = await t.db
      .select()
      .from(sessionResults)
      .where(and(eq(sessionResults.sessionId, session.id), eq(sessionResults.arrayId, arrayId)))
    expect(result.harmonicPowerW).toBeNull()
    expect(noCal.body.savedId).toBeGreaterThan(0)

    const cal = await optics
      .post(`/api/analysis/sessions/${session.id}/spectrum`)
      .send({ fileId: file.id, arrayId, record: true, wattsPerCount: 1e-12 })
    expect(cal.status).toBe(200)
    ;[result] = await t.db
      .select()
      .from(sessionResults)
      .where(and(eq(sessionResults.sessionId, session.id), eq(sessionResults.arrayId, arrayId)))
    expect(result.harmonicPowerW).toBeCloseTo(cal.body.peak.integral * 1e-12, 20)
    const audits = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'session'), eq(auditLog.entityId, session.id), eq(auditLog.action, 'update')))
    expect(audits.some((a) => Object.keys(a.changes).some((k) => k.endsWith('.harmonicPowerW')))).toBe(true)
  })

  it('a spectrum with no point near λ/2 is a 400 on file; pixels without calibration a 400 on calibration', async () => {
    const sample = await makeSample(t.db)
    const session = await sessionOn(sample)
    const far = await upload(
      session.id,
      Array.from({ length: 50 }, (_, i) => `${400 + i},${i}`).join('\n'),
      'far.csv',
      'spectrum',
    )
    let res = await optics.post(`/api/analysis/sessions/${session.id}/spectrum`).send({ fileId: far.id })
    expect(res.status).toBe(400)
    expect(res.body.fields.file[0]).toMatch(/no point near/)
    const px = await upload(
      session.id,
      'pixel,counts\n' + Array.from({ length: 50 }, (_, i) => `${i},${i}`).join('\n'),
      'px.csv',
      'spectrum',
    )
    res = await optics.post(`/api/analysis/sessions/${session.id}/spectrum`).send({ fileId: px.id })
    expect(res.status).toBe(400)
    expect(res.body.fields.calibration).toBeDefined()
  })
})
