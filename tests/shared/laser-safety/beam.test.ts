import { describe, it, expect } from 'vitest'
import { nohd, peakFluence, peakIntensity, peakPower, perM2ToPerCm2, pulseEnergy } from '../../../shared/laser-safety'

// Derived-quantity check (plain physics, Siegman, Lasers, 1986; values from memory, arithmetic re-done here).
describe('derived quantities: 100 mW, 80 MHz, 100 fs, w₀ = 1 µm (Gaussian pulse and focus)', () => {
  const ep = pulseEnergy(0.1, 80e6)
  const ppk = peakPower(ep.value, 100e-15)
  const i0 = peakIntensity(ppk.value, 1)
  it('E_p = 1.25 nJ', () => expect(ep.value).toBeCloseTo(1.25e-9, 15))
  it('P_pk = 11.7 kW (Gaussian k = 0.94)', () => expect(ppk.value / 1e3).toBeCloseTo(11.75, 2))
  it('I₀ ≈ 7.5×10¹¹ W/cm²', () => expect(perM2ToPerCm2(i0.value) / 1e11).toBeCloseTo(7.5, 1))
  it('each value carries its formula', () => {
    expect(ep.formula).toContain('E_p = P/f')
    expect(ppk.formula).toContain('P_pk = k·E/τ')
    expect(i0.formula).toContain('I₀ = 2P_pk/(π w₀²)')
  })
})

describe('pulse shape and fluence (Siegman, Lasers, 1986; from memory)', () => {
  it('sech² uses k = 0.88', () => expect(peakPower(1e-9, 1e-13, 'sech2').value).toBeCloseTo(8800, 6))
  it('peak fluence 2E/(π w₀²): 1 nJ into w₀ = 1 µm → 63.7 mJ/cm²', () =>
    expect(perM2ToPerCm2(peakFluence(1e-9, 1).value)).toBeCloseTo(0.0637, 4))
})

describe('NOHD (ANSI Z136.1 form, from memory)', () => {
  it('is 0 when the exit beam is already below the MPE', () =>
    expect(nohd({ averagePowerW: 1e-6, mpeWm2: 16, exitDiameterMm: 2, divergenceMrad: 1 }).value).toBe(0))
  it('scales inversely with divergence', () => {
    const a = nohd({ averagePowerW: 1, mpeWm2: 16, exitDiameterMm: 2, divergenceMrad: 1 }).value
    const b = nohd({ averagePowerW: 1, mpeWm2: 16, exitDiameterMm: 2, divergenceMrad: 2 }).value
    expect(a / b).toBeCloseTo(2, 12)
  })
})
