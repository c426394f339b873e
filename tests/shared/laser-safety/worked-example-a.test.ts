import { describe, it, expect } from 'vitest'
import {
  checkExposure,
  classHint,
  correctionC4,
  en207Labels,
  en207ScaleNumbers,
  nohd,
  ocularMpeIrradiance,
  peakPower,
  pulseEnergy,
  pulseTrainLimits,
  requiredOpticalDensity,
  circleAreaM2,
} from '../../../shared/laser-safety'

// Check case A (docs/laser-safety.md §9, worked by hand): Ti:sapphire, 800 nm, 100 fs, 80 MHz, 1 W, 2 mm beam, 1 mrad.
const beam = {
  wavelengthNm: 800,
  averagePowerW: 1,
  beamDiameterMm: 2,
  pulse: { durationS: 100e-15, repetitionRateHz: 80e6 },
}
const IEC = 'IEC-60825-1:2014' as const
const EU = 'EU-2006/25/EC' as const

describe('worked example A: common inputs (check case A, docs/laser-safety.md §9)', () => {
  it('C4 = 10^0.2 = 1.5849', () => expect(correctionC4(800).value).toBeCloseTo(1.5849, 4))
  it('pulse energy P/f = 12.5 nJ', () => expect(pulseEnergy(1, 80e6).value).toBeCloseTo(12.5e-9, 15))
  it('Gaussian peak power 0.94·E/τ ≈ 117 kW', () =>
    expect(peakPower(12.5e-9, 100e-15).value / 1e3).toBeCloseTo(117.5, 1))
  it('class hint: Class 4 (1 W > 0.5 W)', () => expect(classHint(beam).hint.value).toBe('4'))
})

describe('worked example A: the three rules and the edition difference (check case A, docs/laser-safety.md §9)', () => {
  it('rule 1, single pulse: H = 3.25×10⁻⁴ J/m² at the 7 mm aperture', () =>
    expect(checkExposure({ ...beam, edition: IEC }).singlePulse!.exposure.value).toBeCloseTo(3.25e-4, 6))

  it('rule 1, IEC 2014: ratio 0.32, passes', () => {
    const r = checkExposure({ ...beam, edition: IEC }).singlePulse!.ratio
    expect(r).toBeCloseTo(0.32, 2)
    expect(r).toBeLessThan(1)
  })

  it('rule 1, Directive: limit 2.38×10⁻⁴ J/m², ratio 1.37, fails; the edition matters', () => {
    const c = checkExposure({ ...beam, edition: EU })
    expect(c.singlePulse!.limit.value).toBeCloseTo(2.38e-4, 6)
    expect(c.singlePulse!.ratio).toBeCloseTo(1.37, 2)
    expect(c.singlePulse!.limit.edition).toBe(EU)
  })

  it('rule 2: MPE(T just under 10 s) = 16.04 W/m²; at 100 s 15.85 W/m²; allowed power 0.617 / 0.610 mW', () => {
    const a7 = circleAreaM2(7)
    const e10 = ocularMpeIrradiance({ edition: IEC, wavelengthNm: 800, durationS: 10 - 1e-9 }).value
    const e100 = ocularMpeIrradiance({ edition: IEC, wavelengthNm: 800, durationS: 100 }).value
    expect(e10).toBeCloseTo(16.04, 2)
    expect(e100).toBeCloseTo(15.85, 2)
    expect(e10 * a7 * 1e3).toBeCloseTo(0.617, 3)
    expect(e100 * a7 * 1e3).toBeCloseTo(0.61, 3)
  })

  it('rule 3, IEC 2014: 400 pulses per T_i = 5 µs, N = 2×10⁶ > 600, C5 = max(0.4, 0.133) = 0.4; not limiting', () => {
    const l = pulseTrainLimits({
      edition: IEC,
      wavelengthNm: 800,
      pulseDurationS: 100e-15,
      repetitionRateHz: 80e6,
      exposureDurationS: 10,
    })
    expect(l.grouping.pulsesPerGroup).toBeCloseTo(400, 6)
    expect(l.grouping.effectivePulseCount).toBeCloseTo(2e6, 0)
    expect(l.trainFactor.value).toBe(0.4)
    // The upper row at 5 µs gives 1.27×10⁻³ J/m² (2×10⁻³·C4); the library takes the lower
    // row at the boundary (18·C4·t^0.75 = 1.90×10⁻³·C4), i.e. 1.21×10⁻³ J/m². Both lie in this range.
    expect(l.pulseTrain.value).toBeGreaterThan(1.2e-3)
    expect(l.pulseTrain.value).toBeLessThanOrEqual(1.27e-3)
    const c = checkExposure({ ...beam, edition: IEC })
    expect(c.pulseTrain!.ratio).toBeLessThan(c.average!.ratio)
  })

  it('rule 3, Directive: groups of T_min = 18 µs, C_P = (5.56×10⁵)^−0.25 → 16.04 W/m², the same as rule 2', () => {
    const l = pulseTrainLimits({
      edition: EU,
      wavelengthNm: 800,
      pulseDurationS: 100e-15,
      repetitionRateHz: 80e6,
      exposureDurationS: 10,
    })
    expect(l.grouping.effectivePulseCount).toBeCloseTo(5.56e5, -3)
    expect(l.trainFactor.value).toBeCloseTo(5.5556e5 ** -0.25, 5)
    expect(l.pulseTrain.value / 18e-6).toBeCloseTo(16.04, 1)
  })
})

