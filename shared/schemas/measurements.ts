import { z } from 'zod'
import { listQuerySchema, sessionSchema } from './records'
import { idValue, safeString } from './common'

/**
 * Request schemas of the measurement side: session edits and lists, session previews, file
 * uploads and retirements. Shapes of sessions and laser setups themselves are in ./records.
 */

const optReason = safeString({ multiline: true })
  .max(500)
  .optional()
  .nullable()
  .transform((v) => (v ? v : null))
const codeParam = (re: RegExp, hint: string) => z.string().trim().toUpperCase().regex(re, hint).optional()
const dateParam = z
  .string()
  .refine((s) => !Number.isNaN(Date.parse(s)), 'Enter a date (YYYY-MM-DD) or date and time')
  .optional()

/**
 * A session edit: any subset of the session fields, plus a reason (required for entries older than
 * 24 h). An edit that changes, clears or removes a harmonic power already recorded is a 409 unless
 * `confirmOverwrite` is true (the person was asked).
 */
export const sessionUpdateSchema = sessionSchema
  .partial()
  .extend({ reason: optReason, confirmOverwrite: z.boolean().optional() })
export type SessionUpdateInput = z.infer<typeof sessionUpdateSchema>

/** Preview of predicted vs observed for a session that is not saved yet (the form's live view). */
export const sessionPreviewSchema = sessionSchema.pick({ pump: true, harmonicOrder: true, results: true }).extend({
  avgPowerMw: sessionSchema.shape.avgPowerMw.optional(),
})
export type SessionPreviewInput = z.infer<typeof sessionPreviewSchema>

/** Session list: the common list query plus array/chip codes, laser setup and a performedAt range. */
export const sessionListQuerySchema = listQuerySchema.extend({
  array: codeParam(/^A-[0-9A-Z-]+$/, 'An array code such as A-0001-01-B2'),
  chip: codeParam(/^C-[0-9A-Z-]+$/, 'A chip code such as C-0001-01'),
  laserSetupId: idValue().optional(),
  from: dateParam,
  to: dateParam,
})
export type SessionListQuery = z.infer<typeof sessionListQuerySchema>

export const FILE_ENTITIES = ['wafer', 'chip', 'fab_step', 'array', 'session'] as const
export const FILE_KINDS = ['sem', 'spectrum', 'sweep', 'camera', 'other'] as const
/** The form fields sent with an upload (multipart), besides `file`. */
export const fileUploadSchema = z.object({
  entity: z.enum(FILE_ENTITIES, { error: 'Attach the file to a wafer, chip, fabrication step, array or session' }),
  entityId: idValue('Pick the record'),
  kind: z.enum(FILE_KINDS, { error: 'Pick what the file is: SEM image, spectrum, sweep, camera image or other' }),
})
export type FileUploadInput = z.infer<typeof fileUploadSchema>

export const fileListQuerySchema = z.object({
  entity: z.enum(FILE_ENTITIES),
  entityId: idValue(),
  includeRetired: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
})

/** Retiring a record or file always needs a reason (kept in the audit log). */
export const retireSchema = z.object({
  reason: safeString({ multiline: true, error: 'Say why' }).min(1, 'Say why').max(500),
})
