/**
 * Plain-language derivation steps for a channel evaluation, e.g. "the (001) cut of a -43m crystal
 * carries Δm = ±2 only". Angles in degrees, lab frame; vectors in the crystal Cartesian frame.
 */
import type { SampleTensor } from './sample-tensor'
import type { Parity } from './mirror-parity'
import type { PumpSpec } from './pump'
import type { NormalEmission, Multipole } from './selection-rules'
import type { Vec3 } from './linalg'
import { describeDMatrixEqualities } from './voigt'
import { formatDirection } from './directions'
import { describePump, signed, signedList } from './pump'
import { structureGroupName } from './structure'

/** Name of a cut: Miller plane for cubic crystals, X/Y/Z-cut or the Cartesian normal otherwise. */
export function describeCut(normal: Vec3, isCubic: boolean): string {
  if (isCubic) return `${formatDirection(normal, true)} cut`
  const axes = ['X', 'Y', 'Z']
  const i = normal.findIndex((v, k) => Math.abs(v) > 0 && normal.every((w, j) => j === k || w === 0))
  return i >= 0 ? `${axes[i]}-cut` : `cut with normal ${formatDirection(normal)}`
}

/** Format a symmetric set: {0, ±2, ±3}. */
export function formatSymmetricSet(values: readonly number[]): string {
  const abs = [...new Set(values.map(Math.abs))].sort((a, b) => a - b)
  return abs
    .flatMap((a) =>
      a === 0
        ? ['0']
        : values.includes(a) && values.includes(-a)
          ? [`±${a}`]
          : values.filter((v) => Math.abs(v) === a).map(signed),
    )
    .join(', ')
}

const pct = (w: number) => `${(100 * w).toFixed(w < 0.1 ? 1 : 0)}%`

/** Derivation steps that depend only on the sample tensor (the channel path keeps them with its cached sample). */
export function explainSample(
  sample: SampleTensor,
  cut: { normal: Vec3; reference: Vec3; azimuthDeg: number },
): string[] {
  const { group, form, content } = sample
  const N = form.order
  const notes: string[] = []
  const perm = form.symmetry === 'kleinman' ? 'Kleinman' : 'intrinsic permutation'
  const forms =
    N === 2 && form.independentCount > 0
      ? `: ${describeDMatrixEqualities(form).join('; ')} (d = χ(2)/2, SHG convention, no factors of 2)`
      : ''
  if (sample.isSurface)
    notes.push(
      `surface: the bulk tensor of ${group.symbol} is replaced by the isotropic-interface χ(${N}) (class ∞m, z = normal) with ${form.independentCount} independent component${form.independentCount === 1 ? '' : 's'}${forms}`,
    )
  else if (form.independentCount === 0)
    notes.push(
      `χ(${N}) vanishes in the bulk of class ${group.symbol} (${group.schoenflies})${group.isCentrosymmetric && N % 2 === 0 ? ': the class contains inversion, so every even-order bulk susceptibility is zero' : ''}`,
    )
  else
    notes.push(
      `χ(${N}) of class ${group.symbol} (${group.schoenflies}, standard setting) has ${form.independentCount} independent component${form.independentCount === 1 ? '' : 's'} (${perm} symmetry)${forms}`,
    )
  const f = sample.frame
  notes.push(
    `lab frame: z ∥ ${formatDirection(cut.normal)}, x ∥ ${formatDirection([f[0], f[1], f[2]])} (reference ${formatDirection(cut.reference)} projected into the cut plane${cut.azimuthDeg ? `, rotated by ${cut.azimuthDeg}°` : ''}), y = z × x ∥ ${formatDirection([f[3], f[4], f[5]])}`,
  )
  const who = sample.isSurface
    ? `the isotropic interface`
    : `the ${describeCut(cut.normal, group.isCubic)} of a ${group.symbol} crystal`
  if (content.q.length === 0)
    notes.push(`${who} has no χ(${N}) at all: Q is empty and no harmonic of order ${N} is generated`)
  else {
    const weights = content.weights
      .filter((w) => w.q >= 0)
      .map((w) => `${w.q === 0 ? '0' : `±${w.q}`}: ${pct(w.q === 0 ? w.weight : 2 * w.weight)}`)
    notes.push(
      `${who} carries Δm = ${formatSymmetricSet(content.q)} only (weights ${weights.join(', ')}); Q does not depend on the in-plane azimuth`,
    )
  }
  return notes
}

/** Everything the per-evaluation steps need. */
export interface ChannelExplainInput {
  pump: PumpSpec
  order: number
  pumpSums: readonly number[]
  q: readonly number[]
  rotationOrder: number
  mirrorCount: number
  window: number
  allowedM: readonly number[]
  mirrors: readonly { mirror: number; tensor: Parity; pump: Parity; result: Parity }[]
  normalEmission: NormalEmission & { polarizationDeg?: number; suppressedByParity?: boolean }
  multipoles: readonly Multipole[]
  lmax: number
}

function parityWord(p: Parity): string {
  return p === 1 ? 'even' : p === -1 ? 'odd' : 'without parity'
}

/** Steps of rules 4–7 for one evaluation. */
export function explainRules(x: ChannelExplainInput): string[] {
  return explainRuleSteps(x, {
    pump: describePump(x.pump),
    structure: describeStructureStep(
      x.rotationOrder,
      x.mirrorCount,
      x.mirrors.map((m) => m.mirror),
    ),
    pumpSums: signedList(x.pumpSums),
    q: x.q.length ? formatSymmetricSet(x.q) : '',
    allowedM: x.allowedM.length ? signedList(x.allowedM) : 'none',
  })
}

