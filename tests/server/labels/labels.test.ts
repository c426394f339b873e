import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import sharp from 'sharp'
import jsQR from 'jsqr'
import { eq } from 'drizzle-orm'
import { startTestApp, signedInAs } from '../helpers'
import { makeSample } from '../measurements/fixtures-measurements'
import { auditLog, labelJobs } from '../../../server/db/schema/index'
import { ROLES, type Role } from '../../../shared/roles'

let t: Awaited<ReturnType<typeof startTestApp>>
let sample: Awaited<ReturnType<typeof makeSample>>
let waferCode = ''
const agents = {} as Record<Role, TestAgent>

beforeAll(async () => {
  t = await startTestApp()
  for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
  sample = await makeSample(t.db)
  waferCode = sample.chipCode.replace(/^C-(.*)-01$/, 'W-$1')
})
afterAll(async () => {
  await t.stop()
})

/** Rasterise an SVG (librsvg through sharp) at 300 dpi and read its QR code with jsqr. */
async function decodeSvg(svg: string): Promise<string | undefined> {
  const { data, info } = await sharp(Buffer.from(svg), { density: 300 })
    .flatten({ background: '#fff' })
    .ensureAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true })
  return jsQR(new Uint8ClampedArray(data), info.width, info.height)?.data
}

describe('label rendering', () => {
  it('lists the templates with their sizes and error-correction levels', async () => {
    const res = await agents.optics_staff.get('/api/labels/templates')
    expect(res.status).toBe(200)
    const ids = res.body.templates.map((x: { id: string }) => x.id)
    expect(ids).toEqual(expect.arrayContaining(['wafer-carrier', 'chip-box', 'sheet-a4', 'sheet-letter']))
  })

  it('renders one SVG per label at its exact mm size, with the code and a QR that decodes to the upper-case URL', async () => {
    const codes = [waferCode.toLowerCase(), sample.chipCode, sample.arrays[0].code]
    const res = await agents.fab_technician.post('/api/labels/render').send({ template: 'wafer-carrier', codes })
    expect(res.status).toBe(200)
    expect(res.body.labels).toHaveLength(3)
    const [wafer, chip] = res.body.labels
    expect(wafer.code).toBe(waferCode)
    expect(wafer.payload).toBe(`HTTP://OVERTONE.TEST/S/${waferCode}`)
    expect(wafer.svg).toContain('width="40mm" height="20mm" viewBox="0 0 40 20"')
    expect(wafer.svg).toContain(`>${waferCode}</text>`)
    expect(wafer.svg).toContain('Test GaAs')
    expect(chip.svg).toContain(`wafer ${waferCode}`)
    expect(wafer.moduleMm).toBeGreaterThanOrEqual(0.254)
    expect(await decodeSvg(wafer.svg)).toBe(wafer.payload)
    expect(res.body.sheets).toEqual([])
  }, 60_000)

  it('renders sheet pages for sheet templates', async () => {
    const res = await agents.fab_technician
      .post('/api/labels/render')
      .send({ template: 'sheet-letter', codes: [waferCode, sample.chipCode], skip: 3 })
    expect(res.status).toBe(200)
    expect(res.body.sheets).toHaveLength(1)
    expect(res.body.sheets[0]).toContain('width="215.9mm" height="279.4mm"')
    expect(await decodeSvg(res.body.labels[1].svg)).toBe(`HTTP://OVERTONE.TEST/S/${sample.chipCode}`)
  }, 60_000)

  it('names unknown codes in a field-level 400', async () => {
    const res = await agents.fab_technician
      .post('/api/labels/render')
      .send({ template: 'chip-box', codes: [waferCode, 'W-NOPE1', 'C-NOPE2-01'] })
    expect(res.status).toBe(400)
    expect(res.body.fields.codes[0]).toContain('W-NOPE1')
    expect(res.body.fields.codes[0]).toContain('C-NOPE2-01')
  })

  it('rejects an unknown template and an empty code list field by field', async () => {
    const res = await agents.fab_technician.post('/api/labels/render').send({ template: 'postcard', codes: [] })
    expect(res.status).toBe(400)
    expect(Object.keys(res.body.fields)).toEqual(expect.arrayContaining(['template', 'codes']))
  })

  it('downloads one label as an SVG attachment', async () => {
    const res = await agents.optics_staff
      .get(`/api/labels/chip-box/${sample.chipCode}.svg`)
      .buffer(true)
      .parse((r, cb) => {
        let s = ''
        r.on('data', (c: Buffer) => {
          s += c.toString()
        })
        r.on('end', () => cb(null, s))
      })
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toMatch(/^image\/svg\+xml/)
    expect(res.headers['content-disposition']).toBe(`attachment; filename="${sample.chipCode}-chip-box.svg"`)
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.body).toContain('width="25mm" height="15mm"')
    const missing = await agents.optics_staff.get('/api/labels/chip-box/W-NOPE3.svg')
    expect(missing.status).toBe(400)
  })
})

describe('print jobs', () => {
  it('records a print job with an audit row', async () => {
    const res = await agents.fab_technician
      .post('/api/labels/jobs')
      .send({ template: 'sheet-a4', codes: [waferCode, sample.chipCode.toLowerCase()] })
    expect(res.status).toBe(201)
    expect(res.body.codes).toEqual([waferCode, sample.chipCode])
    expect(res.body.createdBy.name).toBeTruthy()
    const [row] = await t.db.select().from(labelJobs).where(eq(labelJobs.id, res.body.id))
    expect(row.template).toBe('sheet-a4')
    const audits = await t.db.select().from(auditLog).where(eq(auditLog.entityId, res.body.id))
    expect(audits.some((a) => a.entity === 'label_job' && a.action === 'create')).toBe(true)
    const list = await agents.optics_staff.get('/api/labels/jobs')
    expect(list.body.jobs.some((j: { id: number }) => j.id === res.body.id)).toBe(true)
  })
})

type Method = 'get' | 'post'
const EVERYONE = [...ROLES]
const MATRIX: { method: Method; path: string; body?: object; allowed: Role[] }[] = [
  { method: 'get', path: '/api/labels/templates', allowed: EVERYONE },
  { method: 'post', path: '/api/labels/render', body: {}, allowed: EVERYONE },
  { method: 'get', path: '/api/labels/jobs', allowed: EVERYONE },
  { method: 'post', path: '/api/labels/jobs', body: {}, allowed: ['admin', 'fab_technician'] },
  { method: 'get', path: '/api/labels/chip-box/W-NOPE4.svg', allowed: EVERYONE },
]

describe('label routes × roles', () => {
  for (const route of MATRIX) {
    it(`${route.method.toUpperCase()} ${route.path}: anonymous gets 401`, async () => {
      expect((await request(t.app)[route.method](route.path).send(route.body)).status).toBe(401)
    })
    for (const role of ROLES) {
      const allowed = route.allowed.includes(role)
      it(`${route.method.toUpperCase()} ${route.path} as ${role}: ${allowed ? 'allowed' : '403'}`, async () => {
        const res = await agents[role][route.method](route.path).send(route.body)
        if (allowed) expect([200, 400, 404]).toContain(res.status)
        else expect(res.status).toBe(403)
      })
    }
  }
})
