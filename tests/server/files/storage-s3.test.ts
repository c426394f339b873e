import { createHash, randomBytes } from 'node:crypto'
import fs from 'node:fs/promises'
import os from 'node:os'
import path from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadEnv, loadFileStorageEnv } from '../../../server/env'
import { createFileStorage } from '../../../server/services/files/create-storage'
import { LocalDiskStorage, type FileStorage } from '../../../server/services/files/storage'
import { S3Storage } from '../../../server/services/files/storage-s3'
import { fakeS3 } from './fake-s3'

/**
 * Both FileStorage implementations held to one contract: local disk in a temp dir, and S3Storage
 * against an in-process fake S3 endpoint (fake-s3.ts: path-style PUT/GET/HEAD/DELETE in a Map, no
 * signature check). No database needed.
 */

const BUCKET = 'lab-files'
const PREFIX = 'overtone/'

async function filesUnder(root: string): Promise<string[]> {
  const out: string[] = []
  async function walk(dir: string) {
    let entries
    try {
      entries = await fs.readdir(dir, { withFileTypes: true })
    } catch {
      return
    }
    for (const e of entries) {
      const p = path.join(dir, e.name)
      if (e.isDirectory()) await walk(p)
      else out.push(path.relative(root, p).split(path.sep).join('/'))
    }
  }
  await walk(root)
  return out.sort()
}

const sha = (b: Buffer) => createHash('sha256').update(b).digest('hex')

async function streamBytes(s: NodeJS.ReadableStream): Promise<Buffer> {
  const chunks: Buffer[] = []
  for await (const c of s) chunks.push(Buffer.isBuffer(c) ? c : Buffer.from(c as string))
  return Buffer.concat(chunks)
}

const fake = fakeS3(BUCKET)
let endpoint = ''
let tmp = ''

beforeAll(async () => {
  endpoint = await fake.start()
  tmp = await fs.mkdtemp(path.join(os.tmpdir(), 'overtone-storage-'))
})

afterAll(async () => {
  await fake.stop()
  if (tmp) await fs.rm(tmp, { recursive: true, force: true })
})

interface Harness {
  /** A fresh, empty storage. */
  make(): FileStorage
  /** Keys of what is stored, relative to the storage root and including the prefix. */
  stored(): Promise<string[]>
  /** Something that changes whenever a blob is written again (PUT count; inode and mtime on disk). */
  fingerprint(): Promise<string>
  /** Makes a later rewrite visible in the fingerprint however soon it comes (dates the files on disk back to 2001). */
  backdate(): Promise<void>
  /** Requests that reached the back end (none for the disk). */
  requests(): number
  prefix: string
}

let localRoot = ''

const harnesses: [string, Harness][] = [
  [
    'LocalDiskStorage',
    {
      prefix: '',
      make() {
        localRoot = path.join(tmp, `data-${randomBytes(4).toString('hex')}`)
        const storage = createFileStorage(localRoot)
        expect(storage).toBeInstanceOf(LocalDiskStorage)
        return storage
      },
      stored: () => filesUnder(path.join(localRoot, 'uploads')),
      async fingerprint() {
        const stats = await Promise.all(
          (await filesUnder(path.join(localRoot, 'uploads'))).map((f) => fs.stat(path.join(localRoot, 'uploads', f))),
        )
        return stats.map((s) => `${s.ino}:${s.mtimeMs}`).join()
      },
      async backdate() {
        const past = new Date('2001-01-01T00:00:00Z')
        for (const f of await filesUnder(path.join(localRoot, 'uploads')))
          await fs.utimes(path.join(localRoot, 'uploads', f), past, past)
      },
      requests: () => 0,
    },
  ],
  [
    'S3Storage',
    {
      prefix: PREFIX,
      make() {
        fake.objects.clear()
        fake.seen.length = 0
        const env = loadFileStorageEnv({
          FILE_STORAGE: 's3',
          S3_ENDPOINT: endpoint,
          S3_BUCKET: BUCKET,
          S3_ACCESS_KEY_ID: 'test-key',
          S3_SECRET_ACCESS_KEY: 'test-secret',
          S3_PREFIX: PREFIX,
        })
        const storage = createFileStorage(path.join(tmp, 'unused'), env)
        expect(storage).toBeInstanceOf(S3Storage)
        return storage
      },
      stored: async () => [...fake.objects.keys()].sort(),
      fingerprint: async () => String(fake.seen.filter((r) => r.method === 'PUT').length),
      backdate: async () => {},
      requests: () => fake.seen.length,
    },
  ],
]

