/**
 * The channel computation behind the CLI and `POST /api/channels`: validate a request, take the
 * sample's lab-frame χ(N) (cached per group, cut, order), and apply rules 4–7 of the contract.
 * Lab frame (z = outward normal, x = reference); m = projection on +z; angles in degrees.
 *
 * Speed: what depends on one part of the request only is kept in one bounded cache per thing, as
 * frozen records: the pump with the order (projections, sums, its description) and the structure
 * (distinct mirror lines, its step text) here, the sample (tensor, Q as text, parities, its steps)
 * in sample-tensor.ts. Rule 4 itself is a few additions and is computed every time. Every response
 * is built from fresh arrays and objects, so a caller may change it freely.
 */
import type { ChannelRequest } from './request'
import type { Multipole, NormalEmission } from './selection-rules'
import type { CircularHandedness, PumpSpec } from './pump'
import type { Parity } from './mirror-parity'
import type { ChannelExplainInput } from './explain'
import { parseChannelRequest } from './request'
import { entryParity, sampleEntry, sampleNotes } from './sample-tensor'
import { describeCircularHandedness, describePump, pumpParity, pumpProjections, signedList } from './pump'
import {
  allowedFromSums,
  findAllowedMultipoles,
  findNormalEmission,
  harmonicParity,
  sumProjections,
} from './selection-rules'
import { normalizeMirror } from './structure'
import { describeStructureStep, explainRuleSteps } from './explain'
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
  /** The cache key of this pump with its order (undefined: not cached). */
  key: string | undefined
  projections: readonly number[]
  sums: readonly number[]
  sumsText: string
  pumpText: string
}

/** What a structure (rotation order, mirror list) fixes: its distinct mirror lines and the step text. */
interface StructureFacts {
  /** Positions in the mirror list of the first mirror of each distinct line. */
  picks: readonly number[]
  /** `normalizeMirror` of each picked mirror. */
  lines: readonly number[]
  text: string
}

const CACHE_LIMIT = 4096
/** Longer mirror lists or explicit pump m lists are not cached, so no entry can grow large. */
const MAX_CACHED_LIST = 64
const pumpCache = new BoundedCache<string, PumpOrderFacts>(CACHE_LIMIT)
const structureCache = new BoundedCache<string, StructureFacts>(CACHE_LIMIT)
/**
 * Rule 4's answer per (pump, order, Q, n, window): m ascending (never handed out: callers get copies) and m as text.
 */
const allowedCache = new BoundedCache<string, AllowedM>(CACHE_LIMIT)

interface AllowedM {
  m: readonly number[]
  text: string
}

/** Empty the caches of {@link evaluateChannels} (tests compare cold and warm answers). */
export function clearChannelMemos(): void {
  pumpCache.clear()
  structureCache.clear()
  allowedCache.clear()
}

/**
 * A key that tells pumps apart wherever their projections, sums or description differ, or
 * undefined for a pump whose fields are not of the validated types, or whose m list is long (such a
 * pump is not cached).
 */
function pumpKey(pump: PumpSpec, order: number): string | undefined {
  switch (pump.type) {
    case 'circular':
      return typeof pump.m === 'number' ? `c|${pump.m}|${order}` : undefined
    case 'linear':
      return typeof pump.angle === 'number' ? `l|${pump.angle}|${order}` : undefined
    case 'vortex':
      return typeof pump.spin === 'number' && typeof pump.charge === 'number'
        ? `v|${pump.spin}|${pump.charge}|${order}`
        : undefined
    case 'explicit': {
      const { m, parity } = pump
      if (!Array.isArray(m) || m.length > MAX_CACHED_LIST || !m.every(isNumber)) return undefined
      if (parity === undefined) return `x|${m.join(',')}|-|${order}`
      return typeof parity.mirror === 'number' && typeof parity.sign === 'number'
        ? `x|${m.join(',')}|${parity.mirror}|${parity.sign}|${order}`
        : undefined
    }
    case 'elliptical':
    case 'radial':
    case 'azimuthal':
      return `${pump.type}|${order}`
    default:
      return undefined
  }
}

function isNumber(v: unknown): boolean {
  return typeof v === 'number'
}

function pumpOrderFacts(pump: PumpSpec, order: number): PumpOrderFacts {
  const key = typeof order === 'number' ? pumpKey(pump, order) : undefined
  const hit = key === undefined ? undefined : pumpCache.get(key)
  if (hit) return hit
  const projections = Object.freeze(pumpProjections(pump))
  const sums = Object.freeze(sumProjections(projections, order))
  const facts: PumpOrderFacts = Object.freeze({
    key,
    projections,
    sums,
    sumsText: signedList(sums),
    pumpText: describePump(pump),
  })
  return key === undefined ? facts : pumpCache.set(key, facts)
}

/**
 * Key of a structure, or undefined when n or a mirror is not a number (holes too) or the list is long: those are not
 * cached.
 */
