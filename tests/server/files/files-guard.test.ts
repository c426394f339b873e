import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import zlib from 'node:zlib'
import type TestAgent from 'supertest/lib/agent'
import sharp from 'sharp'
import { startTestApp, signedInAs } from '../helpers'
import { makeSample } from '../measurements/fixtures-measurements'
import { defineAbilityFor, fileSubject } from '../../../shared/abilities'

/**
 * Uploads that must be refused or kept safe: names keep their UTF-8, images are decoded (not only
 * sniffed) and limited in size, previews are always scaled down, and only the uploader, a group
 * lead or an administrator retires a file.
 */
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ovt-files-guard-'))
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let optics: TestAgent
let lead: TestAgent
let admin: TestAgent
let officer: TestAgent
let chipId: number
beforeAll(async () => {
  process.env.DATA_DIR = dataDir
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  optics = await signedInAs(t.app, 'optics_staff')
  lead = await signedInAs(t.app, 'group_lead')
  admin = await signedInAs(t.app, 'admin')
  officer = await signedInAs(t.app, 'safety_officer')
  chipId = (await makeSample(t.db)).chipId
})
afterAll(async () => {
  await t.stop()
  fs.rmSync(dataDir, { recursive: true, force: true })
})

const upload = (who: TestAgent, data: Buffer, name: string, kind: string) =>
  who
    .post('/api/files')
    .field('entity', 'chip')
    .field('entityId', String(chipId))
    .field('kind', kind)
    .attach('file', data, name)
const csv = () => Buffer.from(`x;y\n1;${Math.random()}\n2;${Math.random()}\n3;4\n`)
const randomPng = (w: number, h: number) =>
  sharp(Buffer.from(Array.from({ length: w * h * 3 }, () => Math.floor(Math.random() * 256))), {
    raw: { width: w, height: h, channels: 3 },
  })
    .png()
    .toBuffer()

/** A whole, valid PNG of w × h pixels, 1-bit grey, all black: tiny on disk however large its area. */
function hugePng(w: number, h: number): Buffer {
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1
    return c >>> 0
  })
  const crc = (b: Buffer) => {
    let c = 0xffffffff
    for (const x of b) c = crcTable[(c ^ x) & 0xff] ^ (c >>> 8)
    return (c ^ 0xffffffff) >>> 0
  }
  const chunk = (type: string, data: Buffer) => {
    const td = Buffer.concat([Buffer.from(type, 'ascii'), data])
    const len = Buffer.alloc(4)
    len.writeUInt32BE(data.length)
    const c = Buffer.alloc(4)
    c.writeUInt32BE(crc(td))
    return Buffer.concat([len, td, c])
  }
  const ihdr = Buffer.alloc(13)
  ihdr.writeUInt32BE(w, 0)
  ihdr.writeUInt32BE(h, 4)
  ihdr[8] = 1
  ihdr[9] = 0
  const raw = Buffer.alloc((1 + Math.ceil(w / 8)) * h) // filter byte 0 + packed zero bits per row
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlib.deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ])
}

describe('upload names', () => {
  it('keep their UTF-8 (a multipart file name is UTF-8, as browsers send it)', async () => {
    const res = await upload(fab, csv(), 'µm_ä Größe 測定.csv', 'spectrum')
    expect(res.status).toBe(201)
    expect(res.body.originalName).toBe('µm_ä Größe 測定.csv')
  })
})

describe('retiring a file', () => {
  it('is for its uploader, a group lead or an administrator only', async () => {
    const ids: number[] = []
    for (let i = 0; i < 3; i++) ids.push((await upload(fab, csv(), `r${i}.csv`, 'spectrum')).body.id)
    const other = await optics.post(`/api/files/${ids[0]}/retire`).send({ reason: 'not mine' })
    expect(other.status).toBe(403)
    expect(other.body.message).toMatch(/uploaded this file, a group lead or an administrator/)
    expect((await officer.post(`/api/files/${ids[0]}/retire`).send({ reason: 'not mine' })).status).toBe(403)
    expect(
      (
        (await t.pool.query('SELECT retired_at FROM files WHERE id = ?', [ids[0]])) as unknown as [
          { retired_at: Date | null }[],
        ]
      )[0][0].retired_at,
    ).toBeNull()
    expect((await fab.post(`/api/files/${ids[0]}/retire`).send({ reason: 'my own, wrong chip' })).status).toBe(200)
    expect((await lead.post(`/api/files/${ids[1]}/retire`).send({ reason: 'group lead tidies up' })).status).toBe(200)
    expect((await admin.post(`/api/files/${ids[2]}/retire`).send({ reason: 'administrator' })).status).toBe(200)
  })

  it('the client hides Retire by the same rule', () => {
    const f = { uploadedBy: { id: 7 } }
    expect(defineAbilityFor({ id: 7, roles: ['optics_staff'] }).can('retire', fileSubject(f))).toBe(true)
    expect(defineAbilityFor({ id: 8, roles: ['optics_staff', 'fab_technician'] }).can('retire', fileSubject(f))).toBe(
      false,
    )
    expect(defineAbilityFor({ id: 8, roles: ['safety_officer'] }).can('retire', fileSubject(f))).toBe(false)
    expect(defineAbilityFor({ id: 8, roles: ['group_lead'] }).can('retire', fileSubject(f))).toBe(true)
    expect(defineAbilityFor({ id: 8, roles: ['admin'] }).can('retire', fileSubject(f))).toBe(true)
  })
})

describe('image uploads are decoded', () => {
  it('refuses a truncated PNG and PNG magic followed by junk', async () => {
    const png = await randomPng(200, 150)
    const cut = await upload(fab, png.subarray(0, Math.floor(png.length / 2)), 'cut.png', 'sem')
    expect(cut.status).toBe(400)
    expect(cut.body.fields.file[0]).toMatch(/could not be read as a whole image/)
    const junk = Buffer.concat([png.subarray(0, 8), Buffer.from('definitely not an image at all '.repeat(20))])
    const j = await upload(fab, junk, 'junk.png', 'camera')
    expect(j.status).toBe(400)
    expect(j.body.fields.file[0]).toMatch(/could not be read as a whole image/)
    const asOther = await upload(fab, junk, 'junk.png', 'other')
    expect(asOther.status).toBe(400)
  })

  it('refuses an image over 100 megapixels, saying the limit (a 30 000 × 30 000 PNG)', async () => {
    const res = await upload(fab, hugePng(30_000, 30_000), 'huge.png', 'sem')
    expect(res.status).toBe(400)
    expect(res.body.fields.file[0]).toMatch(/30000 × 30000 pixels.*100 megapixels/)
  })

  it('sends previews scaled down to at most 1600 px on the longest side', async () => {
    const wide = await upload(fab, await randomPng(2400, 300), 'wide.png', 'sem')
    expect(wide.status).toBe(201)
    const p = await lead.get(`/api/files/${wide.body.id}/preview`).buffer(true)
    expect(p.status).toBe(200)
    const meta = await sharp(p.body).metadata()
    expect([meta.width, meta.height]).toEqual([1600, 200])
  })
})
