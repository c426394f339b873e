import { z } from 'zod'
import { POINT_GROUP_SYMBOLS } from '../engine'
import { arraySenseIssues } from '../array-sense'
import { FAB_STEP_KINDS, checkFabParams } from '../fab-params'
import { idValue, safeString } from './common'
import { limitText } from './messages'

/**
 * Request schemas of the sample records (materials → wafers → chips → arrays → sessions, plus
 * locations, moves, fabrication steps and laser setups). Used by the server routes and the forms.
 * Units are in the field names (nm, µm as Um, mm, deg, Hz, mW, fs, s).
 */

/** One line of text (no tabs, line breaks or control characters; see ./common). */
const text = (max: number) => safeString().max(max)
/** Optional one-line text; empty becomes null. */
const optLine = (max: number) =>
  text(max)
    .optional()
    .nullable()
    .transform((v) => (v ? v : null))
/** Optional notes: may hold tabs and line breaks; empty becomes null. */
const optText = (max: number) =>
  safeString({ multiline: true })
    .max(max)
    .optional()
    .nullable()
    .transform((v) => (v ? v : null))
const id = idValue('Pick one')
const optId = z
  .union([id, z.null()])
  .optional()
  .transform((v) => v ?? null)
const num = (min: number, max: number, unit: string) => {
  const u = unit === '°' || !unit ? unit : ` ${unit}`
  return z.coerce
    .number({ error: unit ? `Enter a number in ${unit}` : 'Enter a number' })
    .min(min, limitText('At least', min, u))
    .max(max, limitText('At most', max, u))
}
const dateString = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'Use the form YYYY-MM-DD')
const dateTimeString = z.string().refine((s) => !Number.isNaN(Date.parse(s)), 'Enter a date and time')

/** A crystal direction in the crystal's Cartesian frame (Miller indices for cubic crystals). */
export const directionSchema = z
  .tuple([z.number(), z.number(), z.number()], { error: 'Give three numbers, e.g. [0, 0, 1]' })
  .refine((v) => v.some((x) => x !== 0), 'The direction cannot be [0, 0, 0]')
  .refine((v) => v.every((x) => Math.abs(x) <= 20), 'Use indices between −20 and 20')

// ---------- materials ----------
export const coefficientSchema = z.object({
  /** Contracted (Voigt) d-matrix component for χ(2), e.g. d14; or a χ(3) component such as xxxx. */
  component: z.string().regex(/^(d[1-3][1-6]|[xyz]{4})$/, 'Use d11…d36 for χ(2) or e.g. xxxx for χ(3)'),
  order: z.union([z.literal(2), z.literal(3)]),
  // The schema's own words only for a value that is not a number; the limits use the shared map.
  valuePmV: z
    .number({
      error: (iss) =>
        iss.code === 'invalid_type'
          ? 'Enter the value in pm/V (χ(3): in m²/V² × 10⁻²⁰… state the unit in the source)'
          : undefined,
    })
    .min(-1e6)
    .max(1e6),
  wavelengthNm: num(100, 20000, 'nm'),
  source: text(300).min(1, 'Say where the value comes from'),
  isTypical: z.boolean().default(true),
})
export const materialSchema = z.object({
  name: text(80).min(1, 'Enter a name'),
  formula: text(40).min(1, 'Enter the formula'),
  pointGroup: z.enum(POINT_GROUP_SYMBOLS as unknown as [string, ...string[]], {
    error: 'Pick one of the 32 point groups',
  }),
  bandGapEv: num(0, 20, 'eV')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  transparencyNote: optText(300),
  notes: optText(2000),
  coefficients: z.array(coefficientSchema).max(40).default([]),
})
export type MaterialInput = z.infer<typeof materialSchema>

// ---------- locations and moves ----------
export const LOCATION_KINDS = ['room', 'cabinet', 'box', 'slot'] as const
export const locationSchema = z.object({
  kind: z.enum(LOCATION_KINDS),
  name: text(80).min(1, 'Enter a name'),
  parentId: optId,
  notes: optText(500),
})
export type LocationInput = z.infer<typeof locationSchema>

export const moveSchema = z.object({
  /** Code of the thing to move (wafer W-…, chip C-…, or a box L-…). */
  itemCode: z
    .string()
    .trim()
    .toUpperCase()
    .regex(/^(W|C|L)-[0-9A-Z-]+$/, 'Scan or type a wafer, chip or box code'),
  toLocationId: id,
  /** Hand the item to a person as well (they get a notice). */
  handToUserId: optId,
  note: optText(500),
})
export type MoveInput = z.infer<typeof moveSchema>

