/**
 * Rotational-anisotropy harmonic generation at oblique incidence (docs/physics.md §6).
 *
 * Lab frame: z = the sample's outward normal, the plane of incidence is xz. The pump arrives from
 * above with k = (sin θ, 0, −cos θ); every beam has s = (0, 1, 0) and p = k × s, so the p-pump is
 * (cos θ, 0, sin θ), the reflected harmonic (k = (sin θ, 0, cos θ)) has p = (−cos θ, 0, sin θ) and
 * the transmitted one (k = (sin θ, 0, −cos θ)) p = (cos θ, 0, sin θ). A linear polarisation at
 * angle α is cos α p + sin α s (α = 0 is p, 90° is s), for the pump and the analyser alike.
 * The sample is turned by the azimuth φ about +z, counter-clockwise seen from +z:
 * χ(φ) = R(φ)·χ(0), so ê·χ(φ)⋮E…E = (R(−φ)ê)·χ(0)⋮(R(−φ)E)…, which is how it is evaluated.
 * Detected intensity (arbitrary units): I(φ) = |f·P(φ)|², P_i = χ_{ij…k} E_j … E_k.
 *
 * Optional Fresnel factors of a bare interface (ambient index 1, medium index n at the pump, N at
 * the harmonic; complex, Im ≥ 0 absorbing): the pump field inside is t_s ŝ + t_p (cos θ_t, 0, sin θ_t)
 * with the air→medium transmission coefficients, and the detected harmonic is the part of P along
 * the inside p or s vector of the outgoing wave (angle θ₂, sin θ₂ = sin θ / N) times the
 * medium→air coefficient, at the front face in reflection and at a parallel back face in transmission
 * (Born & Wolf, Principles of Optics, §1.5.2; Hecht, Optics, §4.6). Factors
 * common to both output polarisations (phase mismatch, depth) are left out; the surface term is
 * evaluated with the same inside fields.
 */
import { EngineError } from './errors'

/** A complex number [re, im]. */
export type Complex = readonly [number, number]

/** Where the harmonic is detected. */
export type Detection = 'reflection' | 'transmission'

/** The oblique-incidence geometry. Angles in degrees. */
export interface ObliqueGeometry {
  /** Angle of incidence θ in air, 0 ≤ θ < 90. */
  angleDeg: number
  detect: Detection
  /** Pump polarisation α from p toward s (0 = p, 90 = s). */
  pumpDeg: number
  /** Analyser β from p toward s (0 = p, 90 = s). */
  analyserDeg: number
  /** Complex indices at the pump (n) and at the harmonic (n2) for the Fresnel factors; absent: none. */
  fresnel?: { n: Complex; n2: Complex }
}

/** Fresnel coefficients of one beam crossing the bare interface. */
export interface FresnelCrossing {
  /** Transmission coefficients of the field amplitude (s and p). */
  ts: Complex
  tp: Complex
  /** cos and sin of the angle of the beam inside the medium (complex for an absorbing medium). */
  cosInside: Complex
  sinInside: Complex
}

/** The lab-frame pump field E (at φ = 0) and the detection vector f with I = |f·P|². */
export interface ObliqueFields {
  pump: readonly Complex[]
  detector: readonly Complex[]
}

const cmul = (a: Complex, b: Complex): Complex => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]]
const cdiv = (a: Complex, b: Complex): Complex => {
  const d = b[0] * b[0] + b[1] * b[1]
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d]
}
const cadd = (a: Complex, b: Complex): Complex => [a[0] + b[0], a[1] + b[1]]
const csqrt = (a: Complex): Complex => {
  const r = Math.hypot(a[0], a[1])
  const re = Math.sqrt((r + a[0]) / 2)
  const im = Math.sqrt(Math.max(0, (r - a[0]) / 2))
  return [re, a[1] < 0 ? -im : im]
}
const real = (x: number): Complex => [x, 0]

/**
 * Fresnel transmission through the interface between air (index 1, angle θ) and a medium of
 * complex index n. `direction` 'in': air → medium, t_s = 2cos θ/(cos θ + n cos θ_t),
 * t_p = 2cos θ/(cos θ_t + n cos θ); 'out': medium → air for the wave that leaves at θ,
 * t_s = 2n cos θ_t/(n cos θ_t + cos θ), t_p = 2n cos θ_t/(n cos θ + cos θ_t). Snell: sin θ_t = sin θ / n;
 * the root of cos θ_t is the one with Re(n cos θ_t) ≥ 0 (a wave that decays into an absorbing medium).
 * Born & Wolf §1.5.2; Hecht §4.6 (eqs. 4.42–4.45).
 */
