/**
 * Contracted (Voigt) notation of rank-3 tensors symmetric in their last two indices, as used for
 * the SHG d-matrix: d_il with l = 1 xx, 2 yy, 3 zz, 4 yz, 5 xz, 6 xy; i = 1 x, 2 y, 3 z.
 * Convention: d_ijk = χ(2)_ijk / 2 and d_il = d_ijk with NO factors of 2 (unlike the
 * piezoelectric d-matrix, whose shear entries carry factors of 2, e.g. d16 = −2 d22 in class 3m).
 * Frame: whatever frame the tensor is expressed in (standard setting for solved forms).
 */
import type { TensorForm } from './tensor-forms'
import { flatIndex } from './tensor-space'
import { EngineError } from './errors'

const PAIR_LABELS = ['xx', 'yy', 'zz', 'yz', 'xz', 'xy']
const AXES = 'xyz'

/** Voigt name (`d14`) of output axis i (0..2) and contracted pair l (0..5). */
export function voigtName(i: number, l: number): string {
  return `d${i + 1}${l + 1}`
}

/** Numeric 3×6 d-matrix of a rank-3 flat tensor (entries d_il = T_{i,jk}). */
export function toVoigt(t: Float64Array): number[][] {
  if (t.length !== 27)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'tensor',
      value: t.length,
      message: 'Voigt notation needs a rank-3 tensor (27 components)',
    })
  return [0, 1, 2].map((i) => PAIR_LABELS.map((p) => t[flatIndex(AXES[i] + p)]))
}

/** One d-matrix entry as a linear combination of the independent parameters (named by their pivot entry). */
export type SymbolicEntry = readonly { parameter: string; coefficient: number }[]

/** Symbolic 3×6 d-matrix of a solved χ(2) form: each entry is Σ coefficient × parameter. */
export function formDMatrix(form: TensorForm): SymbolicEntry[][] {
  if (form.rank !== 3)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'order',
      value: form.order,
      allowed: [2],
      message: 'a d-matrix exists only for χ(2)',
    })
  const names = form.pivots.map((p) => pivotName(form, p))
  return [0, 1, 2].map((i) =>
    PAIR_LABELS.map((pair) => {
      const p = form.space.parameterOf[flatIndex(AXES[i] + pair)]
      return form.basis.flatMap((v, b) => (v[p] !== 0 ? [{ parameter: names[b], coefficient: v[p] }] : []))
    }),
  )
}

function pivotName(form: TensorForm, p: number): string {
  const label = form.space.labels[p]
  const pair = [label[1], label[2]].sort().join('')
  const l = PAIR_LABELS.findIndex((q) => [...q].sort().join('') === pair)
  return voigtName(AXES.indexOf(label[0]), l)
}

function formatCoefficient(c: number, first: boolean): string {
  if (c === 1) return first ? '' : ''
  if (c === -1) return '−'
  return `${Number(c.toFixed(6))}·`
}

/**
 * The equalities of a solved d-matrix printed the way handbooks print them, one string per
 * independent parameter, e.g. `d14 = d25 = d36` (class -43m) or `d16 = d21 = −d22` (class 3m).
 * Entries depending on several parameters are printed as `d_x = a·d_p + b·d_q`.
 */
export function describeDMatrixEqualities(form: TensorForm): string[] {
  const matrix = formDMatrix(form)
  const single = new Map<string, string[]>()
  const mixed: string[] = []
  matrix.forEach((row, i) =>
    row.forEach((entry, l) => {
      if (entry.length === 0) return
      const name = voigtName(i, l)
      if (entry.length === 1) {
        const { parameter, coefficient } = entry[0]
        const list = single.get(parameter) ?? []
        if (name !== parameter) list.push(`${formatCoefficient(1 / coefficient, false)}${name}`)
        single.set(parameter, list)
      } else {
        mixed.push(
          `${name} = ${entry.map((e, k) => `${k > 0 ? (e.coefficient < 0 ? ' − ' : ' + ') : e.coefficient < 0 ? '−' : ''}${formatCoefficient(Math.abs(e.coefficient), true)}${e.parameter}`).join('')}`,
        )
      }
    }),
  )
  const lines = [...single.entries()].map(([p, others]) => [p, ...others].join(' = '))
  return [...lines, ...mixed]
}

/** Number of non-zero entries of the 3×6 d-matrix of a solved χ(2) form. */
export function countNonZeroVoigt(form: TensorForm): number {
  return formDMatrix(form)
    .flat()
    .filter((e) => e.length > 0).length
}