// ---------- wafers ----------
export const WAFER_STATUSES = ['in_stock', 'in_process', 'used_up', 'retired'] as const
export const waferSchema = z
  .object({
    materialId: id,
    cutNormal: directionSchema,
    flatDirection: directionSchema,
    diameterMm: num(2, 450, 'mm'),
    thicknessUm: num(1, 5000, 'µm'),
    lot: text(60).min(1, 'Enter the lot'),
    supplier: optLine(120),
    receivedOn: dateString
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    locationId: optId,
    status: z.enum(WAFER_STATUSES).default('in_stock'),
    notes: optText(2000),
  })
  .refine(
    (w) =>
      Math.abs(
        w.cutNormal[0] * w.flatDirection[0] + w.cutNormal[1] * w.flatDirection[1] + w.cutNormal[2] * w.flatDirection[2],
      ) < 1e-9,
    {
      path: ['flatDirection'],
      message: 'The primary flat direction must lie in the wafer surface (perpendicular to the cut normal)',
    },
  )
export type WaferInput = z.infer<typeof waferSchema>

/** Edits always carry a reason when the record is retired or otherwise locked (audit trail). */
export const reasonSchema = z.object({ reason: optText(500) })

// ---------- chips ----------
export const CHIP_STATUSES = ['in_stock', 'in_process', 'measured', 'used_up', 'retired'] as const
export const diceSchema = z.object({
  waferId: id,
  count: z.coerce.number().int().min(1, 'At least one chip').max(200, 'At most 200 chips at once'),
  /**
   * In-plane rotation of the chip's reference edge relative to the wafer's primary flat (deg, counter-clockwise seen
   * from the front).
   */
  rotationDeg: num(-360, 360, '°').default(0),
  widthMm: num(0.1, 300, 'mm'),
  heightMm: num(0.1, 300, 'mm'),
  locationId: optId,
  notes: optText(2000),
})
export type DiceInput = z.infer<typeof diceSchema>
export const chipUpdateSchema = z.object({
  rotationDeg: num(-360, 360, '°').optional(),
  widthMm: num(0.1, 300, 'mm').optional(),
  heightMm: num(0.1, 300, 'mm').optional(),
  status: z.enum(CHIP_STATUSES).optional(),
  notes: optText(2000),
  reason: optText(500),
})

// ---------- fabrication steps ----------
export { FAB_STEP_KINDS, FAB_STEP_PARAMS } from '../fab-params'
/**
 * A step's parameters are those of its kind (`FAB_STEP_PARAMS` in shared/fab-params.ts: spin speed
 * in rpm, bake temperature in °C, dose in µC/cm² …), each within its physical range; a nameless or
 * unknown parameter is refused on `params.<name>`, never dropped. Numbers typed as text are stored as numbers.
 */
export const fabStepSchema = z
  .object({
    chipId: id,
    kind: z.enum(FAB_STEP_KINDS),
    params: z.record(z.string().max(60, 'At most 60 characters'), z.unknown()).default({}),
    performedAt: dateTimeString,
    notes: optText(2000),
  })
  .transform((s, ctx) => {
    const { params, issues } = checkFabParams(s.kind, s.params)
    for (const i of issues)
      ctx.issues.push({ code: 'custom', path: ['params', i.key], message: i.message, input: s.params[i.key] })
    return { ...s, params }
  })
export type FabStepInput = z.infer<typeof fabStepSchema>

