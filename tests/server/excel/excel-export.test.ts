import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import ExcelJS from 'exceljs'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { disk, makeChip } from '../inventory-helpers'
import { binary, runExport } from './excel-helpers'
import { ROLES, type Role } from '../../../shared/roles'

let t: Awaited<ReturnType<typeof startTestApp>>
let lead: TestAgent, fab: TestAgent
const agents = {} as Record<Role, TestAgent>
beforeAll(async () => {
  t = await startTestApp()
  for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
  lead = agents.group_lead
  fab = agents.fab_technician
})
afterAll(async () => {
  await t.stop()
})

describe('inventory export', () => {
  it('writes About, Materials, Wafers, Chips, Arrays, Sessions and Locations with styled, frozen, filtered headers and date cells', async () => {
    const { chip, wafer } = await makeChip(fab, {}, { receivedOn: '2024-03-14' })
    const arr = await fab.post(`/api/chips/${chip.id}/arrays`).send(disk(chip.id, 'B2'))
    expect(arr.status).toBe(201)
    expect(
      (
        await fab
          .post(`/api/chips/${chip.id}/fab-steps`)
          .send({ kind: 'resist', params: { spinRpm: 4000, bakeTempC: 180 }, performedAt: '2025-06-01T10:00:00Z' })
      ).status,
    ).toBe(201)
    const { job, book } = await runExport(lead)
    expect(job.fileName).toMatch(/^overtone-inventory-\d{8}-\d{4}\.xlsx$/)
    expect(job.done).toBe(job.total)
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
    // read-only sheets: the demo lab's laser setups with their sign-off state
    const setups = book.getWorksheet('Laser setups')!
    const sHeader = (setups.getRow(1).values as unknown[]).slice(1)
    expect(sHeader).toEqual(
      expect.arrayContaining([
        'Code',
        'Laser class',
        'Sign-off',
        'Sessions may be logged today',
        'Approval expires on',
      ]),
    )
    expect(setups.rowCount).toBeGreaterThan(1)
    expect(String(setups.getRow(2).getCell(sHeader.indexOf('Sign-off') + 1).value)).toMatch(
      /^(draft|waiting|approved|approval expired|rejected|revoked|voided)/,
    )
    // fabrication steps: each parameter with its label and unit
    const steps = book.getWorksheet('Fabrication')!
    const fHeader = (steps.getRow(1).values as unknown[]).slice(1)
    let frow: ExcelJS.Row | undefined
    steps.eachRow((row) => {
      if (row.getCell(1).value === chip.code) frow = row
    })
    expect(frow!.getCell(fHeader.indexOf('Parameters') + 1).value).toBe(
      'Spin speed: 4000 rpm; Bake temperature: 180 °C',
    )
    expect((book.getWorksheet('Files')!.getRow(1).values as unknown[]).slice(1)).toEqual(
      expect.arrayContaining(['File name', 'SHA-256', 'Attached to']),
    )
    expect((book.getWorksheet('Moves')!.getRow(1).values as unknown[]).slice(1)).toEqual(
      expect.arrayContaining(['Code', 'From', 'To', 'Moved by']),
    )
    for (const ws of book.worksheets) {
      expect(ws.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 })
      expect(ws.getRow(1).getCell(1).font?.bold).toBe(true)
      expect(ws.autoFilter).toBeTruthy()
    }
    const wafers = book.getWorksheet('Wafers')!
    const header = (wafers.getRow(1).values as unknown[]).slice(1)
    expect(header.slice(0, 3)).toEqual(['Code', 'Material', 'Cut normal'])
    let found: ExcelJS.Row | undefined
    wafers.eachRow((row) => {
      if (row.getCell(1).value === wafer.code) found = row
    })
    expect(found).toBeTruthy()
    const received = found!.getCell(header.indexOf('Received on') + 1)
    expect(received.value).toBeInstanceOf(Date)
    expect((received.value as Date).toISOString().slice(0, 10)).toBe('2024-03-14')
    expect(found!.getCell(header.indexOf('Created (UTC)') + 1).value).toBeInstanceOf(Date)
    const arrays = book.getWorksheet('Arrays')!
    const aHeader = (arrays.getRow(1).values as unknown[]).slice(1) as string[]
    expect(aHeader).toContain('SHG circular +1: allowed m')
    expect(aHeader).toContain('THG linear across flat: normal emission')
    let arow: ExcelJS.Row | undefined
    arrays.eachRow((row) => {
      if (row.getCell(1).value === arr.body.code) arow = row
    })
    expect(arow!.getCell(aHeader.indexOf('Symmetry') + 1).value).toBe(arr.body.symmetry.name)
    expect(String(arow!.getCell(aHeader.indexOf('SHG circular +1: normal emission') + 1).value)).toMatch(/^(no|yes.*)$/)
    const about = book.getWorksheet('About')!
    const text = JSON.stringify(about.getSheetValues())
    expect(text).toMatch(/MODEL PREDICTIONS/)
  })

  it('keeps a job to the person who started it, and refuses an unknown id', async () => {
    const { job } = await runExport(lead)
    const admin = agents.admin
    expect((await admin.get(`/api/excel/exports/${job.id}`)).status).toBe(404)
    expect((await admin.get(`/api/excel/exports/${job.id}/download`)).status).toBe(404)
    expect((await lead.get('/api/excel/exports/not-a-uuid')).status).toBe(400)
    const dl = await lead
      .get(`/api/excel/exports/${job.id}/download`)
      .buffer(true)
      .parse(binary as never)
    expect(dl.headers['content-type']).toMatch(/spreadsheetml/)
    expect(dl.headers['content-disposition']).toMatch(/attachment; filename="?overtone-inventory-/)
  })

  it('template: Instructions, Wafers, Chips, Arrays with commented headers, drop-downs and an EXAMPLE row', async () => {
    const res = await lead
      .get('/api/excel/template')
      .buffer(true)
      .parse(binary as never)
    expect(res.status).toBe(200)
    const book = new ExcelJS.Workbook()
    await book.xlsx.load(res.body as ArrayBuffer)
    expect(book.worksheets.map((w) => w.name)).toEqual(['Instructions', 'Wafers', 'Chips', 'Arrays', 'Lists'])
    const ws = book.getWorksheet('Wafers')!
    expect(ws.getCell('E1').value).toBe('Diameter (mm)')
    expect(JSON.stringify(ws.getCell('E1').note)).toMatch(/millimetres/)
    expect(ws.getCell('A2').value).toBe('EXAMPLE')
    const shape = book.getWorksheet('Arrays')!.getCell('D5').dataValidation
    expect(shape?.type).toBe('list')
  })
})

