import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { execFileSync } from 'node:child_process'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import type TestAgent from 'supertest/lib/agent'
import request from 'supertest'
import { startTestApp, signedInAs } from '../server/helpers'
import { makeSample } from '../server/measurements/fixtures-measurements'

/**
 * Upload storage that is full or read-only: an upload answers 507 (full) or 503 (read-only) with
 * a message that says so, leaves no partial `.tmp` file and no `files` row, and /api/health reports
 * the storage as down until it is writable again. The faults are real: a small tmpfs mounted on the
 * upload directory, filled up, then remounted read-only (needs root, as in the test container;
 * skipped elsewhere).
 */
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'ovt-storage-faults-'))
const uploads = path.join(dataDir, 'uploads')
const mount = (...args: string[]) => execFileSync('mount', args, { stdio: 'pipe' })
function canMount(): boolean {
  if (process.getuid?.() !== 0) return false
  fs.mkdirSync(uploads, { recursive: true })
  try {
    mount('-t', 'tmpfs', '-o', 'size=512k', 'tmpfs', uploads)
    return true
  } catch {
    return false
  }
}
const isMounted = canMount()

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
let chipId: number
beforeAll(async () => {
  if (!isMounted) return
  process.env.DATA_DIR = dataDir
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  chipId = (await makeSample(t.db)).chipId
})
afterAll(async () => {
  await t?.stop()
  if (isMounted)
    try {
      execFileSync('umount', [uploads])
    } catch {
      /* not mounted */
    }
  fs.rmSync(dataDir, { recursive: true, force: true })
})

const csv = (kb: number) => {
  const lines = ['x;y']
  for (let i = 0, size = 0; size < kb * 1024; i++) {
    const l = `${i};${Math.random()}`
    lines.push(l)
    size += l.length + 1
  }
  return Buffer.from(lines.join('\n'))
}
const upload = (data: Buffer) =>
  fab
    .post('/api/files')
    .field('entity', 'chip')
    .field('entityId', String(chipId))
    .field('kind', 'spectrum')
    .attach('file', data, 'run.csv')
function tmpFiles(dir: string): string[] {
  return fs.readdirSync(dir, { recursive: true, encoding: 'utf8' }).filter((f) => f.endsWith('.tmp'))
}
async function fileRows(): Promise<number> {
  const [rows] = (await t.pool.query('SELECT COUNT(*) AS n FROM files')) as unknown as [{ n: number }[]]
  return Number(rows[0].n)
}

describe.skipIf(!isMounted)('upload storage full or read-only', () => {
  it('works while there is room', async () => {
    expect((await upload(csv(20))).status).toBe(201)
    const health = await request(t.app).get('/api/health')
    expect(health.body.storage).toBe('up')
  })

  it('full: 507 with a message, no partial .tmp file, no row; health says storage is down', async () => {
    const before = await fileRows()
    const big = await upload(csv(700)) // larger than the whole 512 kB file system
    expect(big.status).toBe(507)
    expect(big.body.message).toMatch(/storage is full/)
    expect(tmpFiles(uploads)).toEqual([])
    // Fill it up to the last byte: now even the health probe's tiny file does not fit.
    const filler = path.join(uploads, 'filler')
    try {
      fs.writeFileSync(filler, Buffer.alloc(1024 * 1024))
    } catch {
      /* ENOSPC: full, as wanted */
    }
    const small = await upload(csv(8))
    expect(small.status).toBe(507)
    expect(tmpFiles(uploads)).toEqual([])
    expect(await fileRows()).toBe(before)
    const health = await request(t.app).get('/api/health')
    expect(health.body).toMatchObject({ status: 'degraded', storage: 'down' })
    expect(health.body.message).toMatch(/full/)
    fs.rmSync(filler)
    expect((await request(t.app).get('/api/health')).body.storage).toBe('up')
  })

  it('read-only: 503 with a message, no row; health says storage is down until it is writable again', async () => {
    const before = await fileRows()
    mount('-o', 'remount,ro', uploads)
    try {
      const res = await upload(csv(8))
      expect(res.status, JSON.stringify(res.body)).toBe(503)
      expect(res.body.message).toMatch(/cannot be written/)
      expect(await fileRows()).toBe(before)
      const health = await request(t.app).get('/api/health')
      expect(health.status).toBe(200) // reading still works; the database is fine
      expect(health.body).toMatchObject({ status: 'degraded', storage: 'down' })
    } finally {
      mount('-o', 'remount,rw', uploads)
    }
    expect((await request(t.app).get('/api/health')).body.storage).toBe('up')
    expect((await upload(csv(8))).status).toBe(201)
  })
})