// ---------- arrays ----------
export const SHAPES = [
  'disk',
  'ring',
  'ellipse',
  'rectangle',
  'square',
  'triangle',
  'hexagon',
  'cross',
  'l-shape',
  'split-ring',
  'gammadion',
  'dimer',
  'custom',
] as const
/** The named dimensions (nm) each shape asks for (the form, the Excel columns and the server's checks use one list). */
export { SHAPE_DIMENSIONS } from '../array-sense'
export const LATTICES = ['single', 'square', 'hexagonal', 'rectangular', 'custom'] as const
export const arraySchema = z
  .object({
    chipId: id,
    /** Position name on the chip, e.g. B2; part of the array code A-0001-01-B2. */
    position: z
      .string()
      .trim()
      .toUpperCase()
      .regex(/^[A-Z0-9]{1,6}$/, 'Use 1–6 letters or digits, e.g. B2'),
    shape: z.enum(SHAPES),
    /**
     * Meta-atom dimensions in nm, by name (diameterNm, innerDiameterNm, widthNm, lengthNm, sideNm, gapNm, heightNm …).
     */
    dimensionsNm: z
      .record(
        z.string().regex(/^[a-z][A-Za-z]{0,30}Nm$/, 'Dimension names end in Nm'),
        z.number().positive('Dimensions are positive').max(1e6),
      )
      .default({}),
    /** Meta-atom azimuth relative to the lattice (deg). */
    shapeAzimuthDeg: num(-360, 360, '°').default(0),
    lattice: z.enum(LATTICES),
    periodXNm: num(1, 1e6, 'nm')
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    periodYNm: num(1, 1e6, 'nm')
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    /** Array azimuth relative to the chip's reference edge (deg). */
    azimuthDeg: num(-360, 360, '°').default(0),
    count: z.coerce.number().int().min(1).max(1e9).default(1),
    /** For custom shapes/lattices: the structure symmetry itself. */
    customRotationOrder: z.coerce
      .number()
      .int()
      .min(0)
      .max(360)
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    customMirrors: z
      .array(z.number().min(0).max(360))
      .max(24)
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    notes: optText(2000),
  })
  .superRefine((a, ctx) => {
    // What cannot be fabricated (a ring whose inner diameter exceeds its outer one, a meta-atom larger than its cell
    // …).
    for (const issue of arraySenseIssues(a))
      ctx.addIssue({ code: 'custom', path: issue.path.split('.'), message: issue.message })
  })
export type ArrayInput = z.infer<typeof arraySchema>

// ---------- laser setups: the safety register (issue 5) ----------
export const LASER_CLASSES = ['1', '1M', '2', '2M', '3R', '3B', '4'] as const
/** Bands as text: ranges and single wavelengths in nm, e.g. `190–534, 1064` or `720-850`. */
export const BANDS_PATTERN = /^\s*\d+(\.\d+)?(\s*[-–]\s*\d+(\.\d+)?)?(\s*,\s*\d+(\.\d+)?(\s*[-–]\s*\d+(\.\d+)?)?)*\s*$/
export const eyewearSchema = z
  .object({
    description: text(120).min(1, 'Describe the eyewear (maker, model or filter)'),
    bandsNm: text(120).regex(BANDS_PATTERN, 'Bands in nm, e.g. 720–850, 1064'),
    od: num(0, 20, '')
      .nullable()
      .optional()
      .transform((v) => v ?? null),
    en207: text(80)
      .regex(/^[DIRM]+\s+[\d\s,.–-]+\s+LB\d{1,2}$/i, 'EN 207 marking, e.g. D 800 LB5 or DIRM 720-850 LB7')
      .nullable()
      .optional()
      .transform((v) => v || null),
  })
  .refine((e) => e.od !== null || e.en207 !== null, { message: 'Give the OD or the EN 207 marking', path: ['od'] })
export type EyewearInput = z.infer<typeof eyewearSchema>
const optNum = (min: number, max: number, unit: string) =>
  num(min, max, unit)
    .nullable()
    .optional()
    .transform((v) => v ?? null)
export const laserSetupSchema = z.object({
  name: text(80).min(1, 'Enter a name'),
  room: text(40).min(1, 'Enter the room'),
  sourceType: z.enum(['cw', 'pulsed', 'mode_locked']),
  wavelengthsNm: z
    .array(num(100, 20000, 'nm'))
    .min(1, 'At least one wavelength')
    .max(10),
  notes: optText(2000),
  pulseDurationFs: optNum(1, 1e15, 'fs'),
  repRateHz: optNum(0.001, 1e11, 'Hz'),
  maxAvgPowerMw: optNum(0, 1e7, 'mW'),
  pulseEnergyUj: optNum(0, 1e9, 'µJ'),
  beamDiameterMm: optNum(0.001, 1000, 'mm'),
  divergenceMrad: optNum(0.001, 1000, 'mrad'),
  harmonicOrders: z
    .array(z.coerce.number().int().min(2, 'Orders 2 to 5').max(5, 'Orders 2 to 5'))
    .max(4)
    .optional()
    .transform((v) => (v === undefined ? undefined : [...new Set(v)].sort((a, b) => a - b))),
  laserClass: z
    .enum(LASER_CLASSES, 'Pick the class (IEC 60825-1)')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  eyewear: z.array(eyewearSchema).max(20).optional(),
  interlocks: optText(2000),
  controlledAreaNotes: optText(2000),
  /** Refused: the submitter of record is always the signed-in person who registers the setup. */
  submitterId: z.never({ error: 'The submitter is the person who registers the setup; it cannot be named' }).optional(),
})
export type LaserSetupInput = z.infer<typeof laserSetupSchema>
/** Fields whose change changes the hazard (and voids a sign-off). */
export const HAZARD_FIELDS = [
  'room',
  'sourceType',
  'wavelengthsNm',
  'pulseDurationFs',
  'repRateHz',
  'maxAvgPowerMw',
  'pulseEnergyUj',
  'beamDiameterMm',
  'divergenceMrad',
  'harmonicOrders',
  'laserClass',
  'eyewear',
  'interlocks',
  'controlledAreaNotes',
] as const satisfies readonly (keyof LaserSetupInput)[]
export type HazardField = (typeof HAZARD_FIELDS)[number]

