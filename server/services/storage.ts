import { createHash, randomBytes } from 'node:crypto'
import { createReadStream, type ReadStream } from 'node:fs'
import fs from 'node:fs/promises'
import path from 'node:path'

/**
 * Content-addressed blob storage for uploaded files. A blob is named by the SHA-256 of its bytes,
 * so the same content uploaded twice is stored once and a stored blob never changes (originals are
 * kept unchanged with their checksum: FACTS.md §3.2 behaviour 7).
 *
 * Only this interface is used by the services. `LocalDiskStorage` keeps blobs under
 * `${DATA_DIR}/uploads/ab/cd/<sha256>`; an S3-compatible implementation can be added later by
 * implementing the same three methods (put = PutObject with the hash as key after hashing in
 * memory, get = GetObject body stream, has = HeadObject) and choosing it in `createFileStorage`.
 */
export interface FileStorage {
  /** Store bytes; answers their hash and whether they were new. */
  put(data: Buffer): Promise<{ sha256: string; sizeBytes: number; isNew: boolean }>
  /** A stream of the stored bytes (throws when absent). */
  get(sha256: string): Promise<NodeJS.ReadableStream>
  /** The stored bytes in memory (for previews of small files). */
  read(sha256: string): Promise<Buffer>
  has(sha256: string): Promise<boolean>
}

const SHA = /^[0-9a-f]{64}$/

export function sha256Of(data: Buffer): string {
  return createHash('sha256').update(data).digest('hex')
}

export class LocalDiskStorage implements FileStorage {
  constructor(readonly root: string) {}

  /** The only place a path is made, and only from a checked hex hash (never from a user's name). */
  private pathOf(sha256: string): string {
    if (!SHA.test(sha256)) throw new Error(`not a sha256: ${sha256}`)
    return path.join(this.root, sha256.slice(0, 2), sha256.slice(2, 4), sha256)
  }

  async put(data: Buffer) {
    const sha256 = sha256Of(data)
    const target = this.pathOf(sha256)
    if (await this.has(sha256)) return { sha256, sizeBytes: data.length, isNew: false }
    await fs.mkdir(path.dirname(target), { recursive: true })
    // Write beside the target, then rename: readers never see a half-written blob.
    const tmp = `${target}.${randomBytes(6).toString('hex')}.tmp`
    await fs.writeFile(tmp, data, { mode: 0o640 })
    await fs.rename(tmp, target)
    return { sha256, sizeBytes: data.length, isNew: true }
  }

  async get(sha256: string): Promise<ReadStream> {
    const p = this.pathOf(sha256)
    await fs.access(p)
    return createReadStream(p)
  }

  async read(sha256: string): Promise<Buffer> {
    return fs.readFile(this.pathOf(sha256))
  }

  async has(sha256: string): Promise<boolean> {
    try { await fs.access(this.pathOf(sha256)); return true } catch { return false }
  }
}

/** The storage of this server: local disk under `${dataDir}/uploads`. */
export function createFileStorage(dataDir: string): FileStorage {
  return new LocalDiskStorage(path.resolve(dataDir, 'uploads'))
}
