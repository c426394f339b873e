import { createInflateRaw } from 'node:zlib'

/**
 * A look inside an uploaded ZIP (an .xlsx is one) BEFORE a library unpacks it in memory: 20 MB of
 * upload can declare, and really hold, gigabytes of XML. `readZipDirectory` reads the End Of
 * Central Directory (ZIP64 too) and every central directory header, the same way jszip (used by
 * exceljs) finds them, and refuses any layout where the two could disagree. `checkZip` then refuses
 * too many parts or too many declared bytes, and finally inflates every part in a streaming pass
 * that keeps nothing, stopping as soon as a part yields more than its header declared: a lying
 * header cannot make the later full unpacking larger than the limit.
 */
export interface ZipEntry {
  name: string
  /** 0 stored, 8 deflated (the only two that jszip reads). */
  method: number
  flags: number
  compressedSize: number
  /** Uncompressed size as declared in the central directory. */
  size: number
  localOffset: number
  /** CRC-32 of the uncompressed content, from the central directory. */
  crc32: number
}

export interface ZipLimits {
  /** Total declared (and real) uncompressed bytes of all parts. */
  maxBytes: number
  /** Parts (files and folders) in the archive. */
  maxEntries: number
}
export const ZIP_LIMITS: ZipLimits = { maxBytes: 200 * 1024 * 1024, maxEntries: 10_000 }

export type ZipProblem = 'damaged' | 'encrypted' | 'too-many' | 'too-big'
export class ZipRefusal extends Error {
  constructor(
    readonly problem: ZipProblem,
    message: string,
  ) {
    super(message)
  }
}

const SIG = { local: 0x04034b50, central: 0x02014b50, end: 0x06054b50, end64: 0x06064b50, locator64: 0x07064b50 }
const MAX16 = 0xffff
const MAX32 = 0xffffffff
const damaged = (why: string) => new ZipRefusal('damaged', why)

/** "1.2 GB", "200 MB", "512 KB" (binary units, as the limit is set). */
export function formatBytes(n: number): string {
  const [unit, div] = n >= 2 ** 30 ? ['GB', 2 ** 30] : n >= 2 ** 20 ? ['MB', 2 ** 20] : ['KB', 2 ** 10]
  const v = n / (div as number)
  return `${v >= 100 || Number.isInteger(v) ? Math.round(v) : Number(v.toFixed(1))} ${unit}`
}

function u64(buf: Buffer, at: number): number {
  if (at + 8 > buf.length) throw damaged('a ZIP64 field runs past the end of the file')
  const v = buf.readBigUInt64LE(at)
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) throw damaged('a ZIP64 size is impossibly large')
  return Number(v)
}
const sigAt = (buf: Buffer, at: number, sig: number) => at >= 0 && at + 4 <= buf.length && buf.readUInt32LE(at) === sig

/** Last occurrence of a signature, searching from the end as jszip does. */
function lastIndexOf(buf: Buffer, sig: number, before = buf.length): number {
  for (let i = Math.min(before, buf.length) - 4; i >= 0; i--) if (buf.readUInt32LE(i) === sig) return i
  return -1
}

/** The central directory: where it starts, and where the records after it must start. */
function findDirectory(buf: Buffer): { offset: number; end: number } {
  const eocd = lastIndexOf(buf, SIG.end)
  if (eocd < 0 || eocd + 22 > buf.length) throw damaged('no ZIP directory at its end (the file may be cut short)')
  let offset = buf.readUInt32LE(eocd + 16)
  let size = buf.readUInt32LE(eocd + 12)
  const isZip64 =
    [
      buf.readUInt16LE(eocd + 4),
      buf.readUInt16LE(eocd + 6),
      buf.readUInt16LE(eocd + 8),
      buf.readUInt16LE(eocd + 10),
    ].includes(MAX16) ||
    size === MAX32 ||
    offset === MAX32
  if (!isZip64) {
    if (offset + size !== eocd) throw damaged('its ZIP directory is not where the end record says')
    return { offset, end: eocd }
  }
  const locator = eocd - 20
  if (!sigAt(buf, locator, SIG.locator64) || lastIndexOf(buf, SIG.locator64) !== locator)
    throw damaged('its ZIP64 locator is missing or misplaced')
  const record = u64(buf, locator + 8)
  if (!sigAt(buf, record, SIG.end64) || record + 56 > buf.length || record + 12 + u64(buf, record + 4) !== locator)
    throw damaged('its ZIP64 end record is missing or misplaced')
  offset = u64(buf, record + 48)
  size = u64(buf, record + 40)
  if (offset + size !== record) throw damaged('its ZIP directory is not where the ZIP64 end record says')
  return { offset, end: record }
}

/**
 * Every central directory header, read like jszip reads them (from the directory's start while the
 * signature repeats), or a ZipRefusal. Stops with 'too-many' once more than `maxEntries` are seen.
 */