describe.each(harnesses)('FileStorage contract: %s', (_name, h) => {
  it('put then has/read/get give back the same bytes under <prefix>ab/cd/<sha256>', async () => {
    const storage = h.make()
    const data = randomBytes(70_000)
    const want = sha(data)
    const r = await storage.put(data)
    expect(r).toEqual({ sha256: want, sizeBytes: data.length, isNew: true })
    expect(await storage.has(want)).toBe(true)
    expect((await storage.read(want)).equals(data)).toBe(true)
    expect((await streamBytes(await storage.get(want))).equals(data)).toBe(true)
    expect(await h.stored()).toEqual([`${h.prefix}${want.slice(0, 2)}/${want.slice(2, 4)}/${want}`])
  })

  it('stores the same bytes once: the second put says isNew false', async () => {
    const storage = h.make()
    const data = Buffer.from('wavelength_nm,counts\n775,812.5\n')
    const first = await storage.put(data)
    await h.backdate()
    const after = await h.fingerprint()
    const second = await storage.put(Buffer.from(data))
    expect(first.isNew).toBe(true)
    expect(second).toEqual({ sha256: first.sha256, sizeBytes: data.length, isNew: false })
    expect(await h.fingerprint()).toBe(after)
    expect(await h.stored()).toHaveLength(1)
    if (storage instanceof S3Storage) expect(fake.seen.filter((r) => r.method === 'PUT')).toHaveLength(1)
    // Empty content is content too.
    const empty = await storage.put(Buffer.alloc(0))
    expect(empty).toEqual({ sha256: sha(Buffer.alloc(0)), sizeBytes: 0, isNew: true })
    expect((await storage.read(empty.sha256)).length).toBe(0)
  })

  it('a hash that is not stored: has false, get and read reject with ENOENT', async () => {
    const storage = h.make()
    await storage.put(Buffer.from('something else'))
    const missing = sha(Buffer.from('never uploaded'))
    expect(await storage.has(missing)).toBe(false)
    await expect(storage.get(missing)).rejects.toMatchObject({ code: 'ENOENT' })
    await expect(storage.read(missing)).rejects.toMatchObject({ code: 'ENOENT' })
  })

  it('remove deletes one blob and leaves the others; removing an absent blob is no error', async () => {
    const storage = h.make()
    const keep = await storage.put(Buffer.from('kept: a spectrum someone uploaded\n'))
    const goneBytes = randomBytes(5_000)
    const gone = await storage.put(goneBytes)
    expect(await h.stored()).toHaveLength(2)
    await storage.remove(gone.sha256)
    expect(await storage.has(gone.sha256)).toBe(false)
    await expect(storage.get(gone.sha256)).rejects.toMatchObject({ code: 'ENOENT' })
    await expect(storage.read(gone.sha256)).rejects.toMatchObject({ code: 'ENOENT' })
    expect(await h.stored()).toEqual([
      `${h.prefix}${keep.sha256.slice(0, 2)}/${keep.sha256.slice(2, 4)}/${keep.sha256}`,
    ])
    expect((await storage.read(keep.sha256)).toString()).toBe('kept: a spectrum someone uploaded\n')
    await expect(storage.remove(gone.sha256)).resolves.toBeUndefined()
    await expect(storage.remove(sha(Buffer.from('never stored')))).resolves.toBeUndefined()
    // The same bytes can be stored again afterwards, as new.
    expect(await storage.put(goneBytes)).toEqual({ sha256: gone.sha256, sizeBytes: goneBytes.length, isNew: true })
    expect((await storage.read(gone.sha256)).equals(goneBytes)).toBe(true)
  })

  it('refuses anything that is not 64 lower-case hex digits before touching the back end', async () => {
    const storage = h.make()
    const before = h.requests()
    const good = sha(Buffer.from('x'))
    for (const bad of [
      '../../etc/passwd',
      `../${good.slice(3)}`,
      good.toUpperCase(),
      good.slice(1),
      `${good}/`,
      `${good}\0`,
      '',
    ]) {
      await expect(storage.has(bad)).rejects.toThrow(/not a sha256/)
      await expect(storage.get(bad)).rejects.toThrow(/not a sha256/)
      await expect(storage.read(bad)).rejects.toThrow(/not a sha256/)
      await expect(storage.remove(bad)).rejects.toThrow(/not a sha256/)
    }
    expect(h.requests()).toBe(before)
    expect(await h.stored()).toEqual([])
  })
})

