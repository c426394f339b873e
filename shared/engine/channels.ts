/**
 * The channel computation behind the CLI and `POST /api/channels`: validate a request, take the
 * sample's lab-frame χ(N) (cached per group, cut, order), and apply rules 4–7 of the contract.
 * Lab frame (z = outward normal, x = reference); m = projection on +z; angles in degrees.
 */
import type { ChannelRequest } from './request'
import type { Multipole, NormalEmission } from './selection-rules'
import type { CircularHandedness } from './pump'
import type { Parity } from './mirror-parity'
import { parseChannelRequest } from './request'
import { prepareSampleTensor, sampleParity } from './sample-tensor'
import { describeCircularHandedness, pumpParity, pumpProjections } from './pump'
import { findAllowedHarmonics, findAllowedMultipoles, findNormalEmission, harmonicParity, sumProjections } from './selection-rules'
import { normalizeMirror } from './structure'
import { explainRules, explainSample } from './explain'
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

/** Compute the channels of an already validated request. */
export function evaluateChannels(req: ChannelRequest): ChannelResponse {
  const { crystal, pump, order } = req
  const sample = prepareSampleTensor({
    pointGroup: crystal.pointGroup, normal: crystal.normal, reference: crystal.reference, azimuthDeg: crystal.azimuthDeg,
    order, surface: req.surface, symmetry: req.kleinman ? 'kleinman' : 'intrinsic',
  })
  const q = sample.content.q
  const projections = pumpProjections(pump)
  const n = req.structure.rotationOrder
  const m = findAllowedHarmonics({ pumpProjections: projections, order, q, rotationOrder: n, window: req.window })
  const mirrors = distinctMirrors(req.structure.mirrors).map((mirror) => {
    const tensor = q.length ? sampleParity(sample, mirror) : (0 as Parity)
    const pumpP = pumpParity(pump, mirror)
    return { mirror, tensor, pump: pumpP, result: harmonicParity(tensor, pumpP, order) }
  })
  const parity = mirrors.filter((r) => r.result !== 0).map((r) => ({ mirror: r.mirror, sign: r.result as 1 | -1 }))
  const normalEmission: ChannelResponse['normalEmission'] = findNormalEmission(m, pump.type === 'circular' ? pump.m : undefined)
  if (normalEmission.m.length === 2 && parity.length > 0) {
    const lines = new Set(parity.map((p) => normalizeMirror(p.sign === 1 ? p.mirror : p.mirror + 90)))
    if (lines.size === 1) normalEmission.polarizationDeg = [...lines][0]
    else normalEmission.suppressedByParity = true
  }
  const multipoles = findAllowedMultipoles(m, parity.map((p) => p.sign), req.lmax)
  const explain = [
    ...explainSample(sample, crystal),
    ...explainRules({
      pump, order, pumpSums: sumProjections(projections, order), q, rotationOrder: n, mirrorCount: req.structure.mirrors.length,
      window: req.window, allowedM: m, mirrors, normalEmission, multipoles, lmax: req.lmax,
    }),
  ]
  const response: ChannelResponse = { q: [...q], m, parity, normalEmission, multipoles, explain, engineVersion: ENGINE_VERSION, qWeights: sample.content.weights.map((w) => ({ ...w })) }
  if (pump.type === 'circular') response.pumpHandedness = describeCircularHandedness(pump.m)
  return response
}

function distinctMirrors(mirrors: readonly number[]): number[] {
  const seen = new Set<number>()
  return mirrors.filter((psi) => {
    const k = normalizeMirror(psi)
    if (seen.has(k)) return false
    seen.add(k)
    return true
  })
}
