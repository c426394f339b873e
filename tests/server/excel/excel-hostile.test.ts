import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { crc32, deflateRawSync, inflateRawSync } from 'node:zlib'
import ExcelJS from 'exceljs'
import type TestAgent from 'supertest/lib/agent'
import { makeChip, makeMaterial, uid } from '../inventory-helpers'
import { startImportTestApp, toBuffer, upload, workbookOf } from './excel-helpers'
import { loadWorkbook, readImportSheets } from '../../../server/services/excel/excel-import-read'
import { readZipDirectory } from '../../../server/services/files/zip-guard'
import type { AppError } from '../../../server/errors'
import type { ImportReport } from '../../../shared/excel'

/**
 * Hostile workbooks: ZIP bombs (honest and lying headers, ZIP64), too many parts, too many rows,
 * formulas, cells of the wrong type, formatted empty rows, extra and hidden sheets. The app under
 * test runs with small import limits (4 MB unpacked, 50 rows a sheet); the defaults are checked by
 * calling the reader directly.
 */
const LIMIT_MB = 4
const LIMIT_ROWS = 50

let t: Awaited<ReturnType<typeof startImportTestApp>>['t']
let lead: TestAgent, fab: TestAgent
let counts: Awaited<ReturnType<typeof startImportTestApp>>['counts']
beforeAll(async () => {
  ;({ t, lead, fab, counts } = await startImportTestApp({
    IMPORT_MAX_EXPANDED_MB: String(LIMIT_MB),
    IMPORT_MAX_ROWS: String(LIMIT_ROWS),
  }))
})
afterAll(async () => {
  await t.stop()
})

// ---------- a small ZIP reader/writer, to take exceljs output apart and pack it (with lies) again ----------
interface Part {
  name: string
  data: Buffer
  declaredSize?: number
}

function unzip(buf: Buffer): Part[] {
  return readZipDirectory(buf).map((e) => {
    const start = e.localOffset + 30 + buf.readUInt16LE(e.localOffset + 26) + buf.readUInt16LE(e.localOffset + 28)
    const raw = buf.subarray(start, start + e.compressedSize)
    return { name: e.name, data: e.method === 8 ? inflateRawSync(raw) : Buffer.from(raw) }
  })
}

/**
 * Deflate the parts into a ZIP; `declaredSize` makes a part's headers lie; zip64 writes ZIP64 records; encrypted sets
 * flag bit 0.
 */
function zip(parts: Part[], opts: { zip64?: boolean; encrypted?: boolean } = {}): Buffer {
  const out: Buffer[] = []
  const central: Buffer[] = []
  let offset = 0
  for (const p of parts) {
    const name = Buffer.from(p.name)
    const packed = deflateRawSync(p.data)
    const size = p.declaredSize ?? p.data.length
    const big = opts.zip64 || size >= 0xffffffff
    const flags = 0x0800 | (opts.encrypted ? 1 : 0)
    const local = Buffer.alloc(30)
    local.writeUInt32LE(0x04034b50, 0)
    local.writeUInt16LE(big ? 45 : 20, 4)
    local.writeUInt16LE(flags, 6)
    local.writeUInt16LE(8, 8)
    local.writeUInt32LE(crc32(p.data), 14)
    local.writeUInt32LE(packed.length, 18)
    local.writeUInt32LE(Math.min(size, 0xffffffff), 22)
    local.writeUInt16LE(name.length, 26)
    const extra = Buffer.alloc(big ? 28 : 0)
    if (big) {
      extra.writeUInt16LE(1, 0)
      extra.writeUInt16LE(24, 2)
      extra.writeBigUInt64LE(BigInt(size), 4)
      extra.writeBigUInt64LE(BigInt(packed.length), 12)
      extra.writeBigUInt64LE(BigInt(offset), 20)
    }
    const c = Buffer.alloc(46)
    c.writeUInt32LE(0x02014b50, 0)
    c.writeUInt16LE(big ? 45 : 20, 4)
    c.writeUInt16LE(big ? 45 : 20, 6)
    c.writeUInt16LE(flags, 8)
    c.writeUInt16LE(8, 10)
    c.writeUInt32LE(crc32(p.data), 16)
    c.writeUInt32LE(big ? 0xffffffff : packed.length, 20)
    c.writeUInt32LE(big ? 0xffffffff : size, 24)
    c.writeUInt16LE(name.length, 28)
    c.writeUInt16LE(extra.length, 30)
    c.writeUInt32LE(big ? 0xffffffff : offset, 42)
    central.push(c, name, extra)
    out.push(local, name, packed)
    offset += local.length + name.length + packed.length
  }
  const dir = Buffer.concat(central)
  const tail: Buffer[] = []
  const end = Buffer.alloc(22)
  end.writeUInt32LE(0x06054b50, 0)
  if (opts.zip64) {
    const rec = Buffer.alloc(56)
    rec.writeUInt32LE(0x06064b50, 0)
    rec.writeBigUInt64LE(44n, 4)
    rec.writeUInt16LE(45, 12)
    rec.writeUInt16LE(45, 14)
    rec.writeBigUInt64LE(BigInt(parts.length), 24)
    rec.writeBigUInt64LE(BigInt(parts.length), 32)
    rec.writeBigUInt64LE(BigInt(dir.length), 40)
    rec.writeBigUInt64LE(BigInt(offset), 48)
    const loc = Buffer.alloc(20)
    loc.writeUInt32LE(0x07064b50, 0)
    loc.writeBigUInt64LE(BigInt(offset + dir.length), 8)
    loc.writeUInt32LE(1, 16)
    tail.push(rec, loc)
    end.writeUInt16LE(0xffff, 8)
    end.writeUInt16LE(0xffff, 10)
    end.writeUInt32LE(0xffffffff, 12)
    end.writeUInt32LE(0xffffffff, 16)
  } else {
    end.writeUInt16LE(parts.length, 8)
    end.writeUInt16LE(parts.length, 10)
    end.writeUInt32LE(dir.length, 12)
    end.writeUInt32LE(offset, 16)
  }
  return Buffer.concat([...out, dir, ...tail, end])
}

