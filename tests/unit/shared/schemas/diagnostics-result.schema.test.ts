import { describe, expect, it } from 'vitest'
import { GalaxyResultSchema } from '../../../../shared/schemas/diagnostics-result.schema.ts'
import { diagnoseGalaxy } from '../../../../shared/diagnostics/pipeline.ts'
import { DEFAULT_SETTINGS } from '../../../../shared/diagnostics/settings.ts'

describe('GalaxyResultSchema', () => {
  const g = {
    id: 'LNS-0000001', redshift: 0.05, fluxUnit: 1e-17, ew: { halpha: 24.5 }, fwhm: { halpha_broad: 2500 },
    lines: { halpha: { flux: 400, error: 4 }, hbeta: { flux: 100, error: 2 }, oiii_5007: { upperLimit: 9 }, nii_6584: { flux: 120, error: 3 },
      sii_6717: { flux: 60, error: 2 }, sii_6731: { flux: 50, error: 2 }, halpha_broad: { flux: 300, error: 20 } },
  }
  it('accepts deterministic and Monte Carlo results and keeps the percentile siblings', () => {
    const r = diagnoseGalaxy(g, DEFAULT_SETTINGS)
    expect(GalaxyResultSchema.parse(r)).toEqual(r)
    const mc = diagnoseGalaxy(g, { ...DEFAULT_SETTINGS, monteCarlo: { draws: 100, seed: 2 } })
    const parsed = GalaxyResultSchema.parse(mc)
    expect(parsed.extinction.ebvPercentiles).toEqual(mc.extinction.ebvPercentiles)
    expect(parsed.classes.classProbabilities).toEqual(mc.classes.classProbabilities)
  })
  it('refuses a NaN and an unknown class', () => {
    const r = diagnoseGalaxy(g, DEFAULT_SETTINGS)
    expect(GalaxyResultSchema.safeParse({ ...r, extinction: { ...r.extinction, ebv: Number.NaN } }).success).toBe(false)
    expect(GalaxyResultSchema.safeParse({ ...r, classes: { ...r.classes, nii: 'quasar' } }).success).toBe(false)
  })
})
