import { readZipDirectory, type ZipEntry } from '../files/zip-guard'

/**
 * The parts of an uploaded .xlsx that the streaming reader needs, in the order it reads best:
 * workbook and its relations, shared strings and styles first, then the sheets in their workbook
 * order, then one trailing part. Each part keeps its compressed bytes (no copy: slices of the
 * upload) behind a fresh local header with the sizes and CRC of the central directory.
 *
 * Why: exceljs's WorkbookReader takes the ZIP as a stream. When xl/workbook.xml comes after the
 * sheets (as exceljs itself and other programs write it), the reader parks the sheets in temp
 * files, and its unzip stream may end before the last part is handed over: then the sheet names
 * are unknown and reading fails, in more than half of the runs for a small workbook. With the
 * workbook first, sheets are read straight from the stream; the trailing part absorbs a lost last
 * part. Only called after `checkZip` (zip-guard.ts) has refused bombs and damaged packages.
 */
const FIRST = [
  '[Content_Types].xml',
  '_rels/.rels',
  'xl/workbook.xml',
  'xl/_rels/workbook.xml.rels',
  'xl/sharedStrings.xml',
  'xl/styles.xml',
]
const SHEET = /^xl\/worksheets\/sheet(\d+)\.xml$/
const TRAILER = { name: 'docProps/overtone-end.xml', data: Buffer.from('<?xml version="1.0"?><end/>') }

function localHeader(name: Buffer, method: number, crc: number, compressed: number, size: number): Buffer {
  const h = Buffer.alloc(30)
  h.writeUInt32LE(0x04034b50, 0)
  h.writeUInt16LE(20, 4)
  h.writeUInt16LE(0x0800, 6) // version 2.0, UTF-8 names, no data descriptor
  h.writeUInt16LE(method, 8)
  h.writeUInt32LE(0, 10)
  h.writeUInt32LE(crc >>> 0, 14)
  h.writeUInt32LE(compressed, 18)
  h.writeUInt32LE(size, 22)
  h.writeUInt16LE(name.length, 26)
  h.writeUInt16LE(0, 28)
  return h
}

/** The compressed bytes of a part, as a slice of the upload. */
function rawData(buf: Buffer, e: ZipEntry): Buffer {
  const start = e.localOffset + 30 + buf.readUInt16LE(e.localOffset + 26) + buf.readUInt16LE(e.localOffset + 28)
  return buf.subarray(start, start + e.compressedSize)
}

/** The repacked package as chunks for a stream (local headers and data only: a streaming unzip reads no directory). */
export function orderedPackage(buf: Buffer): Buffer[] {
  const entries = readZipDirectory(buf)
  const byName = new Map(entries.map((e) => [e.name, e]))
  const sheets = entries
    .filter((e) => SHEET.test(e.name))
    .sort((a, b) => Number(SHEET.exec(a.name)![1]) - Number(SHEET.exec(b.name)![1]))
  const chunks: Buffer[] = []
  for (const e of [...FIRST.flatMap((n) => (byName.has(n) ? [byName.get(n)!] : [])), ...sheets]) {
    const name = Buffer.from(e.name, 'utf8')
    chunks.push(localHeader(name, e.method, e.crc32, e.compressedSize, e.size), name, rawData(buf, e))
  }
  const name = Buffer.from(TRAILER.name, 'utf8')
  chunks.push(localHeader(name, 0, crc(TRAILER.data), TRAILER.data.length, TRAILER.data.length), name, TRAILER.data)
  return chunks
}

/** CRC-32 (IEEE) of a small buffer. */
function crc(data: Buffer): number {
  let c = ~0
  for (const b of data) {
    c ^= b
    for (let k = 0; k < 8; k++) c = (c >>> 1) ^ (0xedb88320 & -(c & 1))
  }
  return ~c >>> 0
}
