import { describe, expect, it } from 'vitest'
import {
  colourExcessError, colourExcessFromBalmer, colourExcessFromBalmerRaw, colourExcessFromHgammaRaw, dereddeningFactor, INTRINSIC_HALPHA_HBETA_AGN,
  INTRINSIC_HALPHA_HBETA_CASE_B, INTRINSIC_HGAMMA_HBETA_CASE_B,
} from '../../../../shared/diagnostics/balmer-decrement.ts'
import { extinctionK } from '../../../../shared/extinction/index.ts'
import type { ExtinctionLaw } from '../../../../shared/vocabulary/extinction-laws.ts'

const ebvFor = (law: ExtinctionLaw, rv: number, dec: number, intrinsic: number) =>
  colourExcessFromBalmerRaw(dec, intrinsic, extinctionK(law, 4861.33, rv), extinctionK(law, 6562.8, rv))

describe('colour excess from the Balmer decrement', () => {
  it('uses the Case B and AGN intrinsic ratios of the literature', () => {
    // Osterbrock & Ferland 2006, Table 4.4 (via shared/science/README.md §1.1): 2.86 and Hγ/Hβ 0.468
    expect(INTRINSIC_HALPHA_HBETA_CASE_B).toBe(2.86)
    expect(INTRINSIC_HGAMMA_HBETA_CASE_B).toBe(0.468)
    // Halpern & Steiner 1983, ApJL 269, L37; Gaskell & Ferland 1984, PASP 96, 393 (shared/science/README.md §1.1)
    expect(INTRINSIC_HALPHA_HBETA_AGN).toBe(3.1)
  })
  it('reproduces the shared/science/README.md §1.2 check table for all four laws', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.2; 4 d.p. → ±0.00006
    const table: Array<[ExtinctionLaw, number, number, number, number]> = [
      ['ccm89', 3.1, 0.3392, 0.5648, 0.2577],
      ['odonnell94', 3.1, 0.3183, 0.5301, 0.2419],
      ['calzetti00', 4.05, 0.2864, 0.4769, 0.2176],
      ['fitzpatrick99', 3.1, 0.2897, 0.4825, 0.2201],
    ]
    for (const [law, rv, e4, e5, e4agn] of table) {
      expect(Math.abs(ebvFor(law, rv, 4, 2.86) - e4), law).toBeLessThan(6e-5)
      expect(Math.abs(ebvFor(law, rv, 5, 2.86) - e5), law).toBeLessThan(6e-5)
      expect(Math.abs(ebvFor(law, rv, 4, 3.1) - e4agn), law).toBeLessThan(6e-5)
    }
    // A_V = R_V E(B−V): CCM89 1.0515 and Calzetti 1.1598 (shared/science/README.md §1.2)
    expect(Math.abs(3.1 * ebvFor('ccm89', 3.1, 4, 2.86) - 1.0515)).toBeLessThan(1e-4)
    expect(Math.abs(4.05 * ebvFor('calzetti00', 4.05, 4, 2.86) - 1.1598)).toBeLessThan(1e-4)
  })
  it('clips a decrement below intrinsic at 0 with balmer-below-intrinsic', () => {
    // public API (openapi/openapi.json); shared/science/README.md §1.2 (common practice)
    expect(colourExcessFromBalmer(2.5, 2.86, 3.609, 2.535)).toEqual({ value: 0, flags: ['balmer-below-intrinsic'] })
    expect(colourExcessFromBalmer(2.86, 2.86, 3.609, 2.535)).toEqual({ value: 0, flags: [] })
  })
  it('gives zero from the Hγ fallback at the intrinsic Hγ/Hβ and positive E for a redder ratio', () => {
    // shared/science/README.md §1.2 fallback formula (project convention): identity at the intrinsic ratio
    expect(colourExcessFromHgammaRaw(0.468, 0.468, 4.174, 3.609)).toBe(0)
    expect(colourExcessFromHgammaRaw(0.4, 0.468, 4.174, 3.609)).toBeGreaterThan(0)
  })
  it('dereddening inverts reddening exactly', () => {
    // F_corr = F_obs 10^(0.4 k E) (shared/science/README.md §1.2): identity
    expect(dereddeningFactor(3.609, 0.3) * Math.pow(10, -0.4 * 3.609 * 0.3)).toBeCloseTo(1, 14)
  })
})

describe('colourExcessError (shared/science/README.md §9)', () => {
  it('is C/ln 10 times the relative error of the Balmer ratio', () => {
    // σ_E = 2.5/(k_Hβ − k_Hα)/ln 10 · √((σα/Fα)² + (σβ/Fβ)²), shared/science/README.md §9; CCM89 R_V = 3.1 k of §1.4
    // (python3-extinction 0.4.6): C = 2.328 (§1.2 table)
    expect(colourExcessError(3.609, 2.535, 0.02, 0.01)).toBeCloseTo((2.328 / Math.LN10) * Math.hypot(0.02, 0.01), 4)
    // and the numerical slope of E(B−V) in ln F(Hα) (first order; common practice)
    const h = 1e-6
    const dE = (colourExcessFromBalmerRaw(4 * Math.exp(h), 2.86, 3.609, 2.535) - colourExcessFromBalmerRaw(4 * Math.exp(-h), 2.86, 3.609, 2.535)) / (2 * h)
    expect(colourExcessError(3.609, 2.535, 0, 0.03)).toBeCloseTo(Math.abs(dE) * 0.03, 9)
  })
})
