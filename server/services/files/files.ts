import { and, asc, eq, isNull } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import { arrays, chips, fabSteps, files, measurementSessions, users, wafers, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { StoredFile } from '../../../shared/records'
import type { FileUploadInput } from '../../../shared/schemas/measurements'
import type { FileStorage } from './storage'
import { writeAudit } from '../audit/audit'
import { checkContent, downsample, isImageMime, readDataTable, sanitizeFileName } from './file-types'
import { AppError, BadRequestError, ForbiddenError, NotFoundError, fieldError } from '../../errors'
import { defineAbilityFor, fileSubject } from '../../../shared/abilities'

/**
 * Uploaded files (SEM images, spectra, sweeps, camera images) attached to a record. The bytes go
 * to the content-addressed FileStorage unchanged; the row keeps who/when, the checked type and the
 * sanitised original name. Files are retired with a reason, never deleted.
 */
export const MAX_UPLOAD_BYTES = 25 * 1024 * 1024

const ENTITY_TABLES = {
  wafer: wafers,
  chip: chips,
  fab_step: fabSteps,
  array: arrays,
  session: measurementSessions,
} as const
const ENTITY_WORDS = {
  wafer: 'wafer',
  chip: 'chip',
  fab_step: 'fabrication step',
  array: 'array',
  session: 'measurement session',
} as const

type Row = typeof files.$inferSelect
const uploaders = alias(users, 'uploaders')

const hasPreview = (r: Pick<Row, 'mime' | 'kind'>) => isImageMime(r.mime) || r.mime === 'text/csv'

function toStoredFile(r: Row, uploader: { id: number; name: string }): StoredFile {
  return {
    id: r.id,
    sha256: r.sha256,
    originalName: r.originalName,
    mime: r.mime,
    sizeBytes: r.sizeBytes,
    kind: r.kind,
    entity: r.entity,
    entityId: r.entityId,
    uploadedBy: uploader,
    uploadedAt: r.uploadedAt.toISOString(),
    hasPreview: hasPreview(r),
  }
}

async function checkEntity(db: Db, entity: FileUploadInput['entity'], id: number): Promise<void> {
  const table = ENTITY_TABLES[entity]
  const [row] = await db.select({ id: table.id }).from(table).where(eq(table.id, id))
  if (!row) throw fieldError('entityId', `No such ${ENTITY_WORDS[entity]}`)
}

export interface Upload {
  buffer: Buffer
  originalName: string | undefined
}

/** Check the content, store the bytes (once per content) and record the file with an audit row. */
export async function uploadFile(
  db: Db,
  storage: FileStorage,
  actor: User,
  input: FileUploadInput,
  upload: Upload | undefined,
): Promise<StoredFile> {
  if (!upload) throw fieldError('file', 'Choose a file to upload')
  if (upload.buffer.length > MAX_UPLOAD_BYTES) throw fieldError('file', 'The file is larger than 25 MB')
  const mime = checkContent(upload.buffer, input.kind)
  if (isImageMime(mime)) await checkImage(upload.buffer)
  await checkEntity(db, input.entity, input.entityId)
  const { sha256, sizeBytes } = await storage.put(upload.buffer)
  const originalName = sanitizeFileName(upload.originalName)
  const id = await db.transaction(async (tx) => {
    const values = {
      sha256,
      originalName,
      mime,
      sizeBytes,
      kind: input.kind,
      entity: input.entity,
      entityId: input.entityId,
      uploadedBy: actor.id,
    }
    const [{ id }] = await tx.insert(files).values(values).$returningId()
    const changes = Object.fromEntries(Object.entries(values).map(([k, v]) => [k, { from: null, to: v }]))
    await writeAudit(tx, { userId: actor.id, entity: 'file', entityId: id, action: 'create', changes })
    return id
  })
  return getFile(db, id)
}

export async function getFile(db: Db, id: number): Promise<StoredFile> {
  const [r] = await db
    .select({ f: files, u: { id: uploaders.id, name: uploaders.name } })
    .from(files)
    .innerJoin(uploaders, eq(uploaders.id, files.uploadedBy))
    .where(eq(files.id, id))
  if (!r) throw new NotFoundError('No such file')
  return toStoredFile(r.f, r.u)
}

export async function listFiles(
  db: Db,
  entity: string,
  entityId: number,
  includeRetired = false,
): Promise<StoredFile[]> {
  const rows = await db
    .select({ f: files, u: { id: uploaders.id, name: uploaders.name } })
    .from(files)
    .innerJoin(uploaders, eq(uploaders.id, files.uploadedBy))
    .where(
      and(eq(files.entity, entity), eq(files.entityId, entityId), includeRetired ? undefined : isNull(files.retiredAt)),
    )
    .orderBy(asc(files.uploadedAt), asc(files.id))
  return rows.map((r) => toStoredFile(r.f, r.u))
}

/** The stored bytes of a file as a stream, with its row (for download). */
export async function openFile(db: Db, storage: FileStorage, id: number) {
  const file = await getFile(db, id)
  if (!(await storage.has(file.sha256)))
    throw new NotFoundError('The stored content of this file is missing; restore it from the back-up.')
  return { file, stream: await storage.get(file.sha256) }
}

class UnprocessableError extends AppError {
  constructor(message: string) {
    super(422, 'unprocessable', message)
  }
}

export type Preview =
  | { type: 'image'; mime: string; body: Buffer }
  | { type: 'table'; body: { columns: string[]; points: [number, number][]; skipped: number } }

/** Longest side of an image preview, in pixels. */
export const PREVIEW_PX = 1600
/** Largest image accepted, in pixels (width × height): decoding one needs memory in proportion. */
export const MAX_IMAGE_PIXELS = 100_000_000

/** sharp (libvips) is loaded on first use only: most requests never touch an image. */
async function loadSharp() {
  return (await import('sharp')).default
}

/**
 * Decode an uploaded image, not just its magic number: its header must give a size of at most
 * MAX_IMAGE_PIXELS, and the whole first page must decode (a cut-off or corrupt file is refused).
 */
async function checkImage(buffer: Buffer): Promise<void> {
  const sharp = await loadSharp()
  const unreadable =
    'The file could not be read as a whole image (it may be cut off or damaged); upload the original file again'
  let meta: { width?: number; height?: number }
  try {
    meta = await sharp(buffer, { limitInputPixels: false }).metadata()
  } catch {
    throw fieldError('file', unreadable)
  }
  const { width = 0, height = 0 } = meta
  if (!width || !height) throw fieldError('file', unreadable)
  if (width * height > MAX_IMAGE_PIXELS) {
    throw fieldError(
      'file',
      `The image is ${width} × ${height} pixels (${Math.round((width * height) / 1e6)} megapixels); images up to ${MAX_IMAGE_PIXELS / 1e6} megapixels are accepted: scale it down or crop it first`,
    )
  }
  try {
    // Decoding to a small thumbnail reads every pixel row; 'truncated' refuses a file that ends early.
    await sharp(buffer, { limitInputPixels: MAX_IMAGE_PIXELS, pages: 1, failOn: 'truncated' })
      .resize(64, 64, { fit: 'inside', withoutEnlargement: true })
      .raw()
      .toBuffer()
  } catch {
    throw fieldError('file', unreadable)
  }
}

/**
 * A preview: images scaled down with sharp to ≤ PREVIEW_PX on the longest side and re-encoded as PNG
 * (which also drops metadata), never the original bytes; CSV tables as points of the first two
 * columns, at most 2000, for the client's plot.
 */
export async function previewFile(db: Db, storage: FileStorage, id: number): Promise<Preview> {
  const file = await getFile(db, id)
  if (!file.hasPreview) throw new NotFoundError('This file has no preview; download it instead.')
  const data = await storage.read(file.sha256)
  if (file.mime === 'text/csv') {
    const t = readDataTable(data.toString('utf8'))
    const points = (t?.rows ?? [])
      .filter((r) => Number.isFinite(r[0]) && Number.isFinite(r[1]))
      .map((r): [number, number] => [r[0], r[1]])
    return {
      type: 'table',
      body: { columns: t?.columns.slice(0, 2) ?? [], points: downsample(points), skipped: t?.skipped.length ?? 0 },
    }
  }
  const sharp = await loadSharp()
  try {
    const body = await sharp(data, { limitInputPixels: MAX_IMAGE_PIXELS, pages: 1 })
      .rotate()
      .resize({ width: PREVIEW_PX, height: PREVIEW_PX, fit: 'inside', withoutEnlargement: true })
      .png()
      .toBuffer()
    return { type: 'image', mime: 'image/png', body }
  } catch {
    // Never the original instead: it may be huge (an image stored before uploads were decoded).
    throw new UnprocessableError(
      `This image has no preview: it could not be read, or it is over ${MAX_IMAGE_PIXELS / 1e6} megapixels; download the original.`,
    )
  }
}

/**
 * Retire a file (hidden from lists, bytes kept): its uploader, a group lead or an administrator; the reason goes to the
 * audit row.
 */
export async function retireFile(db: Db, actor: User, id: number, reason: string): Promise<StoredFile> {
  await db.transaction(async (tx) => {
    const [f] = await tx.select().from(files).where(eq(files.id, id)).for('update')
    if (!f) throw new NotFoundError('No such file')
    if (!defineAbilityFor(actor).can('retire', fileSubject({ uploadedBy: { id: f.uploadedBy } }))) {
      throw new ForbiddenError(
        'Only the person who uploaded this file, a group lead or an administrator may retire it.',
      )
    }
    if (f.retiredAt) throw new BadRequestError('This file is already retired.')
    const now = new Date()
    await tx.update(files).set({ retiredAt: now }).where(eq(files.id, id))
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'file',
      entityId: id,
      action: 'retire',
      changes: { retiredAt: { from: null, to: now.toISOString() } },
      reason,
    })
  })
  return getFile(db, id)
}
