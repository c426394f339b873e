import { describe, it, expect, beforeAll, afterAll, vi } from 'vitest'
import fs from 'node:fs/promises'
import os from 'node:os'
import path from 'node:path'
import { randomUUID } from 'node:crypto'
import ExcelJS from 'exceljs'
import { eq, inArray, sql } from 'drizzle-orm'
import { exportJobs } from '../../../server/db/schema/index'
import { createFileStorage } from '../../../server/services/files/create-storage'
import type { ExportJob } from '../../../shared/excel'
import { startTestApp, signedInAs } from '../helpers'
import { binary, runExport } from './excel-helpers'
import { makePerson, retirePeople, NOTICE_PASSWORD } from '../mail/notices-helpers'
import { makeSample } from '../measurements/fixtures-measurements'
import { fakeS3 } from '../files/fake-s3'
import { waitForExport } from '../../../server/services/excel/excel-export'

/**
 * Export jobs live in MariaDB (export_jobs) and finished workbooks in the shared FileStorage, so
 * any app server answers the progress poll and the download. Each test uses its own group lead
 * (the demo lead's exports in other test files must not meet a 409 from these jobs).
 */

let t: Awaited<ReturnType<typeof startTestApp>>
const people: number[] = []
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await retirePeople(t.db, people)
  await t.stop()
})

/** A new group lead, signed in on `app`. */
async function newLead(signIn: typeof signedInAs = signedInAs, app = t.app) {
  const person = await makePerson(t.db, ['group_lead'], { password: true })
  people.push(person.id)
  return { ...person, agent: await signIn(app, person.email, NOTICE_PASSWORD) }
}

const jobRow = async (id: string) => (await t.db.select().from(exportJobs).where(eq(exportJobs.id, id)))[0]

describe('two app servers, each with its own disk, sharing MariaDB and an S3 bucket', () => {
  const BUCKET = 'lab-exports'
  const fake = fakeS3(BUCKET)
  const dirs: string[] = []
  let other: Awaited<ReturnType<typeof startTestApp>> | undefined
  afterAll(async () => {
    await other?.stop()
    await fake.stop()
    for (const d of dirs) await fs.rm(d, { recursive: true, force: true })
  })

  it('a job started on one server is polled and downloaded through the other', async () => {
    const endpoint = await fake.start()
    const s3 = {
      FILE_STORAGE: 's3',
      S3_ENDPOINT: endpoint,
      S3_BUCKET: BUCKET,
      S3_ACCESS_KEY_ID: 'k',
      S3_SECRET_ACCESS_KEY: 's',
      S3_PREFIX: 'blobs/',
    }
    for (let i = 0; i < 2; i++) dirs.push(await fs.mkdtemp(path.join(os.tmpdir(), 'ovt-export-server-')))
    const first = await startTestApp({ ...s3, DATA_DIR: dirs[0] })
    try {
      // The second server is a fresh copy of every module, as a separate process would be: nothing
      // kept in a module of the first (such as a map of jobs) is visible to it.
      vi.resetModules()
      const fresh = await import('../helpers')
      other = await fresh.startTestApp({ ...s3, DATA_DIR: dirs[1] })
      const person = await newLead()
      const onFirst = await signedInAs(first.app, person.email, NOTICE_PASSWORD)
      const onOther = await fresh.signedInAs(other.app, person.email, NOTICE_PASSWORD)

      const start = await onFirst.post('/api/excel/exports').send({})
      expect(start.status).toBe(202)
      let job = start.body as ExportJob
      expect(Object.keys(job)).toEqual([
        'id',
        'phase',
        'done',
        'total',
        'startedAt',
        'finishedAt',
        'fileName',
        'sizeBytes',
        'error',
      ])
      expect(job).toMatchObject({ phase: 'queued', done: 0, total: 0, finishedAt: null, sizeBytes: null, error: null })
      for (let i = 0; i < 600 && !['done', 'failed'].includes(job.phase); i++) {
        await new Promise((r) => setTimeout(r, 20))
        const poll = await onOther.get(`/api/excel/exports/${job.id}`)
        expect(poll.status).toBe(200)
        job = poll.body
      }
      expect(job.phase, JSON.stringify(job)).toBe('done')
      expect(job.done).toBe(job.total)
      expect(job.total).toBeGreaterThan(0)

      const dl = await onOther
        .get(`/api/excel/exports/${job.id}/download`)
        .buffer(true)
        .parse(binary as never)
      expect(dl.status).toBe(200)
      expect(dl.headers['content-type']).toMatch(/spreadsheetml/)
      expect(dl.headers['content-disposition']).toContain(job.fileName)
      const bytes = dl.body as Buffer
      expect(bytes.length).toBe(job.sizeBytes)
      const book = new ExcelJS.Workbook()
      await book.xlsx.load(bytes as unknown as ArrayBuffer)
      expect(book.worksheets.map((w) => w.name)).toEqual([
        'About',
        'Materials',
        'Wafers',
        'Chips',
        'Arrays',
        'Sessions',
        'Locations',
        'Fabrication',
        'Laser setups',
        'Moves',
        'Files',
      ])

      // The workbook is in the bucket under its hash; neither server's disk keeps it.
      const row = await jobRow(job.id)
      expect(row.blobSha256).toMatch(/^[0-9a-f]{64}$/)
      expect([...fake.objects.keys()]).toContain(
        `blobs/${row.blobSha256!.slice(0, 2)}/${row.blobSha256!.slice(2, 4)}/${row.blobSha256}`,
      )
      expect(await fs.readdir(path.join(dirs[0], 'exports'))).toEqual([])
      await expect(fs.readdir(path.join(dirs[1], 'exports'))).rejects.toMatchObject({ code: 'ENOENT' })
      // Another person is refused on either server.
      const stranger = await newLead(fresh.signedInAs as typeof signedInAs, other.app)
      expect((await stranger.agent.get(`/api/excel/exports/${job.id}`)).status).toBe(404)
      expect((await stranger.agent.get(`/api/excel/exports/${job.id}/download`)).status).toBe(404)
    } finally {
      await first.stop()
    }
  })
})

