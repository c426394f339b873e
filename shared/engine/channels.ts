/**
 * The channel computation behind the CLI and `POST /api/channels`: validate a request, take the
 * sample's lab-frame χ(N) (cached per group, cut, order), and apply rules 4–7 of the contract.
 * Lab frame (z = outward normal, x = reference); m = projection on +z; angles in degrees.
 *
 * Speed: what depends on one part of the request only — the pump with the order (projections,
 * sums, its description), the structure (distinct mirror lines, its step text), the sample (Q as
 * text) and rule 4's m for (pump, order, Q, n, window) — is memoised in bounded tables of frozen
 * records; every response is built from fresh arrays and objects, so a caller may change it freely.
 */
import type { ChannelRequest } from './request'
import type { Multipole, NormalEmission } from './selection-rules'
import type { CircularHandedness, PumpSpec } from './pump'
import type { Parity } from './mirror-parity'
import type { SampleTensor } from './sample-tensor'
import type { ChannelExplainInput } from './explain'
import { parseChannelRequest } from './request'
import { prepareSampleTensor, sampleParityAt } from './sample-tensor'
import { describeCircularHandedness, describePump, pumpParity, pumpProjections, signedList } from './pump'
import { allowedFromSums, findAllowedMultipoles, findNormalEmission, harmonicParity, sumProjections } from './selection-rules'
import { normalizeMirror } from './structure'
import { describeStructureStep, explainRuleSteps, explainSample, formatSymmetricSet } from './explain'
import { BoundedCache } from './bounded-cache'
import { ENGINE_VERSION } from './version'

/** Parity of the harmonic under one structure mirror (only where rule 5 applies). */
export interface MirrorParityEntry {
  /** Mirror azimuth in degrees, as given in the request. */
  mirror: number
  sign: 1 | -1
}

/** The answer for one request. Fields `q` … `explain` are the CLI contract; the rest are extras. */
export interface ChannelResponse {
  /** Cylindrical content Q of the lab-frame tensor, ascending. */
  q: number[]
  /** Allowed projections m of the harmonic (rule 4), ascending, |m| ≤ window. */
  m: number[]
  /** Rule 5, one entry per request mirror where both parities are defined. */
  parity: MirrorParityEntry[]
  /** Rule 6. `polarizationDeg`: output polarisation fixed by a parity rule (if consistent). */
  normalEmission: NormalEmission & { polarizationDeg?: number; suppressedByParity?: boolean }
  /** Rule 7: allowed multipoles, ordered by l, then m, then E before M. */
  multipoles: Multipole[]
  /** Derivation steps in plain language. */
  explain: string[]
  engineVersion: string
  /** Weight of each q (sums to 1). */
  qWeights: { q: number; weight: number }[]
  /** For a circular pump: the physical handedness words of its m. */
  pumpHandedness?: CircularHandedness
}

/** Validate `request` (throws EngineError with `field`) and compute its harmonic channels. */
export function computeChannels(request: unknown): ChannelResponse {
  return evaluateChannels(parseChannelRequest(request))
}

/** What a (pump, order) pair fixes for every evaluation: its projections, their N-fold sums, texts. */
interface PumpOrderFacts {
  /** Serial number of this record (part of the keys of {@link allowedMemo}). */
  id: number
  projections: readonly number[]
  sums: readonly number[]
  sumsText: string
  pumpText: string
}

/** What a structure (rotation order, mirror list) fixes: its distinct mirror lines and the step text. */
interface StructureFacts {
  rotationOrder: number
  /** A private copy of the mirror list the record was made for. */
  mirrors: readonly number[]
  /** Positions in the mirror list of the first mirror of each distinct line. */
  picks: readonly number[]
  /** `normalizeMirror` of each picked mirror. */
  lines: readonly number[]
  text: string
}

/** What a sample fixes for the rules: Q printed as a symmetric set, and a small number naming Q. */
interface SampleFacts {
  qText: string
  /** Serial number of this Q among the Q seen so far (−1 once too many were seen). */
  qId: number
}

/** Rule 4's answer for (pump sums, Q, n, window): m, ascending, and m printed with signs. */
interface AllowedM {
  m: readonly number[]
  text: string
}

const MEMO_LIMIT = 4096
/** Longer mirror lists or explicit pump m lists are not memoised, so no entry can grow large. */
const MAX_MEMO_LIST = 64
const pumpMemo = new BoundedCache<string, PumpOrderFacts>(MEMO_LIMIT)
const structureMemo = new BoundedCache<string, StructureFacts>(MEMO_LIMIT)
/** Direct-mapped front of `structureMemo`: a slot holds the last structure hashed to it. */
const STRUCTURE_SLOTS = 256
const recentStructures: (StructureFacts | undefined)[] = new Array(STRUCTURE_SLOTS).fill(undefined)

/**
 * Rule 4 answers under one number: ((pump-facts id · 2^13 + Q id) · 2^9 + n) · 2^7 + window, which
 * stays below 2^53 while ids are below 2^24. Ids are handed out afresh only after this memo is
 * emptied together with every record that carries an id.
 */