export function readZipDirectory(buf: Buffer, maxEntries = Infinity): ZipEntry[] {
  const dir = findDirectory(buf)
  const entries: ZipEntry[] = []
  let p = dir.offset
  while (sigAt(buf, p, SIG.central)) {
    if (entries.length >= maxEntries)
      throw new ZipRefusal('too-many', `more than ${maxEntries.toLocaleString('en')} parts`)
    if (p + 46 > buf.length) throw damaged('a ZIP directory header runs past the end of the file')
    const nameLen = buf.readUInt16LE(p + 28)
    const extraLen = buf.readUInt16LE(p + 30)
    const next = p + 46 + nameLen + extraLen + buf.readUInt16LE(p + 32)
    if (next > buf.length) throw damaged('a ZIP directory header runs past the end of the file')
    const e: ZipEntry = {
      name: buf.toString('utf8', p + 46, p + 46 + nameLen),
      flags: buf.readUInt16LE(p + 8),
      method: buf.readUInt16LE(p + 10),
      compressedSize: buf.readUInt32LE(p + 20),
      size: buf.readUInt32LE(p + 24),
      localOffset: buf.readUInt32LE(p + 42),
      crc32: buf.readUInt32LE(p + 16),
    }
    // ZIP64 extra field (id 1): 8-byte values, present only for the fields that hold 0xFFFFFFFF, in
    // this order. Walked like jszip walks extra fields (a later field of the same id wins).
    let zip64: number | null = null
    for (let x = p + 46 + nameLen, end = x + extraLen; x + 4 < end; x += 4 + buf.readUInt16LE(x + 2)) {
      if (buf.readUInt16LE(x) === 1) zip64 = x
    }
    if (zip64 !== null) {
      const stop = zip64 + 4 + buf.readUInt16LE(zip64 + 2)
      let at = zip64 + 4
      const take = () => {
        if (at + 8 > stop) throw damaged('a ZIP64 field is too short')
        const v = u64(buf, at)
        at += 8
        return v
      }
      if (e.size === MAX32) e.size = take()
      if (e.compressedSize === MAX32) e.compressedSize = take()
      if (e.localOffset === MAX32) e.localOffset = take()
    }
    entries.push(e)
    p = next
  }
  if (p !== dir.end) throw damaged('its ZIP directory does not match its end record')
  if (entries.length === 0) throw damaged('the ZIP holds no parts')
  return entries
}

/** Bytes a raw deflate stream yields, counted without keeping them; stops once past `cap`. */
function inflatedSize(data: Buffer, cap: number): Promise<number> {
  return new Promise((resolve, reject) => {
    const z = createInflateRaw({ chunkSize: 256 * 1024 })
    let n = 0
    z.on('data', (chunk: Buffer) => {
      n += chunk.length
      if (n > cap) {
        z.destroy()
        resolve(n)
      }
    })
    z.on('end', () => resolve(n))
    z.on('error', reject)
    z.end(data)
  })
}

/**
 * Refuse (ZipRefusal) a ZIP that is unreadable, encrypted, has more than `maxEntries` parts, or
 * would unpack to more than `maxBytes` by its headers or by its real content. Returns the parts.
 */
export async function checkZip(buf: Buffer, limits: Partial<ZipLimits> = {}): Promise<ZipEntry[]> {
  const { maxBytes, maxEntries } = { ...ZIP_LIMITS, ...limits }
  const entries = readZipDirectory(buf, maxEntries)
  if (entries.some((e) => e.flags & 1)) throw new ZipRefusal('encrypted', 'a part is encrypted')
  const unknown = entries.find((e) => e.method !== 0 && e.method !== 8)
  if (unknown) throw damaged(`the part ${unknown.name} uses an unknown compression (method ${unknown.method})`)
  const declared = entries.reduce((n, e) => n + e.size, 0)
  if (declared > maxBytes)
    throw new ZipRefusal(
      'too-big',
      `The workbook expands to ${formatBytes(declared)} of data; at most ${formatBytes(maxBytes)} can be read: split the file`,
    )
  for (const e of entries) {
    const at = e.localOffset
    if (!sigAt(buf, at, SIG.local) || at + 30 > buf.length)
      throw damaged(`the part ${e.name} is not where the directory says`)
    const start = at + 30 + buf.readUInt16LE(at + 26) + buf.readUInt16LE(at + 28)
    if (start + e.compressedSize > buf.length) throw damaged(`the part ${e.name} is cut short`)
    const data = buf.subarray(start, start + e.compressedSize)
    let real: number
    try {
      real = e.method === 0 ? data.length : await inflatedSize(data, e.size)
    } catch {
      throw damaged(`the part ${e.name} cannot be unpacked`)
    }
    if (real !== e.size)
      throw damaged(`the part ${e.name} ${real > e.size ? 'holds more' : 'holds less'} data than its header declares`)
  }
  return entries
}
