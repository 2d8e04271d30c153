import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import {
  centralOpticalDepth, curveOfGrowthIntegral, doubletRatioAt, equivalentWidth, LINEAR_COG_CONSTANT, linearColumnDensity, linearDoubletRatio,
  solveDoublet, TAU0_CONSTANT, type Doublet,
} from '../../../../shared/spectra/index.ts'

/**
 * Curve of growth of a Gaussian velocity distribution and the doublet-ratio method (Spitzer 1978,
 * Physical Processes in the Interstellar Medium, ch. 3; Nachman & Hobbs 1973, ApJ 182, 481 — both from
 * memory; shared/science/README.md §14). Numerical values: tests/fixtures/spectra/profiles.json
 * (scipy.integrate.quad and scipy.constants, python3-scipy 1.10.1).
 */
const fx = JSON.parse(readFileSync(new URL('../../../fixtures/spectra/profiles.json', import.meta.url), 'utf8'))
const NAD: Doublet = {
  strong: { f: fx.doublet.d2.f, lambdaAngstrom: fx.doublet.d2.lambda },
  weak: { f: fx.doublet.d1.f, lambdaAngstrom: fx.doublet.d1.lambda },
}

describe('curve of growth (README §14)', () => {
  it('constants m_e c²/(π e²) = 1.1296e20 (W, λ in Å) and √π r_e c = 1.4974e-15 match scipy.constants to 1e-9', () => {
    expect(LINEAR_COG_CONSTANT / fx.constants.linear - 1).toBeCloseTo(0, 9)
    expect(TAU0_CONSTANT / fx.constants.tau0 - 1).toBeCloseTo(0, 9)
    expect(LINEAR_COG_CONSTANT).toBeCloseTo(1.1296e20, -16)
  })

  it('linear limit: N = 1.13e20 W/(f λ²) cm⁻² — W = 0.1 Å gives 5.078e11 (D2, f = 0.6408) and 1.015e12 cm⁻² (D1, f = 0.3201) (closed form; Morton 2003 f-values)', () => {
    expect(linearColumnDensity(0.1, 0.6408, 5891.58)).toBeCloseTo(5.078e11, -8)
    expect(linearColumnDensity(0.1, 0.3201, 5897.55)).toBeCloseTo(1.015e12, -9)
    // and W(N) tends to that line as τ₀ → 0: W/W_lin = 1 − τ₀/(2√2) + O(τ₀²) (series of F, closed form)
    const n = 1e9
    const tau = centralOpticalDepth(n, 0.6408, 5891.58, 30)
    expect(equivalentWidth(n, 30, 0.6408, 5891.58) / (0.6408 * 5891.58 ** 2 * n / LINEAR_COG_CONSTANT)).toBeCloseTo(1 - tau / (2 * Math.SQRT2), 8)
  })

  it('F(τ₀) = ∫(1 − exp(−τ₀ e^(−u²))) du matches scipy.integrate.quad to 1e-10 relative from τ₀ = 1e-4 to 1e7 (linear, flat and saturated parts)', () => {
    for (const [tau, v] of fx.cog as number[][]) expect(Math.abs(curveOfGrowthIntegral(tau) / v - 1)).toBeLessThan(1e-10)
  })

  it('saturated regime: F(τ₀) ≈ 2√(ln τ₀) grows only logarithmically (flat part; common practice)', () => {
    const r = curveOfGrowthIntegral(1e7) / (2 * Math.sqrt(Math.log(1e7)))
    expect(r).toBeGreaterThan(1)
    expect(r).toBeLessThan(1.02)
    // ten times the column adds only ≈ √(ln 10⁷/ln 10⁶) − 1 = 8 % to W (a linear line would gain ×10)
    expect(curveOfGrowthIntegral(1e7) / curveOfGrowthIntegral(1e6)).toBeCloseTo(Math.sqrt(Math.log(1e7) / Math.log(1e6)), 2)
  })

  it('τ₀ = 1.497e-15 N f λ/b: N = 1e12, D2, b = 10 km/s → 0.5653 (closed form)', () => {
    expect(centralOpticalDepth(1e12, 0.6408, 5891.58, 10)).toBeCloseTo(0.5653, 4)
  })

  it('doublet ratio falls from f₂λ₂²/(f₁λ₁²) = 1.998 (thin) towards λ₂/λ₁ (saturated) (closed form)', () => {
    expect(linearDoubletRatio(NAD)).toBeCloseTo(1.9978, 4)
    expect(doubletRatioAt(NAD, 1e-6)).toBeCloseTo(linearDoubletRatio(NAD), 5)
    let last = Infinity
    for (const tau of [0.01, 0.1, 1, 10, 100, 1e4, 1e6]) {
      const r = doubletRatioAt(NAD, tau)
      expect(r).toBeLessThan(last)
      last = r
    }
    expect(doubletRatioAt(NAD, 1e8)).toBeLessThan(1.07)
  })

  it('solving the two-line system recovers N and b from W(D2), W(D1) computed by scipy quad to 1e-6 (README §14)', () => {
    for (const c of fx.doublet.cases as { logN: number; b: number; ewD2: number; ewD1: number }[]) {
      const s = solveDoublet(c.ewD2, c.ewD1, NAD)
      expect(s.regime).toBe('solved')
      expect(Math.log10(s.n as number)).toBeCloseTo(c.logN, 6)
      expect(s.b as number).toBeCloseTo(c.b, 4)
    }
  })

  it('a ratio at or above the thin value gives the linear-limit N (a lower bound) and no b; at or below the saturated value no N', () => {
    const thin = solveDoublet(0.2, 0.1, NAD)
    expect(thin.regime).toBe('linear')
    expect(thin.b).toBeNull()
    expect(thin.n as number).toBeCloseTo(LINEAR_COG_CONSTANT * 0.3 / (NAD.strong.f * NAD.strong.lambdaAngstrom ** 2 + NAD.weak.f * NAD.weak.lambdaAngstrom ** 2), -5)
    expect(solveDoublet(1.0, 1.0, NAD)).toEqual({ regime: 'saturated', n: null, b: null, tau0: null })
  })
})