/** Sign-off decisions by a safety officer. `today` is compared in UTC. */
export const SIGNOFF_MAX_DAYS = 730
export const approveSchema = z.object({
  expiresOn: dateString,
  note: optText(2000),
})
export const signoffNoteSchema = z.object({
  note: safeString({ multiline: true, error: 'Say why' }).max(2000).min(1, 'Say why'),
})

// ---------- measurement sessions ----------
export const pumpSchema = z.discriminatedUnion(
  'type',
  [
    z.object({ type: z.literal('circular'), m: z.union([z.literal(1), z.literal(-1)]) }),
    z.object({ type: z.literal('linear'), angle: num(-360, 360, '°') }),
    z.object({ type: z.literal('elliptical') }),
    z.object({
      type: z.literal('vortex'),
      spin: z.union([z.literal(1), z.literal(-1)]),
      charge: z.number().int().min(-20).max(20),
    }),
    z.object({ type: z.literal('radial') }),
    z.object({ type: z.literal('azimuthal') }),
  ],
  { error: 'Pick a pump polarisation' },
)
export const OBSERVED_NORMAL = ['not_checked', 'none', 'present', 'co', 'counter', 'linear'] as const
export const sessionResultSchema = z.object({
  arrayId: id,
  /** Harmonic power at the detector after calibration (W). */
  harmonicPowerW: z
    .number()
    .min(0)
    .max(1e3)
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  /**
   * What was seen along the normal: nothing, something (handedness not analysed), co-/counter-rotating circular,
   * linear.
   */
  observedNormal: z.enum(OBSERVED_NORMAL).default('not_checked'),
  /** Observed m values where an analysis resolved them. */
  observedM: z.array(z.number().int().min(-20).max(20)).max(20).default([]),
  notes: optText(1000),
})
export const sessionSchema = z.object({
  laserSetupId: id,
  performedAt: dateTimeString,
  wavelengthNm: num(100, 20000, 'nm'),
  pulseDurationFs: num(1, 1e15, 'fs')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  repRateHz: num(0, 1e11, 'Hz')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  avgPowerMw: num(0, 1e6, 'mW'),
  spotDiameterUm: num(0.1, 1e5, 'µm')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  objectiveNa: num(0.01, 1.7, '')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  pump: pumpSchema,
  harmonicOrder: z.coerce.number().int().min(2, 'Order 2 to 5').max(5, 'Order 2 to 5'),
  geometry: z.enum(['transmission', 'reflection']),
  collection: z.enum(['normal', 'angle_resolved']),
  analyser: optLine(60),
  detector: optLine(120),
  integrationS: num(0, 1e5, 's')
    .nullable()
    .optional()
    .transform((v) => v ?? null),
  filters: optLine(300),
  notes: optText(4000),
  results: z.array(sessionResultSchema).min(1, 'Pick at least one array').max(200),
  /** The person logging confirms they read the setup's safety notes (issue 5). */
  safetyNotesRead: z.literal(true, "Confirm that you read the setup's safety notes"),
})
export type SessionInput = z.infer<typeof sessionSchema>

// ---------- lists: server-side sort, filter, paging ----------
export const listQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
  sort: z
    .string()
    .regex(/^[a-zA-Z]{1,40}$/)
    .optional(),
  dir: z.enum(['asc', 'desc']).default('asc'),
  q: text(100).optional(),
  status: text(40).optional(),
  parentId: idValue().optional(),
  includeRetired: z
    .enum(['true', 'false'])
    .default('false')
    .transform((v) => v === 'true'),
})
export type ListQuery = z.infer<typeof listQuerySchema>
