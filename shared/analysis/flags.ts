/**
 * Plain-language flags that compare a measured harmonic peak with the engine's selection rules
 * for the same sample and pump (emission along the normal, rule 6 of docs/physics.md §3).
 */
import type { ChannelResponse } from '../engine'
import type { HarmonicPeak } from './spectrum'

/** A flag shown next to a recorded harmonic signal. */
export interface AnalysisFlag {
  code: 'PEAK_IN_FORBIDDEN_CHANNEL' | 'NO_PEAK_IN_ALLOWED_CHANNEL' | 'PEAK_OFF_HARMONIC'
  severity: 'warning' | 'info'
  message: string
}

const ORDER_NAMES: Record<number, string> = { 2: 'second', 3: 'third', 4: 'fourth', 5: 'fifth' }

/**
 * Flags for a peak at λ_pump/N given the engine's answer for the sample (same order and pump).
 * A detected peak where emission along the normal is forbidden is a warning: the light comes
 * from something the bulk-symmetry model leaves out, or the sample or setup is not what was entered.
 */
export function flagHarmonicPeak(
  peak: HarmonicPeak,
  order: number,
  channel: Pick<ChannelResponse, 'normalEmission'>,
): AnalysisFlag[] {
  const flags: AnalysisFlag[] = []
  const name = ORDER_NAMES[order] ?? `order-${order}`
  const at = `${peak.peakWavelengthNm.toFixed(1)} nm`
  const forbidden = !channel.normalEmission.allowed || channel.normalEmission.suppressedByParity === true
  if (peak.isDetected && forbidden)
    flags.push({
      code: 'PEAK_IN_FORBIDDEN_CHANNEL',
      severity: 'warning',
      message: `A peak was found at ${at} (SNR ${peak.snr.toFixed(0)}), where the ${name} harmonic is expected, but for this sample and pump the symmetry rules forbid ${name}-harmonic emission along the normal. Check the sample's crystal, cut and pump settings; otherwise the light may come from surfaces or defects, from off-normal light collected by the objective, or from luminescence.`,
    })
  if (!peak.isDetected && !forbidden)
    flags.push({
      code: 'NO_PEAK_IN_ALLOWED_CHANNEL',
      severity: 'info',
      message: `No ${name}-harmonic peak above the noise near ${peak.expectedWavelengthNm.toFixed(1)} nm, although emission along the normal is allowed for this sample and pump.`,
    })
  if (peak.isDetected && Math.abs(peak.offsetNm) > Math.max(peak.fwhmNm, 1))
    flags.push({
      code: 'PEAK_OFF_HARMONIC',
      severity: 'info',
      message: `The peak at ${at} is ${Math.abs(peak.offsetNm).toFixed(1)} nm from λ/N = ${peak.expectedWavelengthNm.toFixed(1)} nm, more than its width: it may not be the harmonic (check the pump wavelength or look for luminescence).`,
    })
  return flags
}
