/**
 * Setup figures for a whole assessment: evaluation time, single pulses, limiting rule, EN 207 "none
 * needed", EN 208 per visible line, apertures, harmonics. Each numerical check names the published
 * worked example or table it comes from.
 */
import { describe, it, expect } from 'vitest'
import fc from 'fast-check'
import { setupFigures, type HazardInput } from '../../../shared/laser-figures'
import { circleAreaM2, ocularMpe, setupLines } from '../../../shared/laser-safety'
import { formatSi } from '../../../shared/format'

const A7 = circleAreaM2(7)
const setup = (over: Partial<HazardInput>): HazardInput => ({
  sourceType: 'cw',
  wavelengthsNm: [532],
  pulseDurationFs: null,
  repRateHz: null,
  maxAvgPowerMw: null,
  pulseEnergyUj: null,
  beamDiameterMm: 2,
  divergenceMrad: 1,
  harmonicOrders: [],
  laserClass: null,
  eyewear: [],
  ...over,
})
const line = (f: ReturnType<typeof setupFigures>, nm: number) =>
  f.wavelengths.find((w) => Math.abs(w.wavelengthNm - nm) < 0.5)!

describe('evaluation time per assessment', () => {
  // Health Physics Society list, "RE: Laser calculations" (23 June 2000, health.phys.iit.edu archive
  // 0006/msg00577): 651 nm, 2 mW diode, t = 0.25 s aversion response, ANSI Z136.1 Table 5:
  // MPE = 1.8·t^0.75 × 10⁻³ J/cm² = 6.36×10⁻⁴ J/cm² → 2.5×10⁻³ W/cm² (25.4 W/m²); the beam gives
  // 2 mW / 0.385 cm² = 5.19×10⁻³ W/cm² over the 7 mm pupil, about twice the MPE.
  it('651 nm, 2 mW, 0.25 s: MPE 25.4 W/m², exposure ≈ 2× the MPE (OD ≈ 0.31)', () => {
    const f = setupFigures(setup({ wavelengthsNm: [651], maxAvgPowerMw: 2 }), { exposureDurationS: 0.25 })
    const w = line(f, 651)
    expect(f.exposureDurationS).toBe(0.25)
    expect(w.exposureDurationS).toBe(0.25)
    expect(w.mpe!.value).toBeCloseTo(25.46, 1)
    expect(w.mpeRules[0]!.exposure!.value * 1e-4).toBeCloseTo(5.19e-3, 4)
    expect(w.od!.value).toBeCloseTo(Math.log10(5.197e-3 / 2.546e-3), 2)
    expect(f.exposureNotes).toEqual([])
  })

  // Directive 2006/25/EC Annex II Table 2.2, 700–1400 nm, 10–3×10⁴ s: E = 10·C_A·C_C W/m²; at 800 nm
  // C_A = 10^0.2 (Table 2.5) → 15.85 W/m², the same at 100 s and 30 000 s.
  it('800 nm at 100 s and 30 000 s: E = 10·C4 = 15.85 W/m²', () => {
    for (const t of [100, 30000]) {
      const w = line(setupFigures(setup({ wavelengthsNm: [800], maxAvgPowerMw: 1 }), { exposureDurationS: t }), 800)
      expect(w.exposureDurationS).toBe(t)
      expect(w.mpe!.value).toBeCloseTo(15.85, 2)
    }
  })

  // IEC 60825-1:2014 4.3 e: the 0.25 s time base belongs to Class 2/2M/3R in 400–700 nm (aversion
  // response); invisible beams give no aversion response, so 0.25 s must not be used for them.
  it('0.25 s is not used for 1064 nm: that line is evaluated over 10 s and the page is told why', () => {
    const f = setupFigures(setup({ wavelengthsNm: [1064, 532], maxAvgPowerMw: 50 }), { exposureDurationS: 0.25 })
    expect(line(f, 1064).exposureDurationS).toBe(10)
    expect(line(f, 532).exposureDurationS).toBe(0.25)
    expect(f.exposureNotes.join(' ')).toMatch(
      /1064 nm is not visible: the 0\.25 s aversion-response time applies to 400–700 nm only/,
    )
  })

  it('the default stays 10 s and the page is told what it stands for', () => {
    const f = setupFigures(setup({ maxAvgPowerMw: 1 }))
    expect(f.exposureDurationS).toBe(10)
    expect(f.exposureDurationLabel).toMatch(/default/)
  })
})

