import { FAB_STEP_PARAMS, type FabStepKind } from '../../../shared/fab-params'

/** A free parameter row of the fab-step dialog (kind `other`), as typed. */
export interface ParamRow {
  key: string
  value: string
}

const isBlank = (v: string | number | null | undefined) => v === null || v === undefined || String(v).trim() === ''
const asValue = (v: string) => (v.trim() !== '' && !Number.isNaN(Number(v)) ? Number(v) : v.trim())

/**
 * Free rows → the request's `params`. An empty row is ignored; a value without a name, or a name
 * given twice, is flagged on its row (`rows.<i>.key`), never dropped or merged.
 */
export function rowsToParams(rows: ParamRow[]): {
  params: Record<string, string | number>
  errors: Record<string, string>
} {
  const params: Record<string, string | number> = {}
  const errors: Record<string, string> = {}
  rows.forEach((r, i) => {
    const key = r.key.trim()
    if (!key && isBlank(r.value)) return
    if (!key) {
      errors[`rows.${i}.key`] = 'Name this parameter, or remove the row'
      return
    }
    if (key in params) {
      errors[`rows.${i}.key`] = `“${key}” is given twice`
      return
    }
    params[key] = asValue(r.value)
  })
  return { params, errors }
}

/**
 * The per-kind fields → `params`: the filled ones of this kind (numbers as numbers, the server
 * checks the ranges). Values typed for another kind's fields are not sent silently: `strayed`
 * lists them so the dialog can say so before saving.
 */
export function fieldsToParams(
  kind: FabStepKind,
  values: Record<string, string | number | null>,
): { params: Record<string, string | number>; strayed: string[] } {
  const defs = FAB_STEP_PARAMS[kind] ?? []
  const params: Record<string, string | number> = {}
  for (const d of defs) {
    const v = values[d.key]
    if (isBlank(v)) continue
    params[d.key] = d.type === 'number' ? asValue(String(v)) : String(v).trim()
  }
  const strayed = Object.entries(values)
    .filter(([k, v]) => !isBlank(v) && !defs.some((d) => d.key === k))
    .map(([k]) => k)
  return { params, strayed }
}

/** "Spin speed (resist)" for a value typed under another kind. */
export function strayLabel(key: string): string {
  for (const [kind, defs] of Object.entries(FAB_STEP_PARAMS)) {
    const d = defs?.find((x) => x.key === key)
    if (d) return `${d.label} (${kind.replace('_', '-')})`
  }
  return key
}
