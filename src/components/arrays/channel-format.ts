import { describeCircularHandedness, type ChannelResponse, type Multipole, type PumpSpec } from '../../../shared/engine'

/** Plain words for the stored channel sets of an array (see server/services/inventory/array-channels.ts). */
const signed = (n: number): string => (n > 0 ? `+${n}` : n < 0 ? `−${-n}` : '0')

export const PUMP_LABELS: Record<string, string> = {
  'circular+1': 'Circular, m = +1',
  'circular-1': 'Circular, m = −1',
  'linear-along-flat': 'Linear along the flat (0°)',
  'linear-across-flat': 'Linear across the flat (90°)',
}
export const ORDER_LABELS: Record<number, string> = { 2: 'SHG (2ω)', 3: 'THG (3ω)' }

/** Handedness words of a circular pump (incident from above, i.e. along −z). */
export function pumpWords(pump: PumpSpec): string | null {
  if (pump.type !== 'circular') return null
  const h = describeCircularHandedness(pump.m)
  return `${h.rotationSeenFromAbove} seen from +z; incident from above: ${h.alongMinusZ.words}`
}

export const formatM = (m: number[]): string => (m.length ? m.map(signed).join(', ') : 'none')

export function formatParity(r: ChannelResponse): string {
  if (!r.parity.length) return 'no parity rule'
  return r.parity.map((p) => `${p.mirror}°: ${p.sign === 1 ? 'even' : 'odd'}`).join(' · ')
}

export function formatNormal(r: ChannelResponse): { isAllowed: boolean; text: string } {
  const n = r.normalEmission
  if (n.suppressedByParity)
    return { isAllowed: false, text: 'No emission along the normal: m = ±1 fits, but the mirror parities cancel it' }
  if (!n.allowed) return { isAllowed: false, text: 'No emission along the normal' }
  const ms = n.m.map(signed).join(', ')
  if (n.handedness?.length) return { isAllowed: true, text: `Yes, ${n.handedness.join(' and ')} (m = ${ms})` }
  if (n.polarizationDeg !== undefined)
    return { isAllowed: true, text: `Yes, linearly polarised at ${n.polarizationDeg}° from the flat` }
  return { isAllowed: true, text: `Yes (m = ${ms})` }
}

/** "E1(±1) M1(±1) E2(0, ±2)": multipoles grouped by type and l, m collapsed into ± pairs. */
export function formatMultipoles(list: Multipole[]): string[] {
  const groups = new Map<string, number[]>()
  for (const mp of list) {
    const key = `${mp.type}${mp.l}`
    groups.set(key, [...(groups.get(key) ?? []), mp.m])
  }
  return [...groups.entries()].map(([key, ms]) => {
    const abs = [...new Set(ms.map(Math.abs))].sort((a, b) => a - b)
    const parts = abs.map((a) =>
      a === 0 ? '0' : ms.includes(a) && ms.includes(-a) ? `±${a}` : signed(ms.includes(a) ? a : -a),
    )
    return `${key}(${parts.join(', ')})`
  })
}
