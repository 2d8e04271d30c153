import { describe, expect, it } from 'vitest'
import { DEFAULT_FIT_SETTINGS, describeFitSettings, fitSettingsOf, sameFitSettings } from '../../../../../src/lib/spectra/fit-settings'

describe('fit settings', () => {
  it('default to one Gaussian component, broad Hα when the data prefer it, Na I D, no Monte Carlo', () => {
    expect(fitSettingsOf({})).toEqual({ profile: 'gaussian', components: 1, broadHalpha: 'auto', absorption: ['nad'], monteCarlo: { draws: 0, seed: 1 } })
    expect(fitSettingsOf(null)).toEqual(DEFAULT_FIT_SETTINGS)
  })

  it('fill only what is absent', () => {
    const f = fitSettingsOf({ fit: { profile: 'voigt', absorption: [], monteCarlo: { draws: 200, seed: 7 } } })
    expect(f).toEqual({ profile: 'voigt', components: 1, broadHalpha: 'auto', absorption: [], monteCarlo: { draws: 200, seed: 7 } })
  })

  it('compare and describe', () => {
    const a = fitSettingsOf({})
    expect(sameFitSettings(a, { ...a, monteCarlo: { draws: 0, seed: 1 } })).toBe(true)
    expect(sameFitSettings(a, { ...a, components: 'auto' })).toBe(false)
    expect(describeFitSettings(a)).toBe('Gaussian · 1 component · broad Hα auto · Na I D · analytic errors')
    expect(describeFitSettings({ ...a, components: 2, absorption: [], monteCarlo: { draws: 100, seed: 3 } }))
      .toBe('Gaussian · 2 components · broad Hα auto · no absorption · 100 Monte Carlo draws (seed 3)')
  })
})