describe('starting twice at once', () => {
  it('starts one job: a double click or two app servers cannot run two exports of one person', async () => {
    const lead = await newLead()
    const other = await startTestApp()
    try {
      const onOther = await signedInAs(other.app, lead.email, NOTICE_PASSWORD)
      const answers = await Promise.all([
        lead.agent.post('/api/excel/exports').send({}),
        onOther.post('/api/excel/exports').send({}),
        lead.agent.post('/api/excel/exports').send({}),
      ])
      expect(answers.map((a) => a.status).sort()).toEqual([202, 409, 409])
      const started = answers.find((a) => a.status === 202)!.body as ExportJob
      expect((await waitForExport(t.db, started.id)).phase).toBe('done')
    } finally {
      await other.stop()
    }
  })
})

describe('a job whose app server stopped', () => {
  it('is reported failed once its row is older than two minutes, and does not block the next export', async () => {
    const { id: userId, agent } = await newLead()
    // A job row as a server leaves it when it dies while writing the Arrays sheet.
    const id = randomUUID()
    const now = new Date()
    await t.db.insert(exportJobs).values({
      id,
      userId,
      phase: 'Arrays',
      done: 40,
      total: 90,
      startedAt: now,
      fileName: 'overtone-inventory-x.xlsx',
      updatedAt: now,
    })
    // While its row is fresh it counts as running: a second export of the same person is refused.
    expect((await agent.get(`/api/excel/exports/${id}`)).body).toMatchObject({
      phase: 'Arrays',
      done: 40,
      total: 90,
      error: null,
    })
    const refused = await agent.post('/api/excel/exports').send({})
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/still running/)

    await t.db.execute(sql`UPDATE export_jobs SET updated_at = updated_at - INTERVAL 3 MINUTE WHERE id = ${id}`)
    const stale = (await agent.get(`/api/excel/exports/${id}`)).body as ExportJob
    expect(stale).toMatchObject({ phase: 'failed', done: 40, total: 90, sizeBytes: null })
    expect(stale.error).toMatch(/the app server writing it stopped; start a new export/)
    expect(new Date(stale.finishedAt!).getTime()).toBeLessThan(Date.now() - 2 * 60_000)
    const dl = await agent.get(`/api/excel/exports/${id}/download`)
    expect(dl.status).toBe(409)
    expect(JSON.stringify(dl.body)).toMatch(/app server writing it stopped/)

    // The next export starts and finishes; the sweep it ran marked the dead job failed in the table.
    const { job } = await runExport(agent)
    expect(job.phase).toBe('done')
    expect(await jobRow(id)).toMatchObject({ phase: 'failed', error: stale.error, blobSha256: null })
    expect((await agent.get(`/api/excel/exports/${id}`)).body).toEqual(stale)
  })
})

