import { describe, it, expect } from 'vitest'
import { emptySessionForm, fillFromSetup } from '../../../src/components/sessions/session-form'

describe('picking a laser setup in "Log a session"', () => {
  it('fills pulse duration and repetition rate (MHz) from the setup, and again from the next setup', () => {
    const form = emptySessionForm()
    const last = fillFromSetup(
      form,
      { pulseDurationFs: 150, repRateHz: 80e6 },
      { pulseDurationFs: null, repRateMhz: null },
    )
    expect([form.pulseDurationFs, form.repRateMhz]).toEqual([150, 80])
    fillFromSetup(form, { pulseDurationFs: 6e6, repRateHz: null }, last)
    expect([form.pulseDurationFs, form.repRateMhz]).toEqual([6e6, null])
  })

  it('keeps a value the person typed', () => {
    const form = emptySessionForm()
    const last = fillFromSetup(
      form,
      { pulseDurationFs: 150, repRateHz: 80e6 },
      { pulseDurationFs: null, repRateMhz: null },
    )
    form.pulseDurationFs = 180 // measured with an autocorrelator that day
    fillFromSetup(form, { pulseDurationFs: 100, repRateHz: 76e6 }, last)
    expect([form.pulseDurationFs, form.repRateMhz]).toEqual([180, 76])
  })
})
