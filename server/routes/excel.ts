import { Router, type Request, type Response } from 'express'
import multer from 'multer'
import { z } from 'zod'
import type { AppContext } from '../context'
import { parse } from '../middleware/validate'
import { currentUser, requireAbility } from '../auth/guards'
import { BadRequestError, fieldError } from '../errors'
import { XLSX_MIME } from '../services/excel/excel-style'
import { getExport, openExport, startExport } from '../services/excel/excel-export'
import { createFileStorage } from '../services/files/create-storage'
import { buildTemplate } from '../services/excel/excel-template'
import { importWorkbook } from '../services/excel/excel-import'

const MAX_IMPORT_BYTES = 20 * 1024 * 1024
const receive = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: MAX_IMPORT_BYTES, files: 1, fields: 5 },
}).single('file')

/** Run multer; its limit errors become field-level 400s on `file`. */
function receiveUpload(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) =>
    receive(req, res, (err: unknown) => {
      if (!err) return resolve()
      const code = (err as { code?: string }).code
      if (code === 'LIMIT_FILE_SIZE') return reject(fieldError('file', 'The file is larger than 20 MB: split it'))
      if (code === 'LIMIT_UNEXPECTED_FILE' || code === 'LIMIT_FILE_COUNT')
        return reject(fieldError('file', 'Send one file, in the form field "file"'))
      reject(new BadRequestError(`The upload could not be read: ${(err as Error).message}`))
    }),
  )
}

const jobParams = z.object({ id: z.string().uuid('No such export') })
const importQuery = z.object({
  dryRun: z
    .enum(['true', 'false'])
    .default('true')
    .transform((v) => v === 'true'),
  /** The dry run's planHash: the import then does exactly what that dry run showed, or nothing (409). */
  plan: z
    .string()
    .regex(/^[0-9a-f]{64}$/, 'Send the planHash of the dry run')
    .optional(),
})
const importFields = z.object({ reason: z.string().trim().max(300).optional() })

/** Mounted under /api/excel: inventory export (jobs with progress), import template, legacy import. */
export function excelRoutes(ctx: AppContext): Router {
  const r = Router()
  const storage = createFileStorage(ctx.env.DATA_DIR, ctx.env)
  r.post('/exports', requireAbility('export', 'Inventory'), async (req, res) => {
    res.status(202).json(await startExport(ctx.db, storage, ctx.env.DATA_DIR, currentUser(req)))
  })
  r.get('/exports/:id', requireAbility('export', 'Inventory'), async (req, res) => {
    res.json(await getExport(ctx.db, parse(jobParams, req.params).id, currentUser(req)))
  })
  r.get('/exports/:id/download', requireAbility('export', 'Inventory'), async (req, res) => {
    const { job, stream } = await openExport(ctx.db, storage, parse(jobParams, req.params).id, currentUser(req))
    res.attachment(job.fileName)
    res.set({
      'Content-Type': XLSX_MIME,
      'Cache-Control': 'private, no-store',
      ...(job.sizeBytes ? { 'Content-Length': String(job.sizeBytes) } : {}),
    })
    stream.pipe(res)
  })
  r.get('/template', requireAbility('import', 'Inventory'), async (_req, res) => {
    res.attachment('overtone-import-template.xlsx')
    res.set({ 'Content-Type': XLSX_MIME, 'Cache-Control': 'no-store' }).send(await buildTemplate(ctx.db))
  })
  r.post('/import', requireAbility('import', 'Inventory'), async (req, res) => {
    const { dryRun, plan } = parse(importQuery, req.query)
    await receiveUpload(req, res)
    const { reason } = parse(importFields, req.body ?? {})
    const file = req.file ? { buffer: req.file.buffer, originalName: req.file.originalname } : undefined
    const limits = {
      maxExpandedBytes: Math.round(ctx.env.IMPORT_MAX_EXPANDED_MB * 1024 * 1024),
      maxRows: ctx.env.IMPORT_MAX_ROWS,
    }
    const report = await importWorkbook(ctx.db, currentUser(req), file, dryRun, limits, { reason, planHash: plan })
    // A real import that was refused (errors in the file) answers 422 with the same report.
    res.status(!dryRun && !report.imported ? 422 : dryRun ? 200 : 201).json(report)
  })
  return r
}
