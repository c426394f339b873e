import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import type TestAgent from 'supertest/lib/agent'
import sharp from 'sharp'
import { and, eq } from 'drizzle-orm'
import { auditLog } from '../../../server/db/schema/index'
import { startTestApp, signedInAs } from '../helpers'
import { makeSample } from '../measurements/fixtures-measurements'
import { readDataTable, sanitizeFileName } from '../../../server/services/files/file-types'
import { parseTable } from '../../../shared/analysis'

// Uploads go to a throw-away data dir (the app reads DATA_DIR when it is built).
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ovt-files-'))
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let lead: TestAgent
let chipId: number
let png: Buffer
beforeAll(async () => {
  process.env.DATA_DIR = dataDir
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  lead = await signedInAs(t.app, 'group_lead')
  chipId = (await makeSample(t.db)).chipId
  // A real PNG with random pixels (so its hash is unique to this run).
  const raw = Buffer.from(Array.from({ length: 64 * 48 * 3 }, () => Math.floor(Math.random() * 256)))
  png = await sharp(raw, { raw: { width: 64, height: 48, channels: 3 } })
    .png()
    .toBuffer()
})
afterAll(async () => {
  await t.stop()
  fs.rmSync(dataDir, { recursive: true, force: true })
})

const upload = (data: Buffer, name: string, kind: string, entity = 'chip', entityId: number | string = chipId) =>
  fab
    .post('/api/files')
    .field('entity', entity)
    .field('entityId', String(entityId))
    .field('kind', kind)
    .attach('file', data, name)

/** A synthetic spectrum: Gaussian peak at 775 nm, semicolon-separated with decimal commas, plus a header. */
function spectrumCsv(n: number): Buffer {
  const lines = ['Wavelength (nm);Counts (a.u.)']
  for (let i = 0; i < n; i++) {
    const x = 700 + (150 * i) / n
    lines.push(
      `${x.toFixed(3).replace('.', ',')};${(1000 * Math.exp(-(((x - 775) / 2) ** 2)) + Math.random()).toFixed(2).replace('.', ',')}`,
    )
  }
  lines.push('end of data;;')
  return Buffer.from(lines.join('\r\n'))
}

describe('POST /api/files', () => {
  it('accepts a real PNG as SEM, stores it by hash with an audit row, and previews it', async () => {
    const res = await upload(png, 'disk array B2.png', 'sem')
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      mime: 'image/png',
      kind: 'sem',
      entity: 'chip',
      entityId: chipId,
      originalName: 'disk array B2.png',
      hasPreview: true,
      sizeBytes: png.length,
    })
    expect(
      fs.existsSync(
        path.join(dataDir, 'uploads', res.body.sha256.slice(0, 2), res.body.sha256.slice(2, 4), res.body.sha256),
      ),
    ).toBe(true)
    const [audit] = await t.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.entity, 'file'), eq(auditLog.entityId, res.body.id)))
    expect(audit.action).toBe('create')
    const preview = await lead.get(`/api/files/${res.body.id}/preview`).buffer(true)
    expect(preview.status).toBe(200)
    expect(preview.headers['content-type']).toBe('image/png')
    expect(preview.headers['content-security-policy']).toMatch(/default-src 'none'/)
    expect((await sharp(preview.body).metadata()).width).toBe(64)
  })

  it('refuses by content: PNG bytes named .csv as a spectrum, text named .png as SEM, an executable, an empty file', async () => {
    const asCsv = await upload(png, 'spectrum.csv', 'spectrum')
    expect(asCsv.status).toBe(400)
    expect(asCsv.body.fields.file[0]).toMatch(/image\/png, not a text table/)
    const asPng = await upload(Buffer.from('775;1,0\n776;2,0\n'), 'sem.png', 'sem')
    expect(asPng.status).toBe(400)
    expect(asPng.body.fields.file[0]).toMatch(/not an image/)
    const elf = Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), Buffer.alloc(64)])
    expect((await upload(elf, 'data.csv', 'other')).body.fields.file).toBeTruthy()
    const empty = await upload(Buffer.alloc(0), 'empty.csv', 'spectrum')
    expect(empty.status).toBe(400)
    expect(empty.body.fields.file).toEqual(['The file is empty'])
    const prose = await upload(Buffer.from('just some words\nno numbers here\n'), 'notes.csv', 'spectrum')
    expect(prose.body.fields.file[0]).toMatch(/data table/)
  })

  it('refuses a file over 25 MB with a field-level 400', async () => {
    const res = await upload(Buffer.alloc(25 * 1024 * 1024 + 1, 0x31), 'huge.csv', 'spectrum')
    expect(res.status).toBe(400)
    expect(res.body.fields.file).toEqual(['The file is larger than 25 MB'])
  })

  it('checks the fields and that the record exists', async () => {
    const bad = await upload(png, 'x.png', 'photo', 'planet', 'x')
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.fields)).toEqual(expect.arrayContaining(['entity', 'entityId', 'kind']))
    const missing = await upload(png, 'x.png', 'sem', 'wafer', 999999999)
    expect(missing.body.fields.entityId).toEqual(['No such wafer'])
    const noFile = await fab
      .post('/api/files')
      .field('entity', 'chip')
      .field('entityId', String(chipId))
      .field('kind', 'sem')
    expect(noFile.body.fields.file).toEqual(['Choose a file to upload'])
  })

  it('stores a path-traversal name as a plain name, and the same content once', async () => {
    const csv = spectrumCsv(50)
    const a = await upload(csv, '../../etc/passwd', 'spectrum')
    expect(a.status).toBe(201)
    expect(a.body.originalName).toBe('passwd')
    expect(fs.existsSync(path.join(dataDir, 'etc'))).toBe(false)
    const b = await upload(csv, 'copy.csv', 'spectrum')
    expect(b.body.sha256).toBe(a.body.sha256)
    expect(b.body.id).not.toBe(a.body.id)
    const dir = path.join(dataDir, 'uploads', a.body.sha256.slice(0, 2), a.body.sha256.slice(2, 4))
    expect(fs.readdirSync(dir).filter((f) => f.startsWith(a.body.sha256))).toEqual([a.body.sha256])
    expect(sanitizeFileName('..\\..\\boot.ini')).toBe('boot.ini')
    expect(sanitizeFileName('a\u0000b\u202e.txt')).toBe('ab.txt')
    expect(sanitizeFileName('...')).toBe('file')
  })
})