const allowedMemo = new BoundedCache<number, AllowedM>(MEMO_LIMIT)
const MAX_PUMP_FACTS_IDS = 2 ** 24
const MAX_Q_IDS = 2 ** 13
let nextPumpFactsId = 0
/** Q as `q.join(',')` → id (Q ⊂ {−6 … 6} because |q| ≤ rank ≤ 6, so a few dozen in practice). */
const qIds = new Map<string, number>()
let sampleFactsOf = new WeakMap<SampleTensor, SampleFacts>()

/** Empty the memos of {@link evaluateChannels} (tests compare cold and warm answers). */
export function clearChannelMemos(): void {
  pumpMemo.clear()
  structureMemo.clear()
  recentStructures.fill(undefined)
  forgetIds()
}

/** Empty every memo keyed by ids, and the records carrying them, so ids can start again at 0. */
function forgetIds(): void {
  allowedMemo.clear()
  pumpMemo.clear()
  nextPumpFactsId = 0
  qIds.clear()
  sampleFactsOf = new WeakMap()
}

/**
 * A key that tells pumps apart wherever their projections, sums or description differ, or
 * undefined for a pump whose fields are not of the validated types, or whose m list is long (such a
 * pump is not memoised).
 */
function pumpKey(pump: PumpSpec, order: number): string | undefined {
  switch (pump.type) {
    case 'circular': return typeof pump.m === 'number' ? `c|${pump.m}|${order}` : undefined
    case 'linear': return typeof pump.angle === 'number' ? `l|${pump.angle}|${order}` : undefined
    case 'vortex': return typeof pump.spin === 'number' && typeof pump.charge === 'number' ? `v|${pump.spin}|${pump.charge}|${order}` : undefined
    case 'explicit': {
      const { m, parity } = pump
      if (!Array.isArray(m) || m.length > MAX_MEMO_LIST || !m.every(isNumber)) return undefined
      if (parity === undefined) return `x|${m.join(',')}|-|${order}`
      return typeof parity.mirror === 'number' && typeof parity.sign === 'number' ? `x|${m.join(',')}|${parity.mirror}|${parity.sign}|${order}` : undefined
    }
    case 'elliptical':
    case 'radial':
    case 'azimuthal': return `${pump.type}|${order}`
    default: return undefined
  }
}

function isNumber(v: unknown): boolean {
  return typeof v === 'number'
}

function pumpOrderFacts(pump: PumpSpec, order: number): PumpOrderFacts {
  const key = typeof order === 'number' ? pumpKey(pump, order) : undefined
  const hit = key === undefined ? undefined : pumpMemo.get(key)
  if (hit) return hit
  if (nextPumpFactsId >= MAX_PUMP_FACTS_IDS) forgetIds()
  const projections = Object.freeze(pumpProjections(pump))
  const sums = Object.freeze(sumProjections(projections, order))
  const facts: PumpOrderFacts = Object.freeze({
    id: key === undefined ? -1 : nextPumpFactsId++, projections, sums, sumsText: signedList(sums), pumpText: describePump(pump),
  })
  return key === undefined ? facts : pumpMemo.set(key, facts)
}

function structureFacts(rotationOrder: number, mirrors: readonly number[]): StructureFacts {
  const slot = structureSlot(rotationOrder, mirrors)
  const seen = slot < 0 ? undefined : recentStructures[slot]
  if (seen !== undefined && isSameStructure(seen, rotationOrder, mirrors)) return seen
  if (slot < 0) return describeStructure(rotationOrder, mirrors)
  const key = `${rotationOrder}|${mirrors.join(',')}`
  const facts = structureMemo.get(key) ?? structureMemo.set(key, describeStructure(rotationOrder, mirrors))
  recentStructures[slot] = facts
  return facts
}

/**
 * Slot of a structure, or −1 when a mirror (or n) is not a number, holes too, or the list is long:
 * those are not memoised.
 */
function structureSlot(rotationOrder: number, mirrors: readonly number[]): number {
  if (typeof rotationOrder !== 'number' || mirrors.length > MAX_MEMO_LIST) return -1
  let h = Math.imul(rotationOrder | 0, 0x9e3779b1) ^ mirrors.length
  for (let i = 0; i < mirrors.length; i++) {
    const v = mirrors[i]
    if (typeof v !== 'number') return -1
    h = Math.imul(h ^ ((v * 1024) | 0), 0x85ebca6b)
  }
  return (h ^ (h >>> 15)) & (STRUCTURE_SLOTS - 1)
}

/** Same rotation order and mirror list (===, which implies the same key string). */
function isSameStructure(f: StructureFacts, rotationOrder: number, mirrors: readonly number[]): boolean {
  if (f.rotationOrder !== rotationOrder || f.mirrors.length !== mirrors.length) return false
  for (let i = 0; i < mirrors.length; i++) if (f.mirrors[i] !== mirrors[i]) return false
  return true
}

