import { describe, expect, it } from 'vitest'
import {
  errorOfSum, fluxWeightedK, linearisedLogVariance, linearisedLogVarianceOfLine, log10Error, relativeErrorOfRatio, relativeErrorOfSum, ROLE_DUST_DENOMINATOR,
  ROLE_DUST_NUMERATOR, ROLE_OTHER,
} from '../../../../shared/stats/error-propagation.ts'

describe('first-order error propagation (shared/science/README.md §9)', () => {
  it('ratio, log ratio and sum errors', () => {
    expect(relativeErrorOfRatio(0.03, 0.04)).toBeCloseTo(0.05, 15)
    expect(log10Error(0.1)).toBeCloseTo(0.1 / Math.LN10, 15)
    expect(errorOfSum(3, 4)).toBe(5)
  })
  it('reproduces the Hα dereddened-flux covariance formula of shared/science/README.md §9', () => {
    // (σ/F)² = (k_Hβ/Δk)²(σα/Fα)² + (k_Hα/Δk)²(σβ/Fβ)² with Δk = k_Hβ − k_Hα (derivation, common practice)
    const kHa = 2.535, kHb = 3.609, dk = kHb - kHa, C = 2.5 / dk
    const ra = 0.02, rb = 0.05
    const want = (kHb / dk) ** 2 * ra ** 2 + (kHa / dk) ** 2 * rb ** 2
    expect(linearisedLogVariance(1, [1], [ra], [ROLE_DUST_NUMERATOR], [kHa], C, ra, rb)).toBeCloseTo(want, 15)
    expect(linearisedLogVarianceOfLine(ra, ROLE_DUST_NUMERATOR, kHa, C, ra, rb)).toBeCloseTo(want, 15)
  })
  it('matches a numerical derivative of the whole chain for a line and a ratio', () => {
    // linearisation check: ln F_corr(L) = ln F_L + 0.4 ln10 k_L E, E = C log10(Fα/Fβ / 2.86)
    const kHa = 2.535, kHb = 3.609, kL = 3.473, C = 2.5 / (kHb - kHa)
    const corr = (fL: number, fa: number, fb: number) => Math.log(fL) + 0.4 * Math.LN10 * kL * C * Math.log10(fa / fb / 2.86)
    const f = [50, 400, 100], rel = [0.04, 0.02, 0.03]
    let varNum = 0
    for (let j = 0; j < 3; j++) {
      const h = f[j] * 1e-6
      const up = [...f], dn = [...f]
      up[j] += h
      dn[j] -= h
      const d = (corr(up[0], up[1], up[2]) - corr(dn[0], dn[1], dn[2])) / (2 * h)
      varNum += (d * rel[j] * f[j]) ** 2
    }
    expect(linearisedLogVarianceOfLine(rel[0], ROLE_OTHER, kL, C, rel[1], rel[2])).toBeCloseTo(varNum, 10)
    expect(linearisedLogVariance(1, [1], [rel[0]], [ROLE_OTHER], [kL], C, rel[1], rel[2])).toBeCloseTo(varNum, 10)
    // Hβ itself, as dust denominator
    expect(linearisedLogVarianceOfLine(rel[2], ROLE_DUST_DENOMINATOR, kHb, C, rel[1], rel[2]))
      .toBeCloseTo(linearisedLogVariance(1, [1], [rel[2]], [ROLE_DUST_DENOMINATOR], [kHb], C, rel[1], rel[2]), 15)
  })
})

describe('summed pseudo-lines (shared/science/README.md §9)', () => {
  it('relative error and k of F₁ + F₂ are the first-order ones', () => {
    // σ_sum = √(σ₁² + σ₂²) (§9, Bevington & Robinson 2003, ch. 3): σ = 0.3 and 0.2 on 3 + 1
    expect(relativeErrorOfSum(3, 0.1, 1, 0.2)).toBeCloseTo(errorOfSum(0.3, 0.2) / 4, 15)
    // d ln(F₁ 10^(0.4 k₁ E) + F₂ 10^(0.4 k₂ E))/dE at E = 0 is 0.4 ln 10 times the flux-weighted k (closed form, common practice)
    const h = 1e-6
    const lnSum = (e: number) => Math.log(3 * 10 ** (0.4 * 2.6 * e) + 1 * 10 ** (0.4 * 2.5 * e))
    expect((lnSum(h) - lnSum(-h)) / (2 * h) / (0.4 * Math.LN10)).toBeCloseTo(fluxWeightedK(3, 2.6, 1, 2.5), 8)
  })
})