describe('GET /api/files…', () => {
  it('downloads the original with safe headers', async () => {
    const { body: f } = await upload(spectrumCsv(20), 'run "7".csv', 'spectrum')
    const res = await lead.get(`/api/files/${f.id}/download`).buffer(true)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toMatch(/^text\/csv/)
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename=/)
    expect(res.headers['x-content-type-options']).toBe('nosniff')
    expect(res.headers['content-security-policy']).toMatch(/default-src 'none'/)
    expect(Buffer.from(res.text ?? res.body).length).toBe(f.sizeBytes)
  })

  it('previews a CSV spectrum as ≤ 2000 points, keeping the peak', async () => {
    const { body: f } = await upload(spectrumCsv(5000), 'long.csv', 'spectrum')
    const res = await lead.get(`/api/files/${f.id}/preview`)
    expect(res.status).toBe(200)
    expect(res.body.columns).toEqual(['Wavelength (nm)', 'Counts (a.u.)'])
    expect(res.body.points.length).toBeLessThanOrEqual(2000)
    expect(res.body.skipped).toBe(1)
    const peak = res.body.points.reduce((p: number[], q: number[]) => (q[1] > p[1] ? q : p))
    expect(peak[0]).toBeCloseTo(775, 0)
  })

  it('the upload check, the preview and the analysis read a table with one parser', () => {
    const sweep = '# polarisation sweep\nangle;I\n0;1,5\n10;2,5\n20;3,5\n'
    expect(readDataTable(sweep)!.rows).toEqual(parseTable(sweep).rows)
    expect(readDataTable(sweep)!.columns).toEqual(['angle', 'I'])
    expect(readDataTable('x,y\n1,2\n3,4\n')!.rows).toEqual([
      [1, 2],
      [3, 4],
    ])
    expect(readDataTable('1\t2,5\n3\t4,5\n')!.rows).toEqual([
      [1, 2.5],
      [3, 4.5],
    ])
    expect(readDataTable('one column\n1\n2\n3\n')).toBeNull()
    expect(readDataTable('only,one row\n1,2\n')).toBeNull()
  })

  it('lists by record, retires with a reason only, and answers 404s', async () => {
    const s = await makeSample(t.db)
    const { body: f } = await upload(png, 'again.png', 'camera', 'array', s.arrays[0].id)
    const list = await lead.get(`/api/files?entity=array&entityId=${s.arrays[0].id}`)
    expect(list.body.map((x: { id: number }) => x.id)).toEqual([f.id])
    expect(list.body[0].uploadedBy.name).toBe('Tomasz Lindqvist')
    expect((await fab.post(`/api/files/${f.id}/retire`).send({})).body.fields.reason).toBeTruthy()
    expect((await fab.post(`/api/files/${f.id}/retire`).send({ reason: 'Wrong array' })).status).toBe(200)
    expect((await lead.get(`/api/files?entity=array&entityId=${s.arrays[0].id}`)).body).toEqual([])
    expect(
      (await lead.get(`/api/files?entity=array&entityId=${s.arrays[0].id}&includeRetired=true`)).body,
    ).toHaveLength(1)
    expect((await lead.get('/api/files/999999999')).status).toBe(404)
    expect((await lead.get('/api/files/999999999/download')).status).toBe(404)
    expect((await lead.get('/api/files?entity=planet&entityId=1')).status).toBe(400)
  })
})
