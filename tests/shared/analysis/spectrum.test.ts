import { describe, it, expect } from 'vitest'
import { computeChannels } from '../../../shared/engine'
import { findHarmonicPeak, flagHarmonicPeak, readSpectrumText, AnalysisError } from '../../../shared/analysis'
import { seededNormal } from './seeded'

// Analytic area of a Gaussian A·exp(−(λ−λ0)²/2σ²) is A·σ·√(2π).
const [amp, sigma, center] = [500, 1.2, 400]
const area = amp * sigma * Math.sqrt(2 * Math.PI)

function spectrumCsv(noise: number, seed: number): string {
  const gauss = seededNormal(seed)
  const rows = ['wavelength_nm;counts']
  for (let l = 360; l <= 440; l += 0.1) {
    const y = amp * Math.exp(-((l - center) ** 2) / (2 * sigma * sigma)) + 200 + 1.5 * (l - 400) + noise * gauss()
    rows.push(`${l.toFixed(2).replace('.', ',')};${y.toFixed(4).replace('.', ',')}`)
  }
  return rows.join('\n')
}

describe('harmonic peak in a spectrum (Gaussian on a sloped background, analytic area)', () => {
  it('integral within 2 % of the analytic area, background slope recovered', () => {
    const peak = findHarmonicPeak(readSpectrumText(spectrumCsv(2, 99)), { pumpWavelengthNm: 800, order: 2 })
    expect(peak.expectedWavelengthNm).toBe(400)
    expect(Math.abs(peak.peakWavelengthNm - 400)).toBeLessThan(0.3)
    expect(Math.abs(peak.integral / area - 1)).toBeLessThan(0.02)
    expect(peak.background.slopePerNm).toBeCloseTo(1.5, 0)
    expect(peak.fwhmNm).toBeCloseTo(2.3548 * sigma, 0)
    expect(peak.snr).toBeGreaterThan(50)
    expect(peak.isDetected).toBe(true)
  })

  it('can fail: without background subtraction the area would be far off', () => {
    const peak = findHarmonicPeak(readSpectrumText(spectrumCsv(0, 1)), { pumpWavelengthNm: 800, order: 2 })
    const width = peak.integrationWindowNm[1] - peak.integrationWindowNm[0]
    expect((peak.integral + 200 * width) / area - 1).toBeGreaterThan(0.5)
  })

  it('pixels with a linear calibration give the same wavelength axis', () => {
    const rows = ['pixel,counts']
    for (let p = 0; p < 800; p++) {
      const l = 360 + 0.1 * p
      rows.push(`${p},${(amp * Math.exp(-((l - center) ** 2) / (2 * sigma * sigma)) + 100).toFixed(5)}`)
    }
    const spectrum = readSpectrumText(rows.join('\n'), { calibration: [360, 0.1] })
    const peak = findHarmonicPeak(spectrum, { pumpWavelengthNm: 800, order: 2 })
    expect(Math.abs(peak.integral / area - 1)).toBeLessThan(0.02)
    expect(() => readSpectrumText(rows.join('\n'))).toThrow(/holds pixels; a wavelength calibration is needed/)
  })

  it('no data near λ/N: clear message', () => {
    expect(() => findHarmonicPeak(readSpectrumText(spectrumCsv(0, 1)), { pumpWavelengthNm: 1550, order: 2 })).toThrow(
      AnalysisError,
    )
    expect(() => findHarmonicPeak(readSpectrumText(spectrumCsv(0, 1)), { pumpWavelengthNm: 1550, order: 2 })).toThrow(
      /no point near λ\/N = 775.0 nm/,
    )
  })
})

// Common practice for -43m (docs/physics.md §4): a (001) zinc-blende disk under a linear pump has SH
// m ∈ {−4, −2, 0, 2, 4}: no emission along the normal. On (111) (Q = {0, ±3}) it is allowed.
describe('flag: a harmonic peak where the engine forbids emission along the normal', () => {
  const request = (normal: number[], reference: number[]) => ({
    crystal: { pointGroup: '-43m', normal, reference },
    structure: { rotationOrder: 0 },
    pump: { type: 'linear', angle: 0 },
    order: 2,
  })
  const peak = findHarmonicPeak(readSpectrumText(spectrumCsv(2, 5)), { pumpWavelengthNm: 800, order: 2 })

  it('(001) disk: warning in plain language', () => {
    const flags = flagHarmonicPeak(peak, 2, computeChannels(request([0, 0, 1], [1, 0, 0])))
    expect(flags.map((f) => f.code)).toEqual(['PEAK_IN_FORBIDDEN_CHANNEL'])
    expect(flags[0].message).toMatch(/forbid second-harmonic emission along the normal/)
  })

  it('(111) disk: no flag', () => {
    expect(flagHarmonicPeak(peak, 2, computeChannels(request([1, 1, 1], [1, -1, 0])))).toEqual([])
  })
})
