import path from 'node:path'
import type { FileStorageEnv } from '../../env'
import { LocalDiskStorage, type FileStorage } from './storage'
import { S3Storage } from './storage-s3'

/**
 * The storage of this server: local disk under `${dataDir}/uploads` (the default, and always
 * when `env` is left out), or an S3-compatible bucket when `env.FILE_STORAGE` is 's3'. Makes no
 * network call: the S3 client is created on first use.
 */
export function createFileStorage(dataDir: string, env?: FileStorageEnv): FileStorage {
  if (env?.FILE_STORAGE === 's3') {
    return new S3Storage({
      endpoint: env.S3_ENDPOINT,
      region: env.S3_REGION,
      bucket: env.S3_BUCKET ?? '',
      accessKeyId: env.S3_ACCESS_KEY_ID ?? '',
      secretAccessKey: env.S3_SECRET_ACCESS_KEY ?? '',
      prefix: env.S3_PREFIX,
    })
  }
  return new LocalDiskStorage(path.resolve(dataDir, 'uploads'))
}