function describeStructure(rotationOrder: number, mirrors: readonly number[]): StructureFacts {
  const picks: number[] = []
  const lines: number[] = []
  const seen = new Set<number>()
  for (let i = 0; i < mirrors.length; i++) {
    if (!(i in mirrors)) continue
    const k = normalizeMirror(mirrors[i])
    if (seen.has(k)) continue
    seen.add(k)
    picks.push(i)
    lines.push(k)
  }
  const text = describeStructureStep(rotationOrder, mirrors.length, picks.map((i) => mirrors[i]))
  return Object.freeze({
    rotationOrder, mirrors: Object.freeze(mirrors.slice()), picks: Object.freeze(picks), lines: Object.freeze(lines), text,
  })
}

function sampleFacts(sample: SampleTensor): SampleFacts {
  let facts = sampleFactsOf.get(sample)
  if (facts === undefined) {
    const q = sample.content.q
    const qKey = q.join(',')
    let id = qIds.get(qKey)
    if (id === undefined && qIds.size < MAX_Q_IDS) qIds.set(qKey, (id = qIds.size))
    facts = Object.freeze({ qText: q.length ? formatSymmetricSet(q) : '', qId: id ?? -1 })
    sampleFactsOf.set(sample, facts)
  }
  return facts
}

/**
 * Rule 4 for (pump, order) × Q × n × window, memoised under one number when every part is a small
 * non-negative integer (all validated requests); other inputs are computed each time.
 */
function allowedM(pumpFacts: PumpOrderFacts, q: readonly number[], qId: number, n: number, window: number): AllowedM {
  const memo = pumpFacts.id >= 0 && qId >= 0 && Number.isInteger(n) && n >= 0 && n < 512 && Number.isInteger(window) && window >= 0 && window < 128
  const key = memo ? ((pumpFacts.id * MAX_Q_IDS + qId) * 512 + n) * 128 + window : -1
  if (memo) {
    const hit = allowedMemo.get(key)
    if (hit) return hit
  }
  // m stays a plain array (copying a frozen one is slow); it is private: callers get copies.
  const m = allowedFromSums(pumpFacts.sums, q, n, window)
  const found: AllowedM = Object.freeze({ m, text: m.length ? signedList(m) : 'none' })
  if (memo) allowedMemo.set(key, found)
  return found
}

/** Compute the channels of an already validated request. */
export function evaluateChannels(req: ChannelRequest): ChannelResponse {
  const { crystal, pump, order } = req
  const sample = prepareSampleTensor({
    pointGroup: crystal.pointGroup, normal: crystal.normal, reference: crystal.reference, azimuthDeg: crystal.azimuthDeg,
    order, surface: req.surface, symmetry: req.kleinman ? 'kleinman' : 'intrinsic',
  })
  const q = sample.content.q
  const facts = pumpOrderFacts(pump, order) // before sampleFacts: running out of ids renews both
  const qFacts = sampleFacts(sample)
  const n = req.structure.rotationOrder
  const allowed = allowedM(facts, q, qFacts.qId, n, req.window)
  const m = allowed.m.slice()
  const structure = structureFacts(n, req.structure.mirrors)
  const mirrors: ChannelExplainInput['mirrors'][number][] = []
  const parity: MirrorParityEntry[] = []
  for (let i = 0; i < structure.picks.length; i++) {
    const mirror = req.structure.mirrors[structure.picks[i]]
    const tensor = q.length ? sampleParityAt(sample, structure.lines[i]) : (0 as Parity)
    const pumpP = pumpParity(pump, mirror)
    const result = harmonicParity(tensor, pumpP, order)
    mirrors.push({ mirror, tensor, pump: pumpP, result })
    if (result !== 0) parity.push({ mirror, sign: result as 1 | -1 })
  }
  const normalEmission: ChannelResponse['normalEmission'] = findNormalEmission(m, pump.type === 'circular' ? pump.m : undefined)
  if (normalEmission.m.length === 2 && parity.length > 0) {
    const lines = new Set(parity.map((p) => normalizeMirror(p.sign === 1 ? p.mirror : p.mirror + 90)))
    if (lines.size === 1) normalEmission.polarizationDeg = [...lines][0]
    else normalEmission.suppressedByParity = true
  }
  const multipoles = findAllowedMultipoles(m, parity.map((p) => p.sign), req.lmax)
  const explain = explainSample(sample, crystal).slice()
  const steps = explainRuleSteps({
    pump, order, pumpSums: facts.sums, q, rotationOrder: n, mirrorCount: req.structure.mirrors.length,
    window: req.window, allowedM: m, mirrors, normalEmission, multipoles, lmax: req.lmax,
  }, { pump: facts.pumpText, structure: structure.text, pumpSums: facts.sumsText, q: qFacts.qText, allowedM: allowed.text })
  for (let i = 0; i < steps.length; i++) explain.push(steps[i])
  const weights = sample.content.weights
  const qWeights: ChannelResponse['qWeights'] = new Array(weights.length)
  for (let i = 0; i < weights.length; i++) qWeights[i] = { q: weights[i].q, weight: weights[i].weight }
  const response: ChannelResponse = { q: q.slice(), m, parity, normalEmission, multipoles, explain, engineVersion: ENGINE_VERSION, qWeights }
  if (pump.type === 'circular') response.pumpHandedness = describeCircularHandedness(pump.m)
  return response
}