const SHEET1 = 'xl/worksheets/sheet1.xml'
/** Pad the first sheet's XML with `n` spaces after its XML declaration (still a valid workbook). */
function padded(parts: Part[], n: number, declaredSize?: number): Part[] {
  return parts.map((p) => {
    if (p.name !== SHEET1) return p
    const xml = p.data.toString('utf8')
    const at = xml.indexOf('?>') + 2
    const data = Buffer.from(xml.slice(0, at) + ' '.repeat(n) + xml.slice(at))
    return { ...p, data, declaredSize }
  })
}

/** The field-level 400 message that loadWorkbook throws, or null when it loads. */
async function refusal(buf: Buffer, limits = {}): Promise<string | null> {
  try {
    await loadWorkbook(buf, limits)
    return null
  } catch (e) {
    expect((e as AppError).status).toBe(400)
    return (e as AppError).fields!.file[0]
  }
}

async function waferBook(materialName: string, lot = `LOT-${uid()}`) {
  return workbookOf({
    Wafers: [
      ['Ref', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot'],
      ['W1', materialName, '0 0 1', '1 -1 0', 50.8, 350, lot],
    ],
  })
}

describe('Excel import: ZIP bombs and damaged packages (reader)', () => {
  it('refuses by declared size with the default 200 MB limit, also through ZIP64, and loads an honest ZIP64 workbook', async () => {
    const parts = unzip(await toBuffer(await waferBook('GaAs')))
    const gb = 1.2 * 2 ** 30
    expect(await refusal(zip(padded(parts, 10, gb)))).toBe(
      'The workbook expands to 1.2 GB of data; at most 200 MB can be read: split the file',
    )
    expect(await refusal(zip(padded(parts, 10, 5 * 2 ** 30), { zip64: true }))).toBe(
      'The workbook expands to 5 GB of data; at most 200 MB can be read: split the file',
    )
    const honest64 = await loadWorkbook(zip(parts, { zip64: true }))
    expect((await readImportSheets(honest64)).sheets[0].rows).toHaveLength(1)
  })

  it('a part holding more than its header declares, a cut-short file, an encrypted part, too many parts, a password-protected file', async () => {
    const parts = unzip(await toBuffer(await waferBook('GaAs')))
    // 8 MB of XML that claims to be 1 KB: the streaming check stops right after the declared size.
    expect(await refusal(zip(padded(parts, 8 * 2 ** 20, 1024)))).toMatch(
      /damaged \(the part xl\/worksheets\/sheet1\.xml holds more data than its header declares\)/,
    )
    expect(await refusal(zip(padded(parts, 10, 20)))).toMatch(/holds more data than its header declares/)
    const good = zip(parts)
    expect(await refusal(good.subarray(0, good.length - 30))).toMatch(/damaged \(no ZIP directory at its end/)
    expect(await refusal(zip(parts, { encrypted: true }))).toMatch(/damaged \(a part is encrypted\)/)
    const many = [
      ...parts,
      ...Array.from({ length: 30 }, (_, i) => ({ name: `customXml/item${i}.xml`, data: Buffer.from('<a/>') })),
    ]
    expect(await refusal(zip(many), { maxParts: 20 })).toBe(
      'The workbook is packed from more than 20 parts; at most 20 can be read: it is not a workbook as Excel saves it',
    )
    expect(await refusal(zip(many))).toBeNull()
    const cfb = Buffer.concat([
      Buffer.from('d0cf11e0a1b11ae1', 'hex'),
      Buffer.alloc(500),
      Buffer.from('EncryptedPackage', 'utf16le'),
    ])
    expect(await refusal(cfb)).toMatch(/protected by a password/)
  })

  it('rows over the limit: the sheet is refused with a clear message; formatted and blank rows do not count', async () => {
    const rows = (n: number) => Array.from({ length: n }, (_, i) => ['W-0001', i + 1, 5, 5])
    const over = await readImportSheets(
      await loadWorkbook(
        await toBuffer(workbookOf({ Chips: [['Wafer', 'Index', 'Width (mm)', 'Height (mm)'], ...rows(4)] })),
      ),
      { maxRows: 3 },
    )
    expect(over.sheets[1].messages).toEqual([
      {
        column: null,
        message: 'The sheet has 4 rows; at most 3 can be imported at once: split the file',
        level: 'error',
      },
    ])
    expect(over.sheets[1].rows).toEqual([])
    const book = workbookOf({
      Chips: [['Wafer', 'Index', 'Width (mm)', 'Height (mm)'], ...rows(3), ['', '  ', null, null], ['', '', '', '']],
    })
    const ws = book.getWorksheet('Chips')!
    for (let r = 10; r < 200; r++)
      ws.getRow(r).getCell(2).fill = { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FFFFFF00' } }
    const within = await readImportSheets(await loadWorkbook(await toBuffer(book)), { maxRows: 3 })
    expect(within.sheets[1].messages).toEqual([])
    expect(within.sheets[1].rows.map((r) => r.row)).toEqual([2, 3, 4])
  })
})

describe('Excel import: hostile workbooks through the API', () => {
  it('a ZIP bomb (sheet XML padded past the limit) is refused with 400 before it is unpacked; nothing is written', async () => {
    const material = await makeMaterial(fab)
    const parts = unzip(await toBuffer(await waferBook(material.name)))
    const before = await counts()
    const bomb = zip(padded(parts, (LIMIT_MB + 2) * 2 ** 20))
    expect(bomb.length).toBeLessThan(100_000)
    for (const dryRun of [true, false]) {
      const res = await upload(lead, bomb, dryRun)
      expect(res.status).toBe(400)
      expect(res.body.fields.file).toEqual([
        expect.stringMatching(
          new RegExp(`^The workbook expands to 6 MB of data; at most ${LIMIT_MB} MB can be read: split the file$`),
        ),
      ])
    }
    const liar = await upload(lead, zip(padded(parts, (LIMIT_MB + 2) * 2 ** 20, 2048)), false)
    expect(liar.status).toBe(400)
    expect(liar.body.fields.file[0]).toMatch(/holds more data than its header declares/)
    expect(await counts()).toEqual(before)
    // The same padding below the limit is an ordinary workbook.
    const ok = await upload(lead, zip(padded(parts, 2 ** 20)), true)
    expect(ok.status).toBe(200)
    expect(ok.body.summary.create).toBe(1)
  })

  it('a sheet with more rows than allowed is refused with the sheet-level message; nothing is written', async () => {
    const { wafer } = await makeChip(fab)
    const rows = Array.from({ length: LIMIT_ROWS + 1 }, () => [wafer.code, 5, 5])
    const bytes = await toBuffer(workbookOf({ Chips: [['Wafer', 'Width (mm)', 'Height (mm)'], ...rows] }))
    const before = await counts()
    const res = await upload(lead, bytes, false)
    expect(res.status).toBe(422)
    const r = res.body as ImportReport
    expect(r.sheets[1].messages).toContainEqual({
      column: null,
      message: `The sheet has ${LIMIT_ROWS + 1} rows; at most ${LIMIT_ROWS} can be imported at once: split the file`,
      level: 'error',
    })
    expect(r.imported).toBe(false)
    expect(await counts()).toEqual(before)
  })

  it('formulas by their saved result, links and rich text as text, a date in a text column as YYYY-MM-DD; wrong types name their column', async () => {
    const material = await makeMaterial(fab)
    const lot = `LOT-${uid()}`
    const { wafer } = await makeChip(fab)
    const head = [
      'Ref',
      'Material',
      'Cut normal',
      'Flat direction',
      'Diameter (mm)',
      'Thickness (µm)',
      'Lot',
      'Supplier',
      'Received on',
      'Notes',
      'Status',
    ]
    const ok = (ref: string) => [ref, material.name, '0 0 1', '1 -1 0', 50.8, 350, lot]
    const book = workbookOf({
      Wafers: [
        head,
        [
          'W1',
          { formula: 'Lists!A2', result: material.name },
          '0 0 1',
          '1 -1 0',
          { formula: '25.4*2', result: 50.8 },
          { formula: 'E2*7', result: 350 },
          { text: lot, hyperlink: 'https://lots.example/1' },
          { richText: [{ text: 'Norrvik ' }, { font: { bold: true }, text: 'Supply' }] },
          { formula: 'DATE(2024,5,2)', result: new Date(Date.UTC(2024, 4, 2)) },
          new Date(Date.UTC(2023, 0, 31)),
        ],
        ['W2', material.name, '0 0 1', '1 -1 0', 'five', 350, lot],
        [...ok('W3').slice(0, 5), { error: '#DIV/0!' }, lot],
        [...ok('W4').slice(0, 6), true],
        [...ok('W5'), null, 1e20],
        [...ok('W6').slice(0, 4), { formula: '1/0', result: { error: '#DIV/0!' } }, 350, lot],
        [...ok('W7').slice(0, 5), { formula: 'Z9*2' }, lot],
        [...ok('W8'), null, null, 'x'.repeat(3000), 'y'.repeat(5000)],
        [...ok('W9'), null, new Date(Date.UTC(1850, 0, 1))],
        [...ok('W10').slice(0, 4), new Date(Date.UTC(2024, 0, 1)), 350, lot],
      ],
      Chips: [
        ['Ref', 'Wafer', 'Index', 'Width (mm)', 'Height (mm)', 'Location'],
        ['K1', 'W1', 1, 5, 5],
        ['K2', 5, null, 5, 5],
        ['K3', wafer.code, 'two', 5, 5],
        ['K4', wafer.code, null, true, 5],
        ['K5', wafer.code, null, 5, 5, 7],
      ],
    })
    const recv = book.getWorksheet('Wafers')!
    recv.getCell('I6').numFmt = 'yyyy-mm-dd'
    const bytes = await toBuffer(book)
    const res = await upload(lead, bytes, true)
    expect(res.status).toBe(200)
    const r = res.body as ImportReport
    const at = (sheet: string, row: number) => r.rows.find((x) => x.sheet === sheet && x.row === row)!
    const first = (sheet: string, row: number) => at(sheet, row).messages[0]
    expect(at('Wafers', 2)).toMatchObject({ status: 'create', messages: [] })
    expect(first('Wafers', 3)).toMatchObject({
      column: 'Diameter (mm)',
      message: 'expected a number in mm, found text "five"',
    })
    expect(first('Wafers', 4)).toMatchObject({ column: 'Thickness (µm)', message: 'the cell holds the error #DIV/0!' })
    expect(first('Wafers', 5)).toMatchObject({ column: 'Lot', message: 'expected text, found TRUE/FALSE' })
    expect(first('Wafers', 6)).toMatchObject({
      column: 'Received on',
      message: expect.stringMatching(/formatted as a date but its number is not a date/),
    })
    expect(first('Wafers', 7)).toMatchObject({
      column: 'Diameter (mm)',
      message: expect.stringMatching(/^formula without a value .*an error such as #DIV\/0!/),
    })
    expect(first('Wafers', 8)).toMatchObject({
      column: 'Thickness (µm)',
      message: expect.stringMatching(/^formula without a value/),
    })
    expect(at('Wafers', 9).messages).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ column: 'Notes', message: 'the text has 3,000 characters; at most 2,000 are read' }),
        expect.objectContaining({
          column: 'Status',
          message: expect.stringMatching(/^"y{60}…" is not one of: in_stock/),
        }),
      ]),
    )
    expect(first('Wafers', 10)).toMatchObject({
      column: 'Received on',
      message: 'expected a date, found the date is outside the years 1900–9999',
    })
    expect(first('Wafers', 11)).toMatchObject({
      column: 'Diameter (mm)',
      message: 'expected a number in mm, found a date',
    })
    expect(at('Chips', 2)).toMatchObject({ status: 'create' })
    expect(first('Chips', 3)).toMatchObject({
      column: 'Wafer',
      message: 'No wafer 5: neither a Code on the Wafers sheet nor a wafer in Overtone',
    })
    expect(first('Chips', 4)).toMatchObject({ column: 'Index', message: 'expected a number, found text "two"' })
    expect(first('Chips', 5)).toMatchObject({
      column: 'Width (mm)',
      message: 'expected a number in mm, found TRUE/FALSE',
    })
    expect(first('Chips', 6)).toMatchObject({
      column: 'Location',
      message: expect.stringMatching(/^No location 7 in Overtone/),
    })
    expect(r.rows.filter((x) => x.status === 'error')).toHaveLength(13)

    // Only the good rows: they import, and the stored values are the saved results and plain texts.
    const good = workbookOf({
      Wafers: book
        .getWorksheet('Wafers')!
        .getRows(1, 2)!
        .map((row) => (row.values as ExcelJS.CellValue[]).slice(1)),
      Chips: [
        ['Ref', 'Wafer', 'Index', 'Width (mm)', 'Height (mm)'],
        ['K1', 'W1', 1, 5, 5],
      ],
    })
    const real = await upload(lead, await toBuffer(good), false)
    expect(real.status, JSON.stringify(real.body)).toBe(201)
    const made = (await lead.get(`/api/wafers/${real.body.created.wafers[0].id}`)).body
    expect(made).toMatchObject({
      material: { id: material.id },
      diameterMm: 50.8,
      thicknessUm: 350,
      lot,
      supplier: 'Norrvik Supply',
      receivedOn: '2024-05-02',
      notes: '2023-01-31',
    })
  })

  it('10 000 formatted but empty rows after the data: only the data rows are read and imported', async () => {
    const { wafer } = await makeChip(fab)
    const book = workbookOf({
      Chips: [
        ['Wafer', 'Width (mm)', 'Height (mm)', 'Notes'],
        [wafer.code, 5, 5, 'a'],
        [wafer.code, 6, 6, 'b'],
      ],
    })
    const ws = book.getWorksheet('Chips')!
    for (let r = 4; r < 10_004; r++) {
      const row = ws.getRow(r)
      for (let c = 1; c <= 4; c++)
        Object.assign(row.getCell(c), {
          fill: { type: 'pattern', pattern: 'solid', fgColor: { argb: 'FFFFFF00' } },
          border: { top: { style: 'thin' } },
          numFmt: '0.00',
        })
    }
    const bytes = await toBuffer(book)
    const before = await counts()
    const res = await upload(lead, bytes, false)
    expect(res.status, JSON.stringify(res.body.sheets)).toBe(201)
    expect((res.body as ImportReport).rows.map((x) => [x.row, x.code])).toEqual([
      [2, `C-${wafer.code.slice(2)}-02`],
      [3, `C-${wafer.code.slice(2)}-03`],
    ])
    const after = await counts()
    expect([after.w - before.w, after.c - before.c, after.a - before.a]).toEqual([0, 2, 0])
  })

  it('extra sheets and hidden sheets are not read, with a warning; the visible sheets import', async () => {
    const material = await makeMaterial(fab)
    const { wafer } = await makeChip(fab)
    const book = workbookOf(
      {
        'Read me': [['Filled in by hand, 2019']],
        Wafers: [
          ['Ref', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot'],
          ['W1', material.name, '0 0 1', '1 -1 0', 50.8, 350, 'L'],
        ],
        Chips: [
          ['Wafer', 'Width (mm)', 'Height (mm)'],
          [wafer.code, 5, 5],
        ],
        Lists: [['GaAs']],
        Secret: [['x']],
      },
      { Wafers: 'hidden', Lists: 'hidden', Secret: 'veryHidden' },
    )
    const before = await counts()
    const res = await upload(lead, await toBuffer(book), false)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const r = res.body as ImportReport
    expect(r.fileMessages).toEqual([
      {
        column: null,
        level: 'warning',
        message:
          'The sheet Wafers is hidden in Excel and was not read: unhide it (right-click a sheet tab → Unhide) to import its rows',
      },
      {
        column: null,
        level: 'warning',
        message:
          'Sheets not read (only Wafers, Chips and Arrays are imported): Read me, Lists (hidden), Secret (hidden)',
      },
    ])
    expect(r.sheets.map((s) => s.isPresent)).toEqual([false, true, false])
    const after = await counts()
    expect([after.w - before.w, after.c - before.c]).toEqual([0, 1])
    const onlyHidden = (
      await upload(lead, await toBuffer(workbookOf({ Wafers: [['Ref']] }, { Wafers: 'hidden' })), true)
    ).body as ImportReport
    expect(onlyHidden.fileMessages.map((m) => m.level)).toEqual(['warning', 'error'])
    expect(onlyHidden.fileMessages[1].message).toMatch(
      /no sheet named Wafers, Chips or Arrays \(it has: Wafers \(hidden\)\)/,
    )
  })
})