describe('S3Storage on the wire', () => {
  it('signs with SigV4, sends path-style PUTs with octet-stream, the sha256 metadata and the raw bytes', async () => {
    const [, h] = harnesses[1]
    const storage = h.make()
    const data = Buffer.from('polar fit input\n')
    const { sha256 } = await storage.put(data)
    expect(fake.seen.map((r) => r.method)).toEqual(['HEAD', 'PUT'])
    for (const r of fake.seen) {
      expect(r.authorization.startsWith('AWS4-HMAC-SHA256')).toBe(true)
      expect(r.authorization).toContain('/us-east-1/s3/aws4_request')
      expect(r.path).toBe(`/${BUCKET}/${PREFIX}${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}`)
    }
    const obj = fake.objects.get(`${PREFIX}${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}`)!
    expect(obj.body.equals(data)).toBe(true)
    expect(obj.meta['content-type']).toBe('application/octet-stream')
    expect(obj.meta['x-amz-meta-sha256']).toBe(sha256)
    fake.seen.length = 0
    await storage.remove(sha256)
    expect(fake.seen.map((r) => [r.method, r.path])).toEqual([
      ['DELETE', `/${BUCKET}/${PREFIX}${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}`],
    ])
    expect(fake.seen[0].authorization.startsWith('AWS4-HMAC-SHA256')).toBe(true)
    expect(fake.objects.size).toBe(0)
  })

  it('makes no request until first used', async () => {
    fake.seen.length = 0
    createFileStorage(
      tmp,
      loadFileStorageEnv({
        FILE_STORAGE: 's3',
        S3_ENDPOINT: endpoint,
        S3_BUCKET: BUCKET,
        S3_ACCESS_KEY_ID: 'k',
        S3_SECRET_ACCESS_KEY: 's',
      }),
    )
    // A request would start in a later turn of the event loop at the earliest: let those pass.
    for (let i = 0; i < 10; i++) await new Promise((r) => setImmediate(r))
    expect(fake.seen).toHaveLength(0)
  })

  it('a missing bucket is an error, not a missing blob', async () => {
    const storage = new S3Storage({
      endpoint,
      region: 'us-east-1',
      bucket: 'no-such-bucket',
      accessKeyId: 'k',
      secretAccessKey: 's',
    })
    await expect(storage.get(sha(Buffer.from('x')))).rejects.toMatchObject({ name: 'NoSuchBucket' })
  })
})

describe('FILE_STORAGE configuration', () => {
  const base = { DATABASE_URL: 'mysql://u:p@127.0.0.1:3306/db', SESSION_SECRET: 'test-secret-test-secret' }

  it('defaults to local disk', () => {
    const env = loadEnv(base)
    expect(env.FILE_STORAGE).toBe('local')
    expect(env.S3_REGION).toBe('us-east-1')
    expect(env.S3_PREFIX).toBe('')
    expect(createFileStorage(tmp, env)).toBeInstanceOf(LocalDiskStorage)
  })

  it('FILE_STORAGE=s3 without bucket or keys fails loadEnv naming what is missing', () => {
    expect(() => loadEnv({ ...base, FILE_STORAGE: 's3' })).toThrow(/S3_BUCKET/)
    expect(() => loadEnv({ ...base, FILE_STORAGE: 's3', S3_BUCKET: 'b' })).toThrow(
      /S3_ACCESS_KEY_ID[\s\S]*S3_SECRET_ACCESS_KEY/,
    )
    expect(() => loadEnv({ ...base, FILE_STORAGE: 's3', S3_ACCESS_KEY_ID: 'k', S3_SECRET_ACCESS_KEY: 's' })).toThrow(
      /S3_BUCKET is required when FILE_STORAGE=s3/,
    )
    expect(() => loadFileStorageEnv({ FILE_STORAGE: 's3' })).toThrow(/S3_BUCKET/)
    expect(() => loadEnv({ ...base, FILE_STORAGE: 'ftp' })).toThrow(/FILE_STORAGE/)
    expect(() =>
      loadEnv({
        ...base,
        FILE_STORAGE: 's3',
        S3_BUCKET: 'b',
        S3_ACCESS_KEY_ID: 'k',
        S3_SECRET_ACCESS_KEY: 's',
        S3_ENDPOINT: 'not a url',
      }),
    ).toThrow(/S3_ENDPOINT/)
  })

  it('FILE_STORAGE=s3 with bucket and keys loads and chooses S3Storage', () => {
    const env = loadEnv({
      ...base,
      FILE_STORAGE: 's3',
      S3_ENDPOINT: 'http://127.0.0.1:9000',
      S3_BUCKET: 'b',
      S3_ACCESS_KEY_ID: 'k',
      S3_SECRET_ACCESS_KEY: 's',
      S3_PREFIX: 'p/',
    })
    const storage = createFileStorage(tmp, env)
    expect(storage).toBeInstanceOf(S3Storage)
    expect((storage as S3Storage).keyOf('a'.repeat(64))).toBe(`p/aa/aa/${'a'.repeat(64)}`)
  })
})
