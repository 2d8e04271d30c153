import { describe, expect, it } from 'vitest'
import {
  DENSITY_HIGH_LIMIT, DENSITY_LOW_LIMIT, DENSITY_OK, densityRangeStatus, densityRatioDerivative, doubletRatioFromDensity,
  electronDensityFromOiiRatio, electronDensityFromSiiRatio, SANDERS16_OII, SANDERS16_SII,
} from '../../../../shared/diagnostics/density.ts'

describe('electron density (Sanders et al. 2016, ApJ 816, 23)', () => {
  it('reproduces the [S II] and [O II] check values at 10⁴ K', () => {
    // shared/science/README.md §3; quoted to 0.1 cm⁻³ → ±0.06
    const sii: Array<[number, number]> = [[0.6, 3162.7], [1.0, 496.2], [1.2, 203.8], [1.4, 32.3]]
    for (const [r, n] of sii) expect(Math.abs((electronDensityFromSiiRatio(r) as number) - n), `R=${r}`).toBeLessThan(0.06)
    const oii: Array<[number, number]> = [[0.6, 2456.9], [1.0, 469.2], [1.2, 200.0], [1.4, 36.1]]
    for (const [r, n] of oii) expect(Math.abs((electronDensityFromOiiRatio(r) as number) - n), `R=${r}`).toBeLessThan(0.06)
  })
  it('scales as (T/10⁴)^½: R = 1.0 at 15 000 K → 607.7 cm⁻³', () => {
    // shared/science/README.md §3: 496.17·√1.5 = 607.7
    expect(Math.abs((electronDensityFromSiiRatio(1.0, 15000) as number) - 607.7)).toBeLessThan(0.06)
  })
  it('has the limits of the fit quoted in shared/science/README.md §3', () => {
    // shared/science/README.md §3: [S II] R(1) = 1.4482, R(1e5) = 0.4378; [O II] 1.4561, 0.3840
    expect(doubletRatioFromDensity(SANDERS16_SII, 1, 1e4)).toBeCloseTo(1.4482, 4)
    expect(doubletRatioFromDensity(SANDERS16_SII, 1e5, 1e4)).toBeCloseTo(0.4378, 4)
    expect(doubletRatioFromDensity(SANDERS16_OII, 1, 1e4)).toBeCloseTo(1.4561, 4)
    expect(doubletRatioFromDensity(SANDERS16_OII, 1e5, 1e4)).toBeCloseTo(0.384, 4)
  })
  it('returns null at the low/high-density limits, never a negative or infinite n_e', () => {
    // shared/science/README.md §3 (project convention): R ≥ R(1) → low, R ≤ R(1e5) → high, ne null
    expect(densityRangeStatus(SANDERS16_SII, 1.45)).toBe(DENSITY_LOW_LIMIT)
    expect(densityRangeStatus(SANDERS16_SII, 1.5)).toBe(DENSITY_LOW_LIMIT)
    expect(densityRangeStatus(SANDERS16_SII, 0.43)).toBe(DENSITY_HIGH_LIMIT)
    expect(densityRangeStatus(SANDERS16_SII, 1.0)).toBe(DENSITY_OK)
    expect(electronDensityFromSiiRatio(1.46)).toBeNull()
    expect(electronDensityFromOiiRatio(0.3)).toBeNull()
  })
  it('inverts the forward fit and has the derivative a(c − b)/(a − R)²', () => {
    // exact identities of the Sanders et al. 2016 form (shared/science/README.md §3)
    expect(doubletRatioFromDensity(SANDERS16_SII, electronDensityFromSiiRatio(1.1, 12000) as number, 12000)).toBeCloseTo(1.1, 12)
    const h = 1e-6
    const numeric = ((electronDensityFromSiiRatio(1 - h) as number) - (electronDensityFromSiiRatio(1 + h) as number)) / (2 * h)
    expect(densityRatioDerivative(SANDERS16_SII, 1, 1e4)).toBeCloseTo(numeric, 3)
  })
})