/** Route × role matrix (bodies invalid or ids unknown, so an allowed call writes nothing). */
const MATRIX: { method: 'get' | 'post'; path: string }[] = [
  { method: 'post', path: '/api/excel/import?dryRun=true' },
  { method: 'get', path: '/api/excel/template' },
  { method: 'get', path: '/api/excel/exports/00000000-0000-4000-8000-000000000000' },
  { method: 'get', path: '/api/excel/exports/00000000-0000-4000-8000-000000000000/download' },
]
const ALLOWED: Role[] = ['admin', 'group_lead']
describe('excel route × role matrix', () => {
  for (const route of MATRIX) {
    it(`${route.method.toUpperCase()} ${route.path}`, async () => {
      expect((await request(t.app)[route.method](route.path)).status).toBe(401)
      for (const role of ROLES) {
        const res = await agents[role][route.method](route.path)
        if (ALLOWED.includes(role)) expect([200, 400, 404], `${role}`).toContain(res.status)
        else expect(res.status, `${role}`).toBe(403)
      }
    })
  }
  it('POST /api/excel/exports: 401 anonymous, 403 for fab technicians and optics staff, 202 for a group lead', async () => {
    expect((await request(t.app).post('/api/excel/exports')).status).toBe(401)
    for (const role of ['fab_technician', 'optics_staff', 'safety_officer'] as Role[])
      expect((await agents[role].post('/api/excel/exports')).status).toBe(403)
  })
})
