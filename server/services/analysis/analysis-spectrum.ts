import {
  findHarmonicPeak,
  flagHarmonicPeak,
  readSpectrumText,
  type AnalysisFlag,
  type HarmonicPeak,
} from '../../../shared/analysis'
import type { ChannelResponse } from '../../../shared/engine'
import { asFieldError } from './analysis-model'

/** A spectrum analysed for the session's harmonic (pure: no database). */
export interface SpectrumAnswer {
  kind: 'spectrum_peak'
  order: number
  pumpWavelengthNm: number
  /** λ/2 and λ/3 of the pump, for the plot's markers. */
  harmonicsNm: { order: number; wavelengthNm: number }[]
  peak: HarmonicPeak
  flags: AnalysisFlag[]
  /** Engine's answer for the session's pump on the array: is emission along the normal allowed? */
  channel: { arrayId: number; arrayCode: string; normalAllowed: boolean; explain: string[] } | null
  /** Points to plot (nm, counts), at most 3000. */
  points: [number, number][]
  skipped: { line: number; reason: string }[]
  notes: string[]
  /** Harmonic power recorded in the session result (W), when a calibration factor was given. */
  harmonicPowerW: number | null
  calibrationNeeded: boolean
}

const spectrumField = (f: string) =>
  ['file', 'spectrum', 'sweep'].includes(f) ? 'file' : f === 'pumpWavelengthNm' ? 'session' : f

function thin(x: number[], y: number[], max = 3000): [number, number][] {
  const step = Math.max(1, Math.ceil(x.length / max))
  const out: [number, number][] = []
  for (let i = 0; i < x.length; i += step) out.push([x[i], y[i]])
  return out
}

export function runSpectrum(
  text: string,
  session: { wavelengthNm: number; harmonicOrder: number },
  calibration: number[] | undefined,
  channel: { arrayId: number; arrayCode: string; predicted: ChannelResponse } | null,
  wattsPerCount: number | undefined,
): SpectrumAnswer {
  try {
    const spectrum = readSpectrumText(text, { calibration })
    const peak = findHarmonicPeak(spectrum, { pumpWavelengthNm: session.wavelengthNm, order: session.harmonicOrder })
    const flags = channel ? flagHarmonicPeak(peak, session.harmonicOrder, channel.predicted) : []
    const notes = [...spectrum.notes]
    if (!channel) notes.push("No array picked: the peak is not checked against the engine's selection rules.")
    const harmonicPowerW = wattsPerCount !== undefined ? peak.integral * wattsPerCount : null
    if (harmonicPowerW === null)
      notes.push(
        'The integral is in detector counts × nm: give a calibration factor (W per count·nm) to record it as a harmonic power.',
      )
    return {
      kind: 'spectrum_peak',
      order: session.harmonicOrder,
      pumpWavelengthNm: session.wavelengthNm,
      harmonicsNm: [2, 3].map((n) => ({ order: n, wavelengthNm: session.wavelengthNm / n })),
      peak,
      flags,
      channel: channel
        ? {
            arrayId: channel.arrayId,
            arrayCode: channel.arrayCode,
            normalAllowed:
              channel.predicted.normalEmission.allowed && !channel.predicted.normalEmission.suppressedByParity,
            explain: channel.predicted.explain.slice(0, 6),
          }
        : null,
      points: thin(spectrum.wavelengthsNm, spectrum.intensity),
      skipped: spectrum.skipped.slice(0, 200),
      notes,
      harmonicPowerW,
      calibrationNeeded: harmonicPowerW === null,
    }
  } catch (err) {
    return asFieldError(err, spectrumField)
  }
}
