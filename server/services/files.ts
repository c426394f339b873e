import { and, asc, eq, isNull } from 'drizzle-orm'
import sharp from 'sharp'
import { alias } from 'drizzle-orm/mysql-core'
import { arrays, chips, fabSteps, files, measurementSessions, users, wafers, type User } from '../db/schema/index'
import type { Db } from '../db/client'
import type { StoredFile } from '../../shared/records'
import type { FileUploadInput } from '../../shared/schemas/measurements'
import type { FileStorage } from './storage'
import { writeAudit } from './audit'
import { BROWSER_IMAGES, checkContent, downsample, isImageMime, parseDataTable, sanitizeFileName } from './file-types'
import { BadRequestError, NotFoundError, fieldError } from '../errors'

/**
 * Uploaded files (SEM images, spectra, sweeps, camera images) attached to a record. The bytes go
 * to the content-addressed FileStorage unchanged; the row keeps who/when, the checked type and the
 * sanitised original name. Files are retired with a reason, never deleted.
 */
export const MAX_UPLOAD_BYTES = 25 * 1024 * 1024

const ENTITY_TABLES = { wafer: wafers, chip: chips, fab_step: fabSteps, array: arrays, session: measurementSessions } as const
const ENTITY_WORDS = { wafer: 'wafer', chip: 'chip', fab_step: 'fabrication step', array: 'array', session: 'measurement session' } as const

type Row = typeof files.$inferSelect
const uploaders = alias(users, 'uploaders')

const hasPreview = (r: Pick<Row, 'mime' | 'kind'>) => isImageMime(r.mime) || r.mime === 'text/csv'

function toStoredFile(r: Row, uploader: { id: number; name: string }): StoredFile {
  return {
    id: r.id, sha256: r.sha256, originalName: r.originalName, mime: r.mime, sizeBytes: r.sizeBytes, kind: r.kind,
    entity: r.entity, entityId: r.entityId, uploadedBy: uploader, uploadedAt: r.uploadedAt.toISOString(), hasPreview: hasPreview(r),
  }
}

async function checkEntity(db: Db, entity: FileUploadInput['entity'], id: number): Promise<void> {
  const table = ENTITY_TABLES[entity]
  const [row] = await db.select({ id: table.id }).from(table).where(eq(table.id, id))
  if (!row) throw fieldError('entityId', `No such ${ENTITY_WORDS[entity]}`)
}

export interface Upload { buffer: Buffer; originalName: string | undefined }

/** Check the content, store the bytes (once per content) and record the file with an audit row. */
export async function uploadFile(db: Db, storage: FileStorage, actor: User, input: FileUploadInput, upload: Upload | undefined): Promise<StoredFile> {
  if (!upload) throw fieldError('file', 'Choose a file to upload')
  if (upload.buffer.length > MAX_UPLOAD_BYTES) throw fieldError('file', 'The file is larger than 25 MB')
  const mime = checkContent(upload.buffer, input.kind)
  await checkEntity(db, input.entity, input.entityId)
  const { sha256, sizeBytes } = await storage.put(upload.buffer)
  const originalName = sanitizeFileName(upload.originalName)
  const id = await db.transaction(async (tx) => {
    const values = { sha256, originalName, mime, sizeBytes, kind: input.kind, entity: input.entity, entityId: input.entityId, uploadedBy: actor.id }
    const [{ id }] = await tx.insert(files).values(values).$returningId()
    const changes = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, { from: null, to: v }]))
    await writeAudit(tx, { userId: actor.id, entity: 'file', entityId: id, action: 'create', changes })
    return id
  })
  return getFile(db, id)
}

export async function getFile(db: Db, id: number): Promise<StoredFile> {
  const [r] = await db.select({ f: files, u: { id: uploaders.id, name: uploaders.name } }).from(files)
    .innerJoin(uploaders, eq(uploaders.id, files.uploadedBy)).where(eq(files.id, id))
  if (!r) throw new NotFoundError('No such file')
  return toStoredFile(r.f, r.u)
}

export async function listFiles(db: Db, entity: string, entityId: number, includeRetired = false): Promise<StoredFile[]> {
  const rows = await db.select({ f: files, u: { id: uploaders.id, name: uploaders.name } }).from(files)
    .innerJoin(uploaders, eq(uploaders.id, files.uploadedBy))
    .where(and(eq(files.entity, entity), eq(files.entityId, entityId), includeRetired ? undefined : isNull(files.retiredAt)))
    .orderBy(asc(files.uploadedAt), asc(files.id))
  return rows.map((r) => toStoredFile(r.f, r.u))
}

/** The stored bytes of a file as a stream, with its row (for download). */
export async function openFile(db: Db, storage: FileStorage, id: number) {
  const file = await getFile(db, id)
  if (!(await storage.has(file.sha256))) throw new NotFoundError('The stored content of this file is missing; restore it from the back-up.')
  return { file, stream: await storage.get(file.sha256) }
}

export type Preview =
  | { type: 'image'; mime: string; body: Buffer }
  | { type: 'table'; body: { columns: string[]; points: [number, number][]; skipped: number } }

/** Longest side of an image preview, in pixels. */
const PREVIEW_PX = 1024

/**
 * A preview: images scaled down with sharp to ≤ 1024 px and re-encoded as PNG (which also drops
 * metadata); CSV tables as points of the first two columns, at most 2000, for the client's plot.
 */
export async function previewFile(db: Db, storage: FileStorage, id: number): Promise<Preview> {
  const file = await getFile(db, id)
  if (!file.hasPreview) throw new NotFoundError('This file has no preview; download it instead.')
  const data = await storage.read(file.sha256)
  if (file.mime === 'text/csv') {
    const t = parseDataTable(data.toString('utf8'))
    return { type: 'table', body: { columns: t.columns.slice(0, 2), points: downsample(t.rows.map((r) => [r[0], r[1]])), skipped: t.skipped } }
  }
  try {
    const body = await sharp(data, { limitInputPixels: 100_000_000, pages: 1 }).rotate()
      .resize({ width: PREVIEW_PX, height: PREVIEW_PX, fit: 'inside', withoutEnlargement: true }).png().toBuffer()
    return { type: 'image', mime: 'image/png', body }
  } catch {
    if (BROWSER_IMAGES.has(file.mime)) return { type: 'image', mime: file.mime, body: data }
    throw new BadRequestError('This image could not be read to make a preview; download the original.')
  }
}

/** Retire a file (hidden from lists, bytes kept); the reason goes to the audit row. */
export async function retireFile(db: Db, actor: User, id: number, reason: string): Promise<StoredFile> {
  await db.transaction(async (tx) => {
    const [f] = await tx.select().from(files).where(eq(files.id, id)).for('update')
    if (!f) throw new NotFoundError('No such file')
    if (f.retiredAt) throw new BadRequestError('This file is already retired.')
    const now = new Date()
    await tx.update(files).set({ retiredAt: now }).where(eq(files.id, id))
    await writeAudit(tx, { userId: actor.id, entity: 'file', entityId: id, action: 'retire', changes: { retiredAt: { from: null, to: now.toISOString() } }, reason })
  })
  return getFile(db, id)
}