describe('expiry', () => {
  it('an hour after it started a job is gone with its workbook, unless an uploaded file has the same bytes', async () => {
    const { id: userId, agent } = await newLead()
    const storage = createFileStorage(t.ctx.env.DATA_DIR, t.ctx.env)
    const { job } = await runExport(agent)
    const exported = (await jobRow(job.id)).blobSha256!
    expect(await storage.has(exported)).toBe(true)

    // Content-addressed storage keeps identical bytes once: a job whose workbook has the same bytes
    // as an uploaded file names the same blob as that file's row.
    const fab = await signedInAs(t.app, 'fab_technician')
    const { chipId } = await makeSample(t.db)
    const up = await fab
      .post('/api/files')
      .field('entity', 'chip')
      .field('entityId', String(chipId))
      .field('kind', 'spectrum')
      .attach('file', Buffer.from(`wavelength_nm,counts\n775,${Math.random()}\n776,3\n`), 'spectrum.csv')
    expect(up.status).toBe(201)
    const shared = randomUUID()
    await t.db.insert(exportJobs).values({
      id: shared,
      userId,
      phase: 'done',
      done: 1,
      total: 1,
      startedAt: new Date(),
      finishedAt: new Date(),
      fileName: 'overtone-inventory-y.xlsx',
      blobSha256: up.body.sha256,
      updatedAt: new Date(),
    })

    const ids = [job.id, shared]
    await t.db.execute(
      sql`UPDATE export_jobs SET started_at = started_at - INTERVAL 61 MINUTE, finished_at = finished_at - INTERVAL 61 MINUTE, updated_at = updated_at - INTERVAL 61 MINUTE WHERE id IN (${sql.join(
        ids.map((i) => sql`${i}`),
        sql`, `,
      )})`,
    )
    // Expired: no longer served, even before a sweep has removed it.
    expect((await agent.get(`/api/excel/exports/${job.id}`)).status).toBe(404)
    expect((await agent.get(`/api/excel/exports/${job.id}/download`)).status).toBe(404)

    // Starting an export sweeps (whichever server does it: the storage is shared).
    const next = await agent.post('/api/excel/exports').send({})
    expect(next.status).toBe(202)
    expect(await t.db.select({ id: exportJobs.id }).from(exportJobs).where(inArray(exportJobs.id, ids))).toEqual([])
    expect(await storage.has(exported)).toBe(false)
    expect(await storage.has(up.body.sha256)).toBe(true)
    const file = await fab
      .get(`/api/files/${up.body.id}/download`)
      .buffer(true)
      .parse(binary as never)
    expect(file.status).toBe(200)
    expect(String(file.body)).toMatch(/^wavelength_nm,counts/)
    // Let the export just started finish before the app stops.
    for (let i = 0; i < 600; i++) {
      const poll = (await agent.get(`/api/excel/exports/${next.body.id}`)).body as ExportJob
      if (['done', 'failed'].includes(poll.phase)) break
      await new Promise((r) => setTimeout(r, 50))
    }
  })
})