describe('single pulses', () => {
  // "Fundamentals of Medical/Aesthetic Lasers and IPLs" v1.2, ch. 1, "Optical Density – Protection
  // Level of Laser Safety Glasses" (online.flipbuilder.com/rbhw/egvu, p. 111): a 1 ns pulse at 1064 nm
  // has an ocular MPE of 5×10⁻⁶ J/cm² (the Directive/ICNIRP row 5×10⁻²·C_C J/m², C_C = 1); with
  // 12.5 J/cm² at the eye, OD = log10(12.5 / 5×10⁻⁶) = 6.4.
  it('1064 nm, 1 ns single pulse, 12.5 J/cm² at the eye: MPE 5×10⁻⁶ J/cm², OD 6.4', () => {
    // 1 ns is the boundary between the 2.7×10⁵·t^0.75·C_C row (4.8×10⁻⁶ J/cm² there) and the
    // 5×10⁻²·C_C row; the lower (more protective) one is taken, within 4 % of the published figure.
    const mpe = ocularMpe({ edition: 'EU-2006/25/EC', wavelengthNm: 1064, durationS: 1e-9 }).value * 1e-4
    expect(mpe).toBeGreaterThanOrEqual(4.8e-6)
    expect(mpe).toBeLessThanOrEqual(5e-6)
    expect(ocularMpe({ edition: 'EU-2006/25/EC', wavelengthNm: 1064, durationS: 2e-9 }).value * 1e-4).toBeCloseTo(
      5e-6,
      12,
    )
    const energyJ = 12.5e4 * A7 // 12.5 J/cm² over the 7 mm aperture
    const f = setupFigures(
      setup({ sourceType: 'pulsed', wavelengthsNm: [1064], pulseDurationFs: 1e6, pulseEnergyUj: energyJ * 1e6 }),
      { edition: 'EU-2006/25/EC' },
    )
    const w = line(f, 1064)
    expect(f.isSinglePulse).toBe(true)
    expect(f.missing).toEqual([])
    expect(w.limitingRule).toBe('singlePulse')
    expect(w.od!.value).toBeCloseTo(6.4, 1)
    expect(w.classHint!.value).toBe('4') // far above the Class 3B single-pulse AEL 0.15 J (IEC 60825-1:2014 Table 8)
    expect(w.en207!.scale.map((s) => s.unit)).toEqual(['LB']) // pulse mode only: no average power
  })

  it('pulse energy only (no rate) is no longer "missing: repetition rate"', () => {
    const f = setupFigures(
      setup({ sourceType: 'pulsed', wavelengthsNm: [532], pulseDurationFs: 10e6, pulseEnergyUj: 1 }),
    )
    expect(f.missing.join()).not.toMatch(/repetition rate/)
    expect(line(f, 532).od).not.toBeNull()
    expect(f.classHint).not.toBeNull()
  })

  it('a single-pulse source without its energy asks for it', () =>
    expect(setupFigures(setup({ sourceType: 'pulsed', pulseDurationFs: 10e6 })).missing.join()).toMatch(
      /pulse energy \(a single-pulse source needs it/,
    ))
})

describe('the limiting rule is the headline MPE', () => {
  // IEC 60825-1:2014 Annex A / 4.3 f: three rules; for N > 600 effective pulses in T > 0.25 s,
  // C5 = 5·N^−0.25 (≥ 0.4). 800 nm, 1 kHz, 100 fs, 4 W, 8 mm, T = 10 s: N = 10⁴, C5 = 0.5; the
  // pulse-train rule has the largest exposure/limit ratio.
  it('kHz amplifier: pulse train limits, with its value; average and single pulse beneath', () => {
    const f = setupFigures(
      setup({
        sourceType: 'pulsed',
        wavelengthsNm: [800],
        pulseDurationFs: 100,
        repRateHz: 1e3,
        maxAvgPowerMw: 4000,
        beamDiameterMm: 8,
      }),
    )
    const w = line(f, 800)
    expect(w.limitingRule).toBe('pulseTrain')
    expect(w.mpeRules.map((r) => r.rule)).toEqual(['pulseTrain', 'average', 'singlePulse'])
    expect(w.mpe!.value).toBe(w.mpeRules[0]!.limit.value)
    expect(w.mpe!.formula).toMatch(/^limiting rule: pulse train/)
  })

  // Rule 2 governs fs oscillators: for MHz trains the grouped pulse limit equals the average limit or
  // exceeds it (IEC 60825-1:2014 Annex A; C5 floor 0.4).
  it('80 MHz oscillator: the average rule limits', () =>
    expect(
      line(
        setupFigures(
          setup({
            sourceType: 'mode_locked',
            wavelengthsNm: [800],
            pulseDurationFs: 100,
            repRateHz: 80e6,
            maxAvgPowerMw: 1000,
          }),
        ),
        800,
      ).limitingRule,
    ).toBe('average'))
})

describe('EN 207 / EN 208', () => {
  // EN 207:2017 Table B.1 (as published in the EN 207 summary, en.wikipedia "EN 207", scale table):
  // M, > 1400 nm: LB = log(P_pk) − 11; D, > 1400 nm: log(E) − 3; "level numbers rounded upwards".
  // 1560 nm, 100 mW, 100 fs, 100 MHz, 2 mm: E = 3.18×10⁴ W/m² → 1.50 → LB2; P_pk = H/τ =
  // 3.18×10⁹ W/m² → −1.50 ≤ 0: no M requirement (not LB1).
  it('1560 nm, 100 mW, 100 fs, 100 MHz, 2 mm: D LB2, M none needed', () => {
    const w = line(
      setupFigures(
        setup({
          sourceType: 'mode_locked',
          wavelengthsNm: [1560],
          pulseDurationFs: 100,
          repRateHz: 100e6,
          maxAvgPowerMw: 100,
        }),
      ),
      1560,
    )
    expect(w.en207!.labels).toEqual(['D 1560 LB2'])
    expect(w.en207!.scale.map((s) => s.value)).toEqual([2, 0])
    expect(w.en207!.scale[1]!.formula).toMatch(/none needed/)
  })

  // EN 208:2009 Table B.1 (explained on laserveiligheid.com/EN208.php and lasermetusa.com EN 208
  // page): CW RBn up to 10^(n−3) W through 7 mm (RB1 10 mW … RB5 100 W). 532 nm, 50 mW → RB2.
  it('EN 208 for visible lines only, in the same shape as EN 207: 532 nm 50 mW → RB2; 1064 nm none', () => {
    const f = setupFigures(setup({ wavelengthsNm: [1064, 532], maxAvgPowerMw: 50 }))
    expect(line(f, 532).en208).toMatchObject({ labels: ['RB2'], scale: [{ value: 2, unit: 'RB' }] })
    expect(line(f, 1064).en208).toBeNull()
    // Below the Class 2 level (1 mW, EN 208:2009 scope) no alignment filter is needed.
    expect(line(setupFigures(setup({ maxAvgPowerMw: 0.5 })), 532).en208).toMatchObject({
      labels: [],
      scale: [{ value: 0 }],
    })
  })
})

describe('apertures named are the apertures used', () => {
  // Directive 2006/25/EC Annex II Table 2.2 (aperture column) and IEC 60825-1:2014 Annex A: beyond
  // 1400 nm 1 mm for t ≤ 0.3 s, 3.5 mm for t ≥ 10 s; 7 mm for 400–1400 nm.
  it('1550 nm at 10 s: 3.5 mm (1 mm per fs pulse); 775 nm: 7 mm', () => {
    const f = setupFigures(
      setup({
        sourceType: 'mode_locked',
        wavelengthsNm: [1550, 775],
        pulseDurationFs: 100,
        repRateHz: 100e6,
        maxAvgPowerMw: 100,
      }),
    )
    expect(line(f, 1550).apertureMm).toBe(3.5)
    expect(line(f, 775).apertureMm).toBe(7)
    const text = f.assumptions.join(' ')
    expect(text).toContain('1550 nm: 3.5 mm over 10 s, 1 mm per pulse')
    expect(text).not.toMatch(/7 mm limiting aperture/)
  })
})

describe('harmonics', () => {
  // Harmonic n of λ is λ/n (n photons give one; Boyd, Nonlinear Optics, 3rd ed., §1.1). A listed
  // harmonic does not generate harmonics of its own.
  it('1550/775/517 nm with orders 2 and 3: three lines, no 258 or 172 nm', () => {
    const lines = setupLines([1550, 775, 517], [2, 3])
    expect(lines.map((l) => [l.wavelengthNm, l.order, l.isListed])).toEqual([
      [1550, 1, true],
      [775, 2, true],
      [517, 3, true],
    ])
    const f = setupFigures(
      setup({
        sourceType: 'mode_locked',
        wavelengthsNm: [1550, 775, 517],
        harmonicOrders: [2, 3],
        pulseDurationFs: 100,
        repRateHz: 100e6,
        maxAvgPowerMw: 100,
      }),
    )
    expect(f.wavelengths.map((w) => Math.round(w.wavelengthNm))).toEqual([1550, 775, 517])
  })

  it('every listed fundamental is evaluated, each with its harmonics', () => {
    const lines = setupLines([1064, 800], [2])
    expect(lines.map((l) => [Math.round(l.wavelengthNm), l.order])).toEqual([
      [1064, 1],
      [532, 2],
      [800, 1],
      [400, 2],
    ])
  })
})

describe('units with SI prefixes (one formatter)', () => {
  // E = P/f = 1 W / 80 MHz = 12.5 nJ; P_pk = 0.94·E/τ = 117.5 kW for 100 fs (Gaussian factor 0.94).
  it('12.5 nJ, 117.5 kW, 25.98 kW/m²', () => {
    expect(formatSi(1 / 80e6, 'J')).toBe('12.5 nJ')
    expect(formatSi((0.94 * 12.5e-9) / 100e-15, 'W')).toBe('117.5 kW')
    expect(formatSi(25980, 'W/m²')).toBe('25.98 kW/m²')
    const f = setupFigures(
      setup({
        sourceType: 'mode_locked',
        wavelengthsNm: [800],
        pulseDurationFs: 100,
        repRateHz: 80e6,
        maxAvgPowerMw: 1000,
      }),
    )
    expect(f.pulseEnergy!.formula).toContain('1 W / 80 MHz')
  })
})

describe('sources a user can read', () => {
  it('no figure cites a repository file or a memory note', () => {
    const f = setupFigures(
      setup({
        sourceType: 'mode_locked',
        wavelengthsNm: [800, 1550],
        harmonicOrders: [2],
        pulseDurationFs: 100,
        repRateHz: 80e6,
        maxAvgPowerMw: 1000,
        eyewear: [],
      }),
    )
    const text = JSON.stringify(f)
    expect(text).not.toMatch(/FACTS|\.md|from memory|unverified|\[[VSM]\]/)
    expect(text).toContain('IEC 60825-1:2014 Table A.1')
    expect(text).toContain('EN 207:2017 Annex B')
  })
})

describe('invariants (fast-check, seeded)', () => {
  const opts = { seed: 20261204, numRuns: 150 }
  const input = fc.record({
    sourceType: fc.constantFrom('cw', 'pulsed', 'mode_locked') as fc.Arbitrary<HazardInput['sourceType']>,
    wavelengthsNm: fc.array(fc.double({ min: 350, max: 1900, noNaN: true }), { minLength: 1, maxLength: 3 }),
    pulseDurationFs: fc.option(fc.double({ min: 10, max: 1e12, noNaN: true }), { nil: null }),
    repRateHz: fc.option(fc.double({ min: 1, max: 1e9, noNaN: true }), { nil: null }),
    pulseEnergyUj: fc.option(fc.double({ min: 1e-3, max: 1e5, noNaN: true }), { nil: null }),
    beamDiameterMm: fc.double({ min: 0.1, max: 20, noNaN: true }),
    harmonicOrders: fc.subarray([2, 3, 4, 5]),
  })
  const T = fc.constantFrom(0.25, 1, 10, 100, 30000)

  // Required OD = log10(exposure/MPE) (EN 207:2017 Annex B): the exposure grows with the power.
  it('OD never decreases when the power increases (every line, every evaluation time)', () => {
    fc.assert(
      fc.property(
        input,
        fc.double({ min: 1e-3, max: 1e5, noNaN: true }),
        fc.double({ min: 1, max: 1000, noNaN: true }),
        T,
        (i, mw, k, t) => {
          const base = { ...i, divergenceMrad: 1, laserClass: null, eyewear: [] }
          const a = setupFigures(
            { ...base, maxAvgPowerMw: mw, pulseEnergyUj: i.repRateHz ? null : i.pulseEnergyUj },
            { exposureDurationS: t },
          )
          const b = setupFigures(
            {
              ...base,
              maxAvgPowerMw: mw * k,
              pulseEnergyUj: i.repRateHz ? null : i.pulseEnergyUj && i.pulseEnergyUj * k,
            },
            { exposureDurationS: t },
          )
          a.wavelengths.forEach((w, n) => {
            if (w.od && b.wavelengths[n]!.od)
              expect(b.wavelengths[n]!.od!.value).toBeGreaterThanOrEqual(w.od.value - 1e-9)
          })
        },
      ),
      opts,
    )
  })

  // IEC 60825-1:2014 4.3 e: the 0.25 s (aversion) time is for 400–700 nm only.
  it('the 0.25 s figure is never used outside 400–700 nm', () => {
    fc.assert(
      fc.property(input, T, (i, t) => {
        const f = setupFigures(
          { ...i, maxAvgPowerMw: 10, divergenceMrad: 1, laserClass: null, eyewear: [] },
          { exposureDurationS: t },
        )
        for (const w of f.wavelengths) {
          if (w.wavelengthNm < 400 || w.wavelengthNm > 700) {
            expect(w.exposureDurationS).toBeGreaterThanOrEqual(10)
            for (const r of w.mpeRules) if (r.rule === 'average') expect(r.limit.formula).not.toMatch(/t = 250 ms/)
          }
        }
      }),
      opts,
    )
  })
})
