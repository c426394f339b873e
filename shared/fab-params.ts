import { z } from 'zod'
import { safeString } from './schemas/common'
import { limitText } from './schemas/messages'

/**
 * The parameters of each kind of fabrication step, with their units and the range a real process
 * can have; defined once, read by the fab-step schema (server and form), the FabStep dialog (one
 * field per parameter, unit beside it), the chip timeline and the Excel export. The ranges are wide
 * on purpose: they catch a slip (a bake of 1800 °C, a dose typed in the wrong unit), not a recipe
 * nobody has tried. Ranges follow the usual process windows of spin coating, baking, electron-beam
 * and optical lithography, plasma etching and thin-film deposition (M. J. Madou, Fundamentals of
 * Microfabrication and Nanotechnology, 3rd ed., 2011, vol. II).
 * A step of kind `other` takes free parameters (any name of letters, digits and spaces).
 * Keys carry their unit in their ending, like every record field (`spinRpm`, `bakeTempC`, `doseUcPerCm2`).
 */
export const FAB_STEP_KINDS = ['resist', 'exposure', 'etch', 'deposition', 'lift_off', 'inspection', 'other'] as const
export type FabStepKind = (typeof FAB_STEP_KINDS)[number]

export interface FabParamDef {
  key: string
  label: string
  type: 'number' | 'text'
  /** Shown beside the input and after the value (numbers only). */
  unit?: string
  min?: number
  max?: number
  /** An example (the dialog shows "e.g. …"; for text parameters the whole hint). */
  placeholder?: string
}

const num = (
  key: string,
  label: string,
  unit: string,
  min: number,
  max: number,
  placeholder?: string,
): FabParamDef => ({ key, label, type: 'number', unit, min, max, placeholder })
const txt = (key: string, label: string, placeholder?: string): FabParamDef => ({
  key,
  label,
  type: 'text',
  placeholder,
})

const tool = txt('tool', 'Tool', "e.g. the instrument's name in the lab")
const timeS = num('timeS', 'Time', 's', 0.1, 172_800)
const temperatureC = num('temperatureC', 'Temperature', '°C', -196, 1200)
const pressureMtorr = num('pressureMtorr', 'Pressure', 'mTorr', 0.001, 760_000)
const rfPowerW = num('rfPowerW', 'RF power', 'W', 0, 10_000)

/** Each kind's parameters, in the order the dialog shows them; `null`: free parameters. */
export const FAB_STEP_PARAMS: Record<FabStepKind, FabParamDef[] | null> = {
  resist: [
    txt('resist', 'Resist', 'e.g. positive e-beam resist'),
    num('spinRpm', 'Spin speed', 'rpm', 100, 12_000, '4000'),
    num('spinTimeS', 'Spin time', 's', 1, 600, '60'),
    num('thicknessNm', 'Thickness', 'nm', 1, 500_000),
    num('bakeTempC', 'Bake temperature', '°C', 20, 400, '180'),
    num('bakeTimeS', 'Bake time', 's', 1, 86_400, '120'),
    tool,
  ],
  exposure: [
    tool,
    num('accelerationKv', 'Acceleration voltage', 'kV', 0.1, 300),
    num('doseUcPerCm2', 'Dose (e-beam)', 'µC/cm²', 0.01, 100_000, '220'),
    num('doseMjPerCm2', 'Dose (optical)', 'mJ/cm²', 0.01, 100_000),
    num('beamCurrentNa', 'Beam current', 'nA', 0.0001, 1000),
    num('stepNm', 'Beam step', 'nm', 0.1, 10_000),
    txt('developer', 'Developer'),
    num('developTimeS', 'Development time', 's', 1, 3600),
  ],
  etch: [
    txt('process', 'Process', 'e.g. ICP-RIE, wet'),
    txt('gas', 'Gas', 'e.g. Cl2/Ar'),
    rfPowerW,
    num('icpPowerW', 'ICP power', 'W', 0, 10_000),
    pressureMtorr,
    temperatureC,
    timeS,
    num('depthNm', 'Depth', 'nm', 0.1, 1_000_000),
    tool,
  ],
  deposition: [
    txt('method', 'Method', 'e.g. e-beam evaporation, sputtering, ALD'),
    txt('material', 'Material', 'e.g. Au, SiO2'),
    num('thicknessNm', 'Thickness', 'nm', 0.1, 100_000),
    num('rateNmPerS', 'Rate', 'nm/s', 0.0001, 100),
    rfPowerW,
    pressureMtorr,
    temperatureC,
    tool,
  ],
  lift_off: [
    txt('solvent', 'Solvent', 'e.g. NMP, acetone'),
    num('temperatureC', 'Temperature', '°C', 0, 200),
    timeS,
    txt('agitation', 'Agitation', 'e.g. ultrasonic 1 min'),
  ],
  inspection: [
    tool,
    txt('result', 'Result', 'e.g. sidewalls ~85°'),
    num('depthNm', 'Measured depth', 'nm', 0.1, 1_000_000),
    num('featureSizeNm', 'Feature size', 'nm', 0.1, 1_000_000),
  ],
  other: null,
}