export function fresnelCrossing(n: Complex, angleDeg: number, direction: 'in' | 'out'): FresnelCrossing {
  if (!(n[0] > 0) || !(n[1] >= 0) || !Number.isFinite(n[0]) || !Number.isFinite(n[1]))
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'fresnel',
      value: n,
      message: `the index must have Re n > 0 and Im n ≥ 0, got ${JSON.stringify(n)}`,
    })
  const a = (angleDeg * Math.PI) / 180
  const cos = real(Math.cos(a))
  const sinInside = cdiv(real(Math.sin(a)), n)
  let cosInside = csqrt(cadd(real(1), cmul([-sinInside[0], -sinInside[1]], sinInside)))
  if (cmul(n, cosInside)[0] < 0) cosInside = [-cosInside[0], -cosInside[1]]
  const nCosInside = cmul(n, cosInside)
  const nCos = cmul(n, cos)
  if (direction === 'in') {
    const two = real(2 * cos[0])
    return { ts: cdiv(two, cadd(cos, nCosInside)), tp: cdiv(two, cadd(cosInside, nCos)), cosInside, sinInside }
  }
  const two: Complex = [2 * nCosInside[0], 2 * nCosInside[1]]
  return { ts: cdiv(two, cadd(nCosInside, cos)), tp: cdiv(two, cadd(nCos, cosInside)), cosInside, sinInside }
}

/** Pump field and detection vector of a geometry (lab frame, sample at φ = 0). */
export function obliqueFields(g: ObliqueGeometry): ObliqueFields {
  if (!Number.isFinite(g.angleDeg) || g.angleDeg < 0 || g.angleDeg >= 90)
    throw new EngineError({
      code: 'OUT_OF_RANGE',
      field: 'incidence.angleDeg',
      value: g.angleDeg,
      allowed: '0 ≤ θ < 90',
      message: `the angle of incidence must be from 0 up to below 90 degrees, got ${JSON.stringify(g.angleDeg)}`,
    })
  const th = (g.angleDeg * Math.PI) / 180
  const al = (g.pumpDeg * Math.PI) / 180
  const be = (g.analyserDeg * Math.PI) / 180
  let ts: Complex = real(1),
    tp: Complex = real(1),
    c: Complex = real(Math.cos(th)),
    s: Complex = real(Math.sin(th))
  let Ts: Complex = real(1),
    Tp: Complex = real(1),
    C: Complex = c,
    S: Complex = s
  if (g.fresnel) {
    const pin = fresnelCrossing(g.fresnel.n, g.angleDeg, 'in')
    const out = fresnelCrossing(g.fresnel.n2, g.angleDeg, 'out')
    ;({ ts, tp } = pin)
    c = pin.cosInside
    s = pin.sinInside
    ;({ ts: Ts, tp: Tp } = out)
    C = out.cosInside
    S = out.sinInside
  }
  const ca = real(Math.cos(al)),
    sa = real(Math.sin(al))
  const pa = cmul(ca, tp)
  // p = k × s: (cos θ, 0, sin θ) for the downgoing pump and transmitted harmonic, (−cos θ, 0, sin θ) for the reflected
  // one.
  const pump: Complex[] = [cmul(pa, c), cmul(sa, ts), cmul(pa, s)]
  const cb = real(Math.cos(be)),
    sb = real(Math.sin(be))
  const pb = cmul(cb, Tp)
  const sign = g.detect === 'reflection' ? -1 : 1
  const px = cmul(pb, C)
  const detector: Complex[] = [[sign * px[0], sign * px[1]], cmul(sb, Ts), cmul(pb, S)]
  return { pump, detector }
}