describe('worked example A: eyewear and hazard distance (check case A, docs/laser-safety.md §9)', () => {
  it('required OD = log10(1 W / 0.617 mW) = 3.21, both editions (average rule governs)', () => {
    for (const edition of [IEC, EU]) {
      const r = requiredOpticalDensity({ ...beam, edition })
      expect(r.od.value).toBeCloseTo(3.21, 2)
      expect(r.check.governing).toBe('average')
      expect(r.od.edition).toBe(edition)
      expect(r.od.formula).toContain('OD = log10(')
    }
  })

  it('100 s basis also gives OD 3.21', () =>
    expect(requiredOpticalDensity({ ...beam, edition: IEC, exposureDurationS: 100 }).od.value).toBeCloseTo(3.21, 2))

  it('using the 2 mm beam area instead of the aperture would give 4.30 (the library uses the aperture)', () => {
    const naive = Math.log10(1 / (16.04 * circleAreaM2(2)))
    expect(naive).toBeCloseTo(4.3, 2)
    expect(requiredOpticalDensity({ ...beam, edition: IEC }).od.value).toBeLessThan(naive)
  })

  it('NOHD with a = 2 mm, φ = 1 mrad, MPE 16.04 W/m² ≈ 280 m', () =>
    expect(nohd({ averagePowerW: 1, mpeWm2: 16.04, exitDiameterMm: 2, divergenceMrad: 1 }).value).toBeCloseTo(279.7, 0))

  it('EN 207: D 4.50 → LB5; M 3.65 → LB4 (N over 10 s = 8×10⁸); label D 800 LB5 + M 800 LB4', () => {
    const req = en207ScaleNumbers(beam)
    expect(req.map((r) => r.mode)).toEqual(['D', 'M'])
    expect(req[0]!.rawScale).toBeCloseTo(4.5, 2)
    expect(req[1]!.rawScale).toBeCloseTo(3.65, 2)
    expect(req.map((r) => r.label)).toEqual(['D 800 LB5', 'M 800 LB4'])
    expect(en207Labels(800, req)).toEqual(['D 800 LB5', 'M 800 LB4'])
  })

  it('EN 207 M with N counted over 5 s gives 3.57, also LB4', () => {
    const m = en207ScaleNumbers({ ...beam, countingIntervalS: 5 })[1]!
    expect(m.rawScale).toBeCloseTo(3.57, 2)
    expect(m.lb.value).toBe(4)
  })
})
