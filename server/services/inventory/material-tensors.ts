import {
  describeDMatrixEqualities,
  flatIndex,
  formDMatrix,
  getPointGroup,
  solveTensorForm,
  type SymbolicEntry,
} from '../../../shared/engine'
import type { Coefficient, MaterialDetail } from '../../../shared/records'
import { BadRequestError } from '../../errors'

/**
 * The χ(2) d-matrix form of a material's point group, as the engine solves it (IEEE Std 176
 * standard settings, d = χ(2)/2, no factors of 2), and the checks a save makes against it.
 */

function formatEntry(entry: SymbolicEntry): string {
  if (entry.length === 0) return '0'
  return entry
    .map((e, k) => {
      const sign = e.coefficient < 0 ? (k === 0 ? '−' : ' − ') : k === 0 ? '' : ' + '
      const a = Math.abs(e.coefficient)
      return `${sign}${a === 1 ? '' : `${Number(a.toFixed(6))}·`}${e.parameter}`
    })
    .join('')
}

/** The d-matrix form shown beside a material's stored numbers. */
export function describeDMatrix(pointGroup: string): MaterialDetail['dMatrix'] {
  const group = getPointGroup(pointGroup)
  const form = solveTensorForm(group.symbol, 2)
  return {
    rows: formDMatrix(form).map((row) => row.map(formatEntry)),
    equalities: describeDMatrixEqualities(form),
    independent: form.independentCount,
    setting: `IEEE Std 176 standard setting: ${group.symbol} ${group.setting}`,
  }
}

/** Single-parameter entries of the d-matrix: component name → { parameter, coefficient }. */
function allowedComponents(pointGroup: string): Map<string, SymbolicEntry> {
  const map = new Map<string, SymbolicEntry>()
  formDMatrix(solveTensorForm(pointGroup, 2)).forEach((row, i) =>
    row.forEach((entry, l) => {
      if (entry.length) map.set(`d${i + 1}${l + 1}`, entry)
    }),
  )
  return map
}

function chi3Allowed(pointGroup: string, component: string): boolean {
  const form = solveTensorForm(pointGroup, 3)
  const p = form.space.parameterOf[flatIndex(component)]
  return form.basis.some((v) => v[p] !== 0)
}

const fail = (i: number, field: string, message: string) =>
  new BadRequestError(message, { [`coefficients.${i}.${field}`]: [message] })

/**
 * Refuse coefficients the point group forbids, and (a demanding user's check) two components the
 * form ties together but that are given different values at the same wavelength. Tabulated values
 * are often magnitudes, so a tie d_a = −d_b is met by equal magnitudes as well.
 */
export function checkCoefficients(pointGroup: string, coefficients: readonly Coefficient[]): void {
  const group = getPointGroup(pointGroup)
  const allowed = allowedComponents(group.symbol)
  const seen = new Map<string, { i: number; component: string; value: number; coefficient: number }>()
  coefficients.forEach((c, i) => {
    const isD = /^d[1-3][1-6]$/.test(c.component)
    if (c.order === 2 && !isD) throw fail(i, 'component', 'A χ(2) coefficient is a d-matrix component, d11…d36')
    if (c.order === 3 && isD) throw fail(i, 'component', 'A χ(3) coefficient is a Cartesian component such as xxxx')
    if (c.order === 3) {
      if (!chi3Allowed(group.symbol, c.component))
        throw fail(
          i,
          'component',
          `Class ${group.symbol} (${group.schoenflies}) has no χ(3) component ${c.component} (it vanishes by symmetry)`,
        )
      return
    }
    const entry = allowed.get(c.component)
    if (!entry) {
      const list = [...allowed.keys()]
      throw fail(
        i,
        'component',
        list.length === 0
          ? `Class ${group.symbol} (${group.schoenflies}) is centrosymmetric: every bulk χ(2) component vanishes, so ${c.component} cannot be stored (surface χ(2) belongs in the notes)`
          : `Class ${group.symbol} (${group.schoenflies}) forbids ${c.component}; allowed components: ${list.join(', ')}`,
      )
    }
    if (entry.length !== 1) return
    const { parameter, coefficient } = entry[0]
    const key = `${parameter}@${c.wavelengthNm}`
    const prev = seen.get(key)
    if (prev && prev.component !== c.component) {
      const a = prev.value / prev.coefficient
      const b = c.valuePmV / coefficient
      const same =
        Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(a)) ||
        Math.abs(Math.abs(a) - Math.abs(b)) <= 1e-6 * Math.max(1, Math.abs(a))
      if (!same) {
        const eq =
          describeDMatrixEqualities(solveTensorForm(group.symbol, 2)).find(
            (s) => s.includes(c.component) && s.includes(prev.component),
          ) ?? `${prev.component} and ${c.component} are tied`
        throw fail(
          i,
          'valuePmV',
          `In class ${group.symbol} the form says ${eq}, so ${c.component} = ${c.valuePmV} pm/V contradicts ${prev.component} = ${prev.value} pm/V at ${c.wavelengthNm} nm`,
        )
      }
    } else if (!prev) seen.set(key, { i, component: c.component, value: c.valuePmV, coefficient })
  })
}
