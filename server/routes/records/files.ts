import { Router, type Request, type Response } from 'express'
import multer from 'multer'
import { idParamSchema } from '../../../shared/schemas/auth'
import { fileListQuerySchema, fileUploadSchema, retireSchema } from '../../../shared/schemas/measurements'
import type { AppContext } from '../../context'
import { parse } from '../../middleware/validate'
import { currentUser, requireAbility } from '../../auth/guards'
import { BadRequestError, fieldError } from '../../errors'
import { createFileStorage } from '../../services/files/create-storage'
import {
  MAX_UPLOAD_BYTES,
  getFile,
  listFiles,
  openFile,
  previewFile,
  retireFile,
  uploadFile,
} from '../../services/files/files'

// defParamCharset: a part's file name without an explicit charset is read as UTF-8 (what browsers
// send), not busboy's default latin1, which stored `µm_ä` as `Âµm_Ã¤`.
const receive = multer({
  storage: multer.memoryStorage(),
  defParamCharset: 'utf8',
  limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10, fieldSize: 1024 },
}).single('file')

/** Run multer; its limit errors become field-level 400s on `file`. */
function receiveUpload(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) =>
    receive(req, res, (err: unknown) => {
      if (!err) return resolve()
      const code = (err as { code?: string }).code
      if (code === 'LIMIT_FILE_SIZE') return reject(fieldError('file', 'The file is larger than 25 MB'))
      if (code === 'LIMIT_UNEXPECTED_FILE' || code === 'LIMIT_FILE_COUNT')
        return reject(fieldError('file', 'Send one file, in the form field "file"'))
      reject(new BadRequestError(`The upload could not be read: ${(err as Error).message}`))
    }),
  )
}

/** Headers that keep a stored file from being run as a page by the browser. */
function lockDown(res: Response) {
  res.set({
    'X-Content-Type-Options': 'nosniff',
    'Content-Security-Policy': "default-src 'none'; sandbox",
    'Cache-Control': 'private, max-age=3600',
  })
}

/** /api/files: uploads checked by content, content-addressed storage, downloads and previews. */
export function fileRoutes(ctx: AppContext): Router {
  const r = Router()
  const storage = createFileStorage(ctx.env.DATA_DIR, ctx.env)
  r.get('/files', requireAbility('read', 'File'), async (req, res) => {
    const q = parse(fileListQuerySchema, req.query)
    res.json(await listFiles(ctx.db, q.entity, q.entityId, q.includeRetired))
  })
  r.post('/files', requireAbility('create', 'File'), async (req, res) => {
    await receiveUpload(req, res)
    const input = parse(fileUploadSchema, req.body ?? {})
    const upload = req.file ? { buffer: req.file.buffer, originalName: req.file.originalname } : undefined
    res.status(201).json(await uploadFile(ctx.db, storage, currentUser(req), input, upload))
  })
  r.get('/files/:id', requireAbility('read', 'File'), async (req, res) => {
    res.json(await getFile(ctx.db, parse(idParamSchema, req.params).id))
  })
  r.get('/files/:id/download', requireAbility('read', 'File'), async (req, res) => {
    const { file, stream } = await openFile(ctx.db, storage, parse(idParamSchema, req.params).id)
    res.attachment(file.originalName)
    lockDown(res)
    res.set({ 'Content-Type': file.mime, 'Content-Length': String(file.sizeBytes) })
    stream.pipe(res)
  })
  r.get('/files/:id/preview', requireAbility('read', 'File'), async (req, res) => {
    const preview = await previewFile(ctx.db, storage, parse(idParamSchema, req.params).id)
    if (preview.type === 'table') return void res.json(preview.body)
    lockDown(res)
    res.set({ 'Content-Type': preview.mime, 'Content-Disposition': 'inline' }).send(preview.body)
  })
  // Retiring: the file's uploader, a group lead or an administrator (the service checks the file itself).
  r.post('/files/:id/retire', requireAbility('retire', 'File'), async (req, res) => {
    const { id } = parse(idParamSchema, req.params)
    res.json(await retireFile(ctx.db, currentUser(req), id, parse(retireSchema, req.body ?? {}).reason))
  })
  return r
}
