import { z } from 'zod'
import { idValue, safeString } from './common'

/**
 * Request schemas and answer shapes of the analysis routes (issue 6): predicted polar patterns,
 * polar fits of sweeps and harmonic peaks in spectra. The analysis itself is shared/analysis.
 */
const vec3 = z
  .tuple([z.number().finite(), z.number().finite(), z.number().finite()], {
    error: 'Give a direction as three numbers [h, k, l]',
  })
  .refine((v) => v.some((c) => c !== 0), 'The direction cannot be [0, 0, 0]')
const order = z.coerce
  .number()
  .int()
  .refine((n) => n === 2 || n === 3, 'Polar patterns are modelled for orders 2 (SHG) and 3 (THG)')
const step = z.coerce.number().min(0.5, 'Use a step of at least 0.5°').max(30, 'Use a step of at most 30°').default(2)

/** `GET /api/analysis/arrays/:id/pattern` query (also used for chips). */
export const patternQuerySchema = z.object({ order: order.default(2), step })
export type PatternQuery = z.infer<typeof patternQuerySchema>

/** `POST /api/analysis/pattern`: a bare crystal. */
export const barePatternSchema = z.object({
  pointGroup: safeString().min(1, 'Pick a point group').max(10),
  normal: vec3,
  reference: vec3,
  order,
  ratios: z.array(z.number().finite()).max(30).optional(),
  azimuthDeg: z.number().finite().min(-360).max(360).default(0),
  step,
})
export type BarePatternInput = z.infer<typeof barePatternSchema>

const fileId = idValue('Pick a file of this session')
const arrayId = idValue('Pick an array of this session')
const ANALYSERS = ['parallel', 'perpendicular', 'none'] as const

/** `POST /api/analysis/sessions/:id/fit`. */
export const fitRequestSchema = z.object({
  fileId,
  arrayId,
  angleUnit: z.enum(['auto', 'deg', 'rad']).default('auto'),
  columns: z
    .object({
      angle: z.union([z.string().max(100), z.number().int().min(0)]).optional(),
      intensities: z
        .array(
          z.object({ column: z.union([z.string().max(100), z.number().int().min(0)]), analyser: z.enum(ANALYSERS) }),
        )
        .min(1)
        .max(3)
        .optional(),
    })
    .optional(),
  order: order.optional(),
  save: z.boolean().default(false),
})
export type FitRequest = z.infer<typeof fitRequestSchema>

/** `POST /api/analysis/sessions/:id/spectrum`. */
export const spectrumRequestSchema = z
  .object({
    fileId,
    arrayId: arrayId.optional(),
    /** Pixel → nm polynomial λ = c0 + c1·p + …; when given, the first column is read as pixels. */
    calibration: z.array(z.number().finite()).min(2, 'Give at least c0 and c1 (λ = c0 + c1·pixel)').max(5).optional(),
    /** Detector counts × nm → harmonic power in W (needed to record a power). */
    wattsPerCount: z.number().finite().positive('The calibration factor must be positive').optional(),
    record: z.boolean().default(false),
    /** Replace a different harmonic power already recorded for the array (else 409). */
    confirmOverwrite: z.boolean().default(false),
  })
  .refine((r) => !r.record || r.arrayId !== undefined, {
    path: ['arrayId'],
    message: 'Pick the array the signal belongs to',
  })
export type SpectrumRequest = z.infer<typeof spectrumRequestSchema>