function structureKey(rotationOrder: number, mirrors: readonly number[]): string | undefined {
  if (typeof rotationOrder !== 'number' || mirrors.length > MAX_CACHED_LIST) return undefined
  for (let i = 0; i < mirrors.length; i++) if (typeof mirrors[i] !== 'number') return undefined
  return `${rotationOrder}|${mirrors.join(',')}`
}

function structureFacts(rotationOrder: number, mirrors: readonly number[]): StructureFacts {
  const key = structureKey(rotationOrder, mirrors)
  if (key === undefined) return describeStructure(rotationOrder, mirrors)
  return structureCache.get(key) ?? structureCache.set(key, describeStructure(rotationOrder, mirrors))
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
  const text = describeStructureStep(
    rotationOrder,
    mirrors.length,
    picks.map((i) => mirrors[i]),
  )
  return Object.freeze({ picks: Object.freeze(picks), lines: Object.freeze(lines), text })
}

/**
 * Rule 4 for (pump, order) × Q × n × window; kept when the pump is and n and the window are integers (every validated
 * request).
 */
function allowedM(facts: PumpOrderFacts, q: readonly number[], qKey: string, n: number, window: number): AllowedM {
  const key =
    facts.key !== undefined && Number.isInteger(n) && Number.isInteger(window)
      ? `${facts.key}#${qKey}#${n}#${window}`
      : undefined
  const hit = key === undefined ? undefined : allowedCache.get(key)
  if (hit) return hit
  const m = allowedFromSums(facts.sums, q, n, window)
  const found: AllowedM = { m, text: m.length ? signedList(m) : 'none' }
  return key === undefined ? found : allowedCache.set(key, found)
}

/** Compute the channels of an already validated request. */
export function evaluateChannels(req: ChannelRequest): ChannelResponse {
  const { crystal, pump, order } = req
  const entry = sampleEntry({
    pointGroup: crystal.pointGroup,
    normal: crystal.normal,
    reference: crystal.reference,
    azimuthDeg: crystal.azimuthDeg,
    order,
    surface: req.surface,
    symmetry: req.kleinman ? 'kleinman' : 'intrinsic',
  })
  const sample = entry.sample
  const q = sample.content.q
  const facts = pumpOrderFacts(pump, order)
  const n = req.structure.rotationOrder
  const allowed = allowedM(facts, q, entry.qKey, n, req.window)
  const m = [...allowed.m]
  const structure = structureFacts(n, req.structure.mirrors)
  const mirrors: ChannelExplainInput['mirrors'][number][] = []
  const parity: MirrorParityEntry[] = []
  for (let i = 0; i < structure.picks.length; i++) {
    const mirror = req.structure.mirrors[structure.picks[i]]
    const tensor = q.length ? entryParity(entry, structure.lines[i]) : (0 as Parity)
    const pumpP = pumpParity(pump, mirror)
    const result = harmonicParity(tensor, pumpP, order)
    mirrors.push({ mirror, tensor, pump: pumpP, result })
    if (result !== 0) parity.push({ mirror, sign: result as 1 | -1 })
  }
  const normalEmission: ChannelResponse['normalEmission'] = findNormalEmission(
    m,
    pump.type === 'circular' ? pump.m : undefined,
  )
  if (normalEmission.m.length === 2 && parity.length > 0) {
    const lines = new Set(parity.map((p) => normalizeMirror(p.sign === 1 ? p.mirror : p.mirror + 90)))
    if (lines.size === 1) normalEmission.polarizationDeg = [...lines][0]
    else {
      // The mirror parities demand two different polarisations of one field: it vanishes, so the
      // zeroth order is not allowed after all (m keeps what rule 4 alone would allow).
      normalEmission.allowed = false
      normalEmission.suppressedByParity = true
    }
  }
  const multipoles = findAllowedMultipoles(
    m,
    parity.map((p) => p.sign),
    req.lmax,
  )
  // Spread, not slice(): V8 copies a frozen array with slice() some twenty times slower.
  const explain = [...sampleNotes(entry, crystal)]
  const steps = explainRuleSteps(
    {
      pump,
      order,
      pumpSums: facts.sums,
      q,
      rotationOrder: n,
      mirrorCount: req.structure.mirrors.length,
      window: req.window,
      allowedM: m,
      mirrors,
      normalEmission,
      multipoles,
      lmax: req.lmax,
    },
    {
      pump: facts.pumpText,
      structure: structure.text,
      pumpSums: facts.sumsText,
      q: entry.qText,
      allowedM: allowed.text,
    },
  )
  for (let i = 0; i < steps.length; i++) explain.push(steps[i])
  const weights = sample.content.weights
  const qWeights: ChannelResponse['qWeights'] = new Array(weights.length)
  for (let i = 0; i < weights.length; i++) qWeights[i] = { q: weights[i].q, weight: weights[i].weight }
  const response: ChannelResponse = {
    q: [...q],
    m,
    parity,
    normalEmission,
    multipoles,
    explain,
    engineVersion: ENGINE_VERSION,
    qWeights,
  }
  if (pump.type === 'circular') response.pumpHandedness = describeCircularHandedness(pump.m)
  return response
}
