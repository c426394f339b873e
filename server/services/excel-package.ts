import { crc32, inflateRawSync } from 'node:zlib'
import { readZipDirectory, type ZipEntry } from './zip-guard'

/**
 * The parts of an uploaded .xlsx that the streaming reader needs, repacked (stored, not deflated)
 * in the order it reads best: workbook and its relations, shared strings and styles first, then
 * the sheets in their workbook order, then one trailing part.
 *
 * Why: exceljs's WorkbookReader takes the ZIP as a stream. When xl/workbook.xml comes after the
 * sheets (as exceljs itself and other programs write it), the reader parks the sheets in temp
 * files, and its unzip stream may end before the last part is handed over: then the sheet names
 * are unknown and reading fails, in more than half of the runs for a small workbook. With the
 * workbook first, sheets are read straight from the stream; the trailing part absorbs a lost last
 * part. Only called after `checkZip` (zip-guard.ts) has refused bombs and damaged packages.
 */
const FIRST = ['[Content_Types].xml', '_rels/.rels', 'xl/workbook.xml', 'xl/_rels/workbook.xml.rels', 'xl/sharedStrings.xml', 'xl/styles.xml']
const SHEET = /^xl\/worksheets\/sheet(\d+)\.xml$/

function content(buf: Buffer, e: ZipEntry): Buffer {
  const nameLen = buf.readUInt16LE(e.localOffset + 26)
  const extraLen = buf.readUInt16LE(e.localOffset + 28)
  const start = e.localOffset + 30 + nameLen + extraLen
  const raw = buf.subarray(start, start + e.compressedSize)
  return e.method === 0 ? raw : inflateRawSync(raw)
}

/** A stored ZIP of these parts, in this order. */
function storedZip(parts: { name: string; data: Buffer }[]): Buffer {
  const chunks: Buffer[] = []
  const central: Buffer[] = []
  let offset = 0
  for (const { name, data } of parts) {
    const nameBytes = Buffer.from(name, 'utf8')
    const crc = crc32(data) >>> 0
    const local = Buffer.alloc(30)
    local.writeUInt32LE(0x04034b50, 0); local.writeUInt16LE(20, 4); local.writeUInt16LE(0x0800, 6) // UTF-8 names
    local.writeUInt16LE(0, 8); local.writeUInt32LE(0, 10); local.writeUInt32LE(crc, 14)
    local.writeUInt32LE(data.length, 18); local.writeUInt32LE(data.length, 22); local.writeUInt16LE(nameBytes.length, 26); local.writeUInt16LE(0, 28)
    const dir = Buffer.alloc(46)
    dir.writeUInt32LE(0x02014b50, 0); dir.writeUInt16LE(20, 4); dir.writeUInt16LE(20, 6); dir.writeUInt16LE(0x0800, 8)
    dir.writeUInt16LE(0, 10); dir.writeUInt32LE(0, 12); dir.writeUInt32LE(crc, 16); dir.writeUInt32LE(data.length, 20); dir.writeUInt32LE(data.length, 24)
    dir.writeUInt16LE(nameBytes.length, 28); dir.writeUInt32LE(offset, 42)
    chunks.push(local, nameBytes, data)
    central.push(dir, nameBytes)
    offset += 30 + nameBytes.length + data.length
  }
  const dirBytes = Buffer.concat(central)
  const end = Buffer.alloc(22)
  end.writeUInt32LE(0x06054b50, 0); end.writeUInt16LE(parts.length, 8); end.writeUInt16LE(parts.length, 10)
  end.writeUInt32LE(dirBytes.length, 12); end.writeUInt32LE(offset, 16)
  return Buffer.concat([...chunks, dirBytes, end])
}

/** The repacked package (see above). */
export function orderedPackage(buf: Buffer): Buffer {
  const entries = readZipDirectory(buf)
  const byName = new Map(entries.map((e) => [e.name, e]))
  const sheets = entries.filter((e) => SHEET.test(e.name)).sort((a, b) => Number(SHEET.exec(a.name)![1]) - Number(SHEET.exec(b.name)![1]))
  const parts = [...FIRST.flatMap((n) => (byName.has(n) ? [byName.get(n)!] : [])), ...sheets].map((e) => ({ name: e.name, data: content(buf, e) }))
  parts.push({ name: 'docProps/overtone-end.xml', data: Buffer.from('<?xml version="1.0"?><end/>') })
  return storedZip(parts)
}
