import { Readable } from 'node:stream'
import type { S3Client } from '@aws-sdk/client-s3'
import { blobMissing, checkedSha256, sha256Of, type FileStorage } from './storage'

type Sdk = typeof import('@aws-sdk/client-s3')

export interface S3StorageOptions {
  /** S3-compatible endpoint URL (MinIO, Ceph RGW, Garage, …); unset: AWS S3 of `region`. */
  endpoint?: string
  region: string
  bucket: string
  accessKeyId: string
  secretAccessKey: string
  /** Put before every key, e.g. "overtone/"; '' for none. */
  prefix?: string
}

/**
 * Content-addressed blobs in an S3-compatible bucket, under `${prefix}ab/cd/<sha256>` (the same
 * layout as the local disk). put hashes in memory, asks HeadObject first and only then sends
 * PutObject, so the same bytes are stored once; a stored object is never overwritten. remove sends
 * DeleteObject.
 *
 * The SDK is loaded and the client made on first use, so choosing this storage costs no start-up
 * time and no network call. Path-style addressing (`/<bucket>/<key>`) because most S3-compatible
 * stores need it; checksums only where an operation requires them, because several of those
 * stores refuse the SDK's newer default checksum headers.
 */
export class S3Storage implements FileStorage {
  readonly bucket: string
  readonly prefix: string
  private ready?: Promise<{ sdk: Sdk; client: S3Client }>

  constructor(private readonly options: S3StorageOptions) {
    for (const name of ['bucket', 'accessKeyId', 'secretAccessKey', 'region'] as const) {
      if (!options[name]) throw new Error(`S3Storage: ${name} is required`)
    }
    this.bucket = options.bucket
    this.prefix = options.prefix ?? ''
  }

  private s3(): Promise<{ sdk: Sdk; client: S3Client }> {
    this.ready ??= import('@aws-sdk/client-s3').then((sdk) => ({
      sdk,
      client: new sdk.S3Client({
        endpoint: this.options.endpoint,
        region: this.options.region,
        credentials: { accessKeyId: this.options.accessKeyId, secretAccessKey: this.options.secretAccessKey },
        forcePathStyle: true,
        requestChecksumCalculation: 'WHEN_REQUIRED',
        responseChecksumValidation: 'WHEN_REQUIRED',
        requestHandler: { connectionTimeout: 5_000, socketTimeout: 60_000 },
      }),
    }))
    return this.ready
  }

  /** The only place a key is made, and only from a checked hex hash. */
  keyOf(sha256: string): string {
    checkedSha256(sha256)
    return `${this.prefix}${sha256.slice(0, 2)}/${sha256.slice(2, 4)}/${sha256}`
  }

  async put(data: Buffer) {
    const sha256 = sha256Of(data)
    const Key = this.keyOf(sha256)
    if (await this.has(sha256)) return { sha256, sizeBytes: data.length, isNew: false }
    const { sdk, client } = await this.s3()
    await client.send(
      new sdk.PutObjectCommand({
        Bucket: this.bucket,
        Key,
        Body: data,
        ContentLength: data.length,
        ContentType: 'application/octet-stream',
        Metadata: { sha256 },
      }),
    )
    return { sha256, sizeBytes: data.length, isNew: true }
  }

  async get(sha256: string): Promise<Readable> {
    const Key = this.keyOf(sha256)
    const { sdk, client } = await this.s3()
    let body: unknown
    try {
      body = (await client.send(new sdk.GetObjectCommand({ Bucket: this.bucket, Key }))).Body
    } catch (err) {
      if (isNotFound(err)) throw blobMissing(sha256, this.where())
      throw err
    }
    if (!(body instanceof Readable)) throw new Error(`S3 answered GetObject for ${Key} without a readable body`)
    return body
  }

  async read(sha256: string): Promise<Buffer> {
    const body = await this.get(sha256)
    const chunks: Buffer[] = []
    for await (const chunk of body) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(chunk))
    return Buffer.concat(chunks)
  }

  async has(sha256: string): Promise<boolean> {
    const Key = this.keyOf(sha256)
    const { sdk, client } = await this.s3()
    try {
      await client.send(new sdk.HeadObjectCommand({ Bucket: this.bucket, Key }))
      return true
    } catch (err) {
      if (isNotFound(err)) return false
      throw err
    }
  }

  async remove(sha256: string): Promise<void> {
    const Key = this.keyOf(sha256)
    const { sdk, client } = await this.s3()
    try {
      await client.send(new sdk.DeleteObjectCommand({ Bucket: this.bucket, Key }))
    } catch (err) {
      // S3 answers 204 for a missing key; some compatible stores answer 404 NoSuchKey.
      if (!isNotFound(err)) throw err
    }
  }

  private where(): string {
    return `s3 bucket ${this.bucket}${this.prefix ? ` under ${this.prefix}` : ''}`
  }
}

/**
 * A missing object: HeadObject answers a bare 404 (the SDK names it NotFound), GetObject answers
 * NoSuchKey. A missing bucket is not a missing blob (GetObject says NoSuchBucket: rethrown).
 */
function isNotFound(err: unknown): boolean {
  const e = err as { name?: string; Code?: string; $metadata?: { httpStatusCode?: number } } | null
  if (e?.name === 'NoSuchBucket' || e?.Code === 'NoSuchBucket') return false
  return (
    e?.name === 'NotFound' || e?.name === 'NoSuchKey' || e?.Code === 'NoSuchKey' || e?.$metadata?.httpStatusCode === 404
  )
}