/** f·χ⋮E…E for a real tensor of rank `rank` and complex 3-vectors (N = rank − 1 copies of E). */
function contract(t: Float64Array, rank: number, f: readonly Complex[], e: readonly Complex[]): Complex {
  // Contract the last index with E repeatedly, then the first with f.
  let re = Float64Array.from(t)
  let im = new Float64Array(t.length)
  for (let r = rank; r > 1; r--) {
    const n = re.length / 3
    const nre = new Float64Array(n),
      nim = new Float64Array(n)
    for (let i = 0; i < n; i++) {
      let a = 0,
        b = 0
      for (let k = 0; k < 3; k++) {
        const xr = re[3 * i + k],
          xi = im[3 * i + k]
        a += xr * e[k][0] - xi * e[k][1]
        b += xr * e[k][1] + xi * e[k][0]
      }
      nre[i] = a
      nim[i] = b
    }
    re = nre
    im = nim
  }
  let a = 0,
    b = 0
  for (let i = 0; i < 3; i++) {
    a += re[i] * f[i][0] - im[i] * f[i][1]
    b += re[i] * f[i][1] + im[i] * f[i][0]
  }
  return [a, b]
}

/** R(−φ)v for a complex 3-vector: the lab vector seen in the frame of the sample turned by φ. */
function unrotate(v: readonly Complex[], phi: number): Complex[] {
  const c = Math.cos(phi),
    s = Math.sin(phi)
  return [
    [c * v[0][0] + s * v[1][0], c * v[0][1] + s * v[1][1]],
    [-s * v[0][0] + c * v[1][0], -s * v[0][1] + c * v[1][1]],
    v[2],
  ]
}

function checkTensor(t: Float64Array): number {
  let rank = 0
  for (let n = t.length; n > 1 && n % 3 === 0; n /= 3) rank++
  if (3 ** rank !== t.length || rank < 3 || rank > 6)
    throw new EngineError({
      code: 'UNSUPPORTED',
      field: 'tensor',
      value: t.length,
      allowed: [27, 81, 243, 729],
      message: 'the polar pattern needs a χ(N) tensor of rank 3 to 6 (3^(N+1) components)',
    })
  return rank
}

/**
 * Raw detected intensity I(φ) = |f·χ(φ)⋮E…E|² (arbitrary units, the square of the tensor's) of a
 * lab-frame χ(N) (flat, 3^(N+1) components, at φ = 0) at each azimuth (degrees).
 */
export function predictObliquePattern(
  chiLab: Float64Array,
  geometry: ObliqueGeometry,
  azimuthsDeg: readonly number[],
): number[] {
  const rank = checkTensor(chiLab)
  const { pump, detector } = obliqueFields(geometry)
  return azimuthsDeg.map((deg) => {
    const phi = (deg * Math.PI) / 180
    const [a, b] = contract(chiLab, rank, unrotate(detector, phi), unrotate(pump, phi))
    return a * a + b * b
  })
}

/** Samples per turn used for the Fourier analysis: I(φ) of χ(N) has orders ≤ 2(N + 1) ≤ 12. */
export const FOURIER_SAMPLES = 64

/**
 * Amplitudes A_k (k = 0 … FOURIER_SAMPLES/2 − 1) of I(φ) = A₀ + Σ A_k cos(kφ − δ_k), from
 * {@link FOURIER_SAMPLES} equally spaced samples (exact for a trigonometric polynomial of degree < 32).
 */
export function fourierAmplitudes(samples: readonly number[]): number[] {
  const M = samples.length
  const out: number[] = []
  for (let k = 0; k < M / 2; k++) {
    let a = 0,
      b = 0
    for (let j = 0; j < M; j++) {
      const x = (2 * Math.PI * k * j) / M
      a += samples[j] * Math.cos(x)
      b += samples[j] * Math.sin(x)
    }
    const mod = Math.hypot(a, b) / M
    out.push(k === 0 ? mod : 2 * mod)
  }
  return out
}

/** The Fourier orders whose amplitude exceeds `relative` times the largest (none for an all-zero list). */
export function significantOrders(amplitudes: readonly number[], relative = 1e-9): number[] {
  const max = Math.max(0, ...amplitudes)
  if (!(max > 0)) return []
  return amplitudes.flatMap((a, k) => (a > relative * max ? [k] : []))
}

/** Squared Frobenius norm of a tensor (the scale that "zero" intensity is judged against). */
export function tensorScale(t: Float64Array): number {
  let s = 0
  let big = 0
  for (const v of t) big = Math.max(big, Math.abs(v))
  if (big === 0) return 0
  for (const v of t) s += (v / big) ** 2
  return s * big * big
}
