import { describe, it, expect } from 'vitest'
import {
  SafetyInputError,
  checkExposure,
  classHint,
  correctionC4,
  en207ScaleNumbers,
  nohd,
  ocularMpe,
  pulseEnergy,
  LASER_SAFETY_CAUTION,
} from '../../../shared/laser-safety'
import { LASER_CAUTION } from '../../../shared/safety'

function fieldOf(fn: () => unknown): string {
  try {
    fn()
  } catch (e) {
    expect(e).toBeInstanceOf(SafetyInputError)
    return (e as SafetyInputError).field
  }
  throw new Error('did not throw')
}

describe('bad input → SafetyInputError naming the field', () => {
  it('negative power', () => expect(fieldOf(() => pulseEnergy(-1, 80e6))).toBe('averagePowerW'))
  it('wavelength 0', () => expect(fieldOf(() => correctionC4(0))).toBe('wavelengthNm'))
  it('NaN duration', () =>
    expect(fieldOf(() => ocularMpe({ edition: 'IEC-60825-1:2014', wavelengthNm: 800, durationS: Number.NaN }))).toBe(
      'durationS',
    ))
  it('NaN wavelength in the class hint', () =>
    expect(fieldOf(() => classHint({ wavelengthNm: Number.NaN, averagePowerW: 1 }))).toBe('wavelengthNm'))
  it('zero repetition rate', () =>
    expect(
      fieldOf(() =>
        checkExposure({
          edition: 'EU-2006/25/EC',
          wavelengthNm: 800,
          averagePowerW: 1,
          beamDiameterMm: 2,
          pulse: { durationS: 1e-13, repetitionRateHz: 0 },
        }),
      ),
    ).toBe('pulse.repetitionRateHz'))
  it('Infinity beam diameter', () =>
    expect(fieldOf(() => en207ScaleNumbers({ wavelengthNm: 800, averagePowerW: 1, beamDiameterMm: Infinity }))).toBe(
      'beamDiameterMm',
    ))
  it('negative exit diameter', () =>
    expect(fieldOf(() => nohd({ averagePowerW: 1, mpeWm2: 16, exitDiameterMm: -1, divergenceMrad: 1 }))).toBe(
      'exitDiameterMm',
    ))
  it('unknown edition', () =>
    expect(fieldOf(() => ocularMpe({ edition: 'ANSI' as never, wavelengthNm: 800, durationS: 1 }))).toBe('edition'))
  it('message is one line `field: reason` with a code', () => {
    try {
      pulseEnergy(-1, 1)
    } catch (e) {
      expect((e as SafetyInputError).message).toBe('averagePowerW: must be greater than 0, got -1')
      expect((e as SafetyInputError).code).toBe('OUT_OF_RANGE')
    }
  })
})

describe('caution string', () => {
  it('re-exports the shared laser caution for screens', () => expect(LASER_SAFETY_CAUTION).toBe(LASER_CAUTION))
})