/**
 * Texts of {@link explainRules} that depend on one part of the request only (pump, structure,
 * pump sums, sample Q), so a caller may form them once and reuse them.
 */
export interface RuleStepTexts {
  /** {@link describePump} of the pump. */
  pump: string
  /** {@link describeStructureStep} of the structure. */
  structure: string
  /** The pump sums as signed integers joined by `, `. */
  pumpSums: string
  /** {@link formatSymmetricSet} of Q, or '' when Q is empty. */
  q: string
  /** The allowed m as signed integers joined by `, `, or 'none'. */
  allowedM: string
}

/** The structure step: group name, rotation order and the (distinct) mirrors, in degrees, as given. */
export function describeStructureStep(rotationOrder: number, mirrorCount: number, mirrors: readonly number[]): string {
  const n = rotationOrder
  const group = structureGroupName({ rotationOrder: n, mirrors: mirrorCount > 0 ? [0] : [] })
  // A body of revolution with mirrors has every vertical mirror: one phrase, not one per sampled line.
  const list =
    n === 0 && mirrors.length > 1
      ? `, every vertical mirror (the ${mirrors.length} lines given, ${mirrors[0]}° … ${mirrors[mirrors.length - 1]}°, stand for them)`
      : mirrors.length
        ? `, mirrors at ${mirrors.map((m) => `${m}°`).join(', ')}`
        : ', no mirrors given'
  return `structure: ${group}, rotation order ${n === 0 ? '∞ (body of revolution)' : n}${list}`
}

/** "15°" or "the mirrors 15°, 30° and 60°". */
function mirrorPhrase(mirrors: readonly number[]): string {
  const deg = mirrors.map((m) => `${m}°`)
  return deg.length === 1
    ? `the mirror ${deg[0]}`
    : `the mirrors ${deg.slice(0, -1).join(', ')} and ${deg[deg.length - 1]}`
}

/** Steps of rules 4–7 with the per-part texts already formed (see {@link RuleStepTexts}). */
export function explainRuleSteps(x: ChannelExplainInput, texts: RuleStepTexts): string[] {
  const n = x.rotationOrder
  const steps = [texts.pump, texts.structure]
  steps.push(
    `rule 4: m = (sum of ${x.order} pump projections ∈ {${texts.pumpSums}}) + (q ∈ {${texts.q}})${n === 0 ? '' : ` + k·${n}`} → m ∈ {${texts.allowedM}} for |m| ≤ ${x.window}`,
  )
  let hasEven = false
  let hasOdd = false
  // Mirrors without a parity rule are named in one line per reason, so a long list reads as one fact.
  const noTensor: number[] = []
  const noPump: number[] = []
  for (const r of x.mirrors) {
    if (r.result !== 0) {
      steps.push(
        `rule 5 at the mirror ${r.mirror}°: tensor ${parityWord(r.tensor)} × (pump ${parityWord(r.pump)})^${x.order} → the harmonic is ${parityWord(r.result)}`,
      )
      if (r.result === 1) hasEven = true
      else if (r.result === -1) hasOdd = true
    } else if (r.tensor === 0) noTensor.push(r.mirror)
    else noPump.push(r.mirror)
  }
  const one = (list: number[]) => list.length === 1
  if (noTensor.length)
    steps.push(
      `no parity rule at ${mirrorPhrase(noTensor)}: the rotated tensor is neither even nor odd under ${one(noTensor) ? 'it (it is not a mirror' : 'them (they are not mirrors'} of the cut crystal), so nothing is assumed`,
    )
  if (noPump.length)
    steps.push(
      `no parity rule at ${mirrorPhrase(noPump)}: the pump has no definite parity under ${one(noPump) ? 'it' : 'them'}`,
    )
  const ne = x.normalEmission
  if (ne.suppressedByParity)
    steps.push(
      `rule 6: rule 4 alone would allow emission along the normal (m = ${signedList(ne.m)}), but the parity rules demand different polarisations of that field, so it cancels by symmetry: no harmonic along the normal (zeroth order)`,
    )
  else if (!ne.allowed)
    steps.push(
      `rule 6: neither m = +1 nor m = −1 is allowed, so no harmonic is emitted along the normal (zeroth order)`,
    )
  else {
    const hand = ne.handedness
      ? ne.m.map((v, i) => `m = ${signed(v)} ${ne.handedness![i]}`).join(', ')
      : `m = ${signedList(ne.m)}`
    const pol =
      ne.polarizationDeg !== undefined ? `; the parity rule fixes its polarisation at ${ne.polarizationDeg}°` : ''
    steps.push(`rule 6: emission along the normal is allowed (${hand}${pol})`)
  }
  const zero = !x.allowedM.includes(0)
    ? ''
    : hasEven && hasOdd
      ? '; m = 0 is excluded by conflicting parity rules'
      : hasOdd
        ? '; at m = 0 only magnetic multipoles (odd)'
        : hasEven
          ? '; at m = 0 only electric multipoles (even)'
          : ''
  steps.push(`rule 7: ${x.multipoles.length} multipoles (E/M, 1 ≤ l ≤ ${x.lmax}, |m| ≤ l) are allowed${zero}`)
  return steps
}
