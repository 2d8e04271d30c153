import { describe, expect, it } from 'vitest'
import { DEFAULT_FIT_SETTINGS, describeFitSettings, fitSettingsOf, MAX_BALMER_ABSORPTION_EW, MAX_FIT_DRAWS, sameFitSettings } from '../../../../../src/lib/spectra/fit-settings'
import { FitOptionsSchema, SPECTRUM_MAX_MONTE_CARLO_DRAWS } from '../../../../../shared/schemas/spectra.schema.ts'
import { DEFAULT_FIT_OPTIONS } from '../../../../../shared/spectra/index.ts'

describe('fit settings', () => {
  it('default to one Gaussian component, broad Hα when the data prefer it, Na I D, no Monte Carlo', () => {
    expect(fitSettingsOf({})).toEqual({ profile: 'gaussian', components: 1, broadHalpha: 'auto', absorption: ['nad'], monteCarlo: { draws: 0, seed: 1 }, balmerAbsorptionEw: 0 })
    expect(fitSettingsOf(null)).toEqual(DEFAULT_FIT_SETTINGS)
  })

  it('are the schema\'s and the science library\'s defaults and bounds (one source, copied for the bundle)', () => {
    expect(DEFAULT_FIT_SETTINGS).toEqual(FitOptionsSchema.parse({}))
    expect(DEFAULT_FIT_SETTINGS).toEqual(DEFAULT_FIT_OPTIONS)
    expect(MAX_FIT_DRAWS).toBe(SPECTRUM_MAX_MONTE_CARLO_DRAWS)
    expect(FitOptionsSchema.safeParse({ balmerAbsorptionEw: MAX_BALMER_ABSORPTION_EW }).success).toBe(true)
    expect(FitOptionsSchema.safeParse({ balmerAbsorptionEw: MAX_BALMER_ABSORPTION_EW + 0.01 }).success).toBe(false)
  })

  it('fill only what is absent', () => {
    const f = fitSettingsOf({ fit: { profile: 'voigt', absorption: [], monteCarlo: { draws: 200, seed: 7 } } })
    expect(f).toEqual({ profile: 'voigt', components: 1, broadHalpha: 'auto', absorption: [], monteCarlo: { draws: 200, seed: 7 }, balmerAbsorptionEw: 0 })
  })

  it('compare and describe', () => {
    const a = fitSettingsOf({})
    expect(sameFitSettings(a, { ...a, monteCarlo: { draws: 0, seed: 1 } })).toBe(true)
    expect(sameFitSettings(a, { ...a, components: 'auto' })).toBe(false)
    expect(describeFitSettings(a)).toBe('Gaussian · 1 component · broad Hα auto · Na I D · analytic errors')
    expect(describeFitSettings({ ...a, components: 2, absorption: [], monteCarlo: { draws: 100, seed: 3 } }))
      .toBe('Gaussian · 2 components · broad Hα auto · no absorption · 100 Monte Carlo draws (seed 3)')
    expect(describeFitSettings({ ...a, balmerAbsorptionEw: 1.5 })).toBe('Gaussian · 1 component · broad Hα auto · Na I D · Balmer absorption 1.5 Å added back · analytic errors')
    expect(sameFitSettings(a, { ...a, balmerAbsorptionEw: 1 })).toBe(false)
  })
})
