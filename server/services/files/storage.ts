import { createHash, randomBytes } from 'node:crypto'
import { constants as fsConstants, createReadStream, type ReadStream } from 'node:fs'
import fs from 'node:fs/promises'
import path from 'node:path'
import { AppError } from '../../errors'

/**
 * Content-addressed blob storage for uploaded files and finished Excel exports. A blob is named by
 * the SHA-256 of its bytes, so the same content uploaded twice is stored once and a stored blob
 * never changes (originals are kept unchanged with their checksum: docs/records.md §4).
 * Only expired export workbooks are ever removed (excel-export.ts, never one a `files` row names).
 *
 * Only this interface is used by the services. `LocalDiskStorage` keeps blobs under
 * `${DATA_DIR}/uploads/ab/cd/<sha256>`; `S3Storage` (storage-s3.ts) keeps them in an
 * S3-compatible bucket under `${S3_PREFIX}ab/cd/<sha256>`. `FILE_STORAGE` chooses one in
 * `createFileStorage`. Both refuse a "hash" that is not 64 lower-case hex digits before touching
 * anything, and `tests/server/files/storage-s3.test.ts` holds both to the same contract.
 */
export interface FileStorage {
  /** Store bytes; answers their hash and whether they were new. */
  put(data: Buffer): Promise<{ sha256: string; sizeBytes: number; isNew: boolean }>
  /** A stream of the stored bytes (throws when absent). */
  get(sha256: string): Promise<NodeJS.ReadableStream>
  /** The stored bytes in memory (for previews of small files). */
  read(sha256: string): Promise<Buffer>
  has(sha256: string): Promise<boolean>
  /**
   * Delete a blob (nothing happens when it is absent). Blobs are shared by identical content: the
   * caller must know that nothing else refers to it (a `files` row, an export job).
   */
  remove(sha256: string): Promise<void>
  /** Throws when nothing can be stored right now (read-only, full); for /api/health. */
  checkWritable?(): Promise<void>
}

const FULL = new Set(['ENOSPC', 'EDQUOT', 'EFBIG'])
const READ_ONLY = new Set(['EROFS', 'EACCES', 'EPERM'])

/**
 * A write that failed because of the storage itself, as the error to answer: 507 when it is full,
 * 503 when it is read-only or not writable; anything else is passed on unchanged.
 */
export function storageFailure(err: unknown): Error {
  const code = (err as NodeJS.ErrnoException | undefined)?.code ?? ''
  if (FULL.has(code))
    return new AppError(
      507,
      'storage_full',
      'The file storage is full, so nothing can be saved there right now. Ask an administrator to free space; nothing was stored.',
    )
  if (READ_ONLY.has(code))
    return new AppError(
      503,
      'storage_read_only',
      'The file storage cannot be written (it is read-only or not writable), so nothing can be saved there right now. Ask an administrator; nothing was stored.',
    )
  return err as Error
}

const SHA = /^[0-9a-f]{64}$/

export function sha256Of(data: Buffer): string {
  return createHash('sha256').update(data).digest('hex')
}

/**
 * The hash itself when it is 64 lower-case hex digits; throws otherwise (never make a key or path from anything else).
 */
export function checkedSha256(sha256: string): string {
  if (typeof sha256 !== 'string' || !SHA.test(sha256)) throw new Error(`not a sha256: ${String(sha256).slice(0, 80)}`)
  return sha256
}

/** The error `get` and `read` throw for a blob that is not stored (code ENOENT, as from the disk). */
export function blobMissing(sha256: string, where: string): Error {
  return Object.assign(new Error(`no stored blob ${sha256} in ${where}`), { code: 'ENOENT' })
}

export class LocalDiskStorage implements FileStorage {
  constructor(readonly root: string) {}

  /** The only place a path is made, and only from a checked hex hash (never from a user's name). */
  private pathOf(sha256: string): string {
    checkedSha256(sha256)
    return path.join(this.root, sha256.slice(0, 2), sha256.slice(2, 4), sha256)
  }

  async put(data: Buffer) {
    const sha256 = sha256Of(data)
    const target = this.pathOf(sha256)
    if (await this.has(sha256)) return { sha256, sizeBytes: data.length, isNew: false }
    // Write beside the target, then rename: readers never see a half-written blob. A write that
    // fails (disk full, read-only) leaves no partial .tmp file behind.
    const tmp = `${target}.${randomBytes(6).toString('hex')}.tmp`
    try {
      await fs.mkdir(path.dirname(target), { recursive: true })
      await fs.writeFile(tmp, data, { mode: 0o640 })
      await fs.rename(tmp, target)
    } catch (err) {
      await fs.rm(tmp, { force: true }).catch(() => {})
      throw storageFailure(await this.why(err))
    }
    return { sha256, sizeBytes: data.length, isNew: true }
  }

  /** A recursive mkdir on a read-only file system fails with ENOENT: ask the root itself why. */
  private async why(err: unknown): Promise<unknown> {
    const code = (err as NodeJS.ErrnoException).code ?? ''
    if (FULL.has(code) || READ_ONLY.has(code)) return err
    try {
      await fs.access(this.root, fsConstants.W_OK)
    } catch (e) {
      if (READ_ONLY.has((e as NodeJS.ErrnoException).code ?? '')) return e
    }
    return err
  }

  async checkWritable(): Promise<void> {
    await fs.mkdir(this.root, { recursive: true })
    const probe = path.join(this.root, `.health-${randomBytes(6).toString('hex')}.tmp`)
    try {
      await fs.writeFile(probe, 'ok')
    } finally {
      await fs.rm(probe, { force: true }).catch(() => {})
    }
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
    const p = this.pathOf(sha256)
    try {
      await fs.access(p)
      return true
    } catch (err) {
      const code = (err as NodeJS.ErrnoException).code
      if (code === 'ENOENT' || code === 'ENOTDIR') return false
      throw err
    }
  }

  async remove(sha256: string): Promise<void> {
    await fs.rm(this.pathOf(sha256), { force: true })
  }
}
