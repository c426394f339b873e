/**
 * The one number formatter of the app: a value with an SI prefix on its unit (12.5 nJ, 117.5 kW,
 * 25.98 kW/m²), significant digits with trailing zeros dropped. Used by the laser figures (server
 * answer and client pages alike) and by the session pages.
 */

const PREFIXES: readonly (readonly [number, string])[] = [
  [1e18, 'E'],
  [1e15, 'P'],
  [1e12, 'T'],
  [1e9, 'G'],
  [1e6, 'M'],
  [1e3, 'k'],
  [1, ''],
  [1e-3, 'm'],
  [1e-6, 'µ'],
  [1e-9, 'n'],
  [1e-12, 'p'],
  [1e-15, 'f'],
  [1e-18, 'a'],
]

/** Units that take a prefix (on their first symbol): W, J, Hz, W/m², J/m², m, s. */
const PREFIXABLE = /^(W|J|Hz|m|s)(\/.*)?$/

/** Units whose prefix would read oddly (nm, mm, µm, mrad, LB, RB, dimensionless): the number only. */
function takesPrefix(unit: string): boolean {
  return PREFIXABLE.test(unit)
}

/** A number with `digits` significant digits, trailing zeros dropped; exponent form outside 10⁻³–10⁶. */
export function formatNumber(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return '—'
  if (value === 0) return '0'
  const abs = Math.abs(value)
  if (abs >= 1e-3 && abs < 1e6) return String(Number(value.toPrecision(digits)))
  const [mant, exp] = value.toExponential(digits - 1).split('e')
  const sup = exp!
    .replace('+', '')
    .replace('-', '⁻')
    .replace(/\d/g, (d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)]!)
  return `${Number(mant)}×10${sup}`
}

/**
 * `value` in `unit` with an SI prefix: formatSi(1.25e-8, 'J') → "12.5 nJ", formatSi(25980, 'W/m²')
 * → "25.98 kW/m²". Seconds of 1 s and more and metres of 1 m and more are left unprefixed up to
 * 10⁶ (30000 s, 280 m read better than 30 ks, 0.28 km). Null or non-finite → "—".
 */
export function formatSi(value: number | null | undefined, unit: string, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—'
  const u = unit === '1' ? '' : unit
  const join = (n: string, p: string) => (u ? `${n} ${p}${u}` : n)
  if (value === 0 || !takesPrefix(u)) return join(formatNumber(value, digits), '')
  const abs = Math.abs(value)
  if ((u === 's' || u === 'm') && abs >= 1 && abs < 1e6)
    return join(String(Number(value.toPrecision(Math.max(digits, String(Math.trunc(abs)).length)))), '')
  const row = PREFIXES.find(([s]) => abs >= s * (1 - 5e-13))
  if (!row || abs >= 1e21) return join(formatNumber(value, digits), '')
  let [scale, prefix] = row
  let mant = Number((value / scale).toPrecision(digits))
  // 999.96 k rounds to 1000 k: move up one prefix.
  if (Math.abs(mant) >= 1000) {
    const up = PREFIXES[PREFIXES.indexOf(row) - 1]
    if (up) {
      ;[scale, prefix] = up
      mant = Number((value / scale).toPrecision(digits))
    }
  }
  return join(String(mant), prefix)
}