/** Names of a free parameter (kind `other`). */
export const FREE_PARAM_NAME = /^[A-Za-z][\w ]{0,39}$/

const articleOf = (kind: string) => (/^[aeiou]/i.test(kind) ? 'an' : 'a')
export const fabKindLabel = (kind: string) => kind.replace('_', '-')

/** A plain decimal number as text ("4000", "-1.5", "2e3"); anything else is not a number. */
const NUMBER_TEXT = /^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i

/** The rule for one parameter's value (also the dialog's input rule). */
export function fabParamSchema(def: FabParamDef): z.ZodType<string | number> {
  if (def.type === 'text') return safeString().max(200).min(1, `Enter the ${def.label.toLowerCase()}, or leave it out`)
  const unit = ` ${def.unit}`
  const enter = `Enter a number in ${def.unit}`
  return z.union([z.number(), z.string().trim().regex(NUMBER_TEXT, enter).transform(Number)], { error: enter }).pipe(
    z
      .number({ error: enter })
      .min(def.min!, limitText('At least', def.min!, unit))
      .max(def.max!, limitText('At most', def.max!, unit)),
  )
}
const freeValue = z.union([z.number(), safeString().max(200).min(1, 'Enter a value, or remove the parameter')], {
  error: 'Enter a value',
})

const shortText = (v: unknown) => {
  const t = JSON.stringify(v) ?? String(v)
  return t.length > 40 ? `${t.slice(0, 39)}…` : t
}

export interface FabParamIssue {
  key: string
  message: string
}

/** The parameter's definition for a kind, or undefined (free parameters and unknown names). */
export const fabParamDef = (kind: string, key: string) =>
  FAB_STEP_PARAMS[kind as FabStepKind]?.find((d) => d.key === key)

/**
 * Check a step's parameters for its kind: every parameter has a name, the kind has it, its value
 * is a value of its type within range. Returns the parameters as they are stored (numbers as
 * numbers) and the problems, each on its parameter's name (`params.<name>`).
 */
export function checkFabParams(
  kind: string,
  params: Record<string, unknown>,
): { params: Record<string, string | number>; issues: FabParamIssue[] } {
  const defs = FAB_STEP_PARAMS[kind as FabStepKind]
  const out: Record<string, string | number> = {}
  const issues: FabParamIssue[] = []
  for (const [key, value] of Object.entries(params)) {
    if (!key.trim()) {
      issues.push({
        key,
        message: `A parameter with the value ${shortText(value)} has no name: name it or leave it out`,
      })
      continue
    }
    let rule: z.ZodType<string | number> = freeValue
    if (defs) {
      const def = defs.find((d) => d.key === key)
      if (!def) {
        issues.push({
          key,
          message: `“${key}” is not a parameter of ${articleOf(kind)} ${fabKindLabel(kind)} step; it has ${defs.map((d) => d.label + (d.unit ? ` (${d.unit})` : '')).join(', ')}. Put anything else in the notes.`,
        })
        continue
      }
      rule = fabParamSchema(def)
    } else if (!FREE_PARAM_NAME.test(key)) {
      issues.push({ key, message: 'Parameter names: a letter first, then letters, digits and spaces (at most 40)' })
      continue
    }
    const r = rule.safeParse(value)
    if (r.success) out[key] = r.data
    else issues.push({ key, message: r.error.issues[0]!.message })
  }
  return { params: out, issues }
}

/** A stored step's parameters for display: known ones with their label and unit, old free-form ones as stored. */
export function describeFabParams(
  kind: string,
  params: Record<string, string | number>,
): { key: string; label: string; value: string }[] {
  const defs = FAB_STEP_PARAMS[kind as FabStepKind] ?? []
  const known = defs
    .filter((d) => d.key in params)
    .map((d) => ({
      key: d.key,
      label: d.label,
      value: d.unit && typeof params[d.key] === 'number' ? `${params[d.key]} ${d.unit}` : String(params[d.key]),
    }))
  const rest = Object.keys(params)
    .filter((k) => !defs.some((d) => d.key === k))
    .map((k) => ({ key: k, label: k, value: String(params[k]) }))
  return [...known, ...rest]
}
