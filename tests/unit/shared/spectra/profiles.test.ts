import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import {
  erfc, faddeeva, FWHM_PER_SIGMA, gaussianFwhm, gaussianMass, gaussianPixels, gaussianProfile, lorentzianFwhm, lorentzianPixels,
  lorentzianProfile, pixelBounds, voigtFwhm, voigtPixels, voigtProfile,
} from '../../../../shared/spectra/index.ts'

/**
 * Line profiles against scipy (tests/fixtures/spectra/profiles.json, written by make_profile_fixture.py
 * with Debian's python3-scipy 1.10.1) and closed forms. shared/science/README.md §13.1–§13.3.
 */
const fx = JSON.parse(readFileSync(new URL('../../../fixtures/spectra/profiles.json', import.meta.url), 'utf8'))

/** Trapezoid integral of f over [a, b] on m panels. */
function integrate(f: (x: number) => number, a: number, b: number, m: number): number {
  const h = (b - a) / m
  let s = 0.5 * (f(a) + f(b))
  for (let i = 1; i < m; i++) s += f(a + i * h)
  return s * h
}

describe('Faddeeva function (Weideman 1994, SIAM J. Numer. Anal. 31, 1497; README §13.2)', () => {
  it('matches scipy.special.wofz: |Δw|/|w| ≤ 1e-12 everywhere, Re w ≤ 2e-7 relative for Im z ≥ 1e-5', () => {
    expect(fx.version).toBe('1.10.1')
    let worstAbs = 0
    let worstRe = 0
    for (const [x, y, re, im] of fx.wofz as number[][]) {
      const [r, i] = faddeeva(x, y)
      worstAbs = Math.max(worstAbs, Math.hypot(r - re, i - im) / Math.hypot(re, im))
      worstRe = Math.max(worstRe, Math.abs(r - re) / re)
    }
    expect(worstAbs).toBeLessThan(1e-12)
    expect(worstRe).toBeLessThan(2e-7)
  })

  it('erfc matches scipy.special.erfc to 1e-12 relative on −5 … 26 (Abramowitz & Stegun 1964, eqs. 7.1.2–7.1.3)', () => {
    for (const [x, v] of fx.erfc as number[][]) expect(Math.abs(erfc(x) - v) / v).toBeLessThan(1e-12)
  })
})

describe('profiles of unit area (README §13.1)', () => {
  it('the Voigt profile matches scipy.special.voigt_profile to 2e-7 relative (Armstrong 1967, JQSRT 7, 61)', () => {
    let worst = 0
    for (const [x, s, g, v] of fx.voigt as number[][]) worst = Math.max(worst, Math.abs(voigtProfile(x, s, g) - v) / v)
    expect(worst).toBeLessThan(2e-7)
  })

  it('Gaussian: peak 1/(σ√(2π)), area 1, FWHM = 2√(2 ln 2) σ (closed forms)', () => {
    expect(gaussianProfile(0, 2)).toBeCloseTo(1 / (2 * Math.sqrt(2 * Math.PI)), 15)
    expect(integrate((x) => gaussianProfile(x, 2), -40, 40, 4000)).toBeCloseTo(1, 12)
    expect(FWHM_PER_SIGMA).toBeCloseTo(2.354820045, 9)
    expect(gaussianProfile(gaussianFwhm(2) / 2, 2) / gaussianProfile(0, 2)).toBeCloseTo(0.5, 14)
  })

  it('Lorentzian: peak 1/(πγ), FWHM = 2γ, area 1 − (2/π) atan(γ/X) inside ±X (closed forms)', () => {
    expect(lorentzianProfile(0, 0.5)).toBeCloseTo(2 / Math.PI, 15)
    expect(lorentzianProfile(lorentzianFwhm(0.5) / 2, 0.5) / lorentzianProfile(0, 0.5)).toBeCloseTo(0.5, 15)
    expect(integrate((x) => lorentzianProfile(x, 0.5), -200, 200, 400000)).toBeCloseTo(1 - (2 / Math.PI) * Math.atan(0.5 / 200), 8)
  })

  it('Voigt FWHM of Olivero & Longbothum 1977 (JQSRT 17, 233) is within their 0.02 % of the exact FWHM (scipy brentq)', () => {
    for (const c of fx.fwhm as { sigma: number; gamma: number; fwhm: number }[]) {
      expect(Math.abs(voigtFwhm(c.sigma, c.gamma) / c.fwhm - 1)).toBeLessThan(2.5e-4)
    }
    // limits: γ → 0 gives 2.3548σ exactly; σ → 0 gives (0.5346 + √0.2166)·2γ = 1.000003·2γ (closed form)
    expect(voigtFwhm(0, 1.3) / 2.6 - 1).toBeCloseTo(0.5346 + Math.sqrt(0.2166) - 1, 15)
    expect(voigtFwhm(1.3, 0)).toBeCloseTo(1.3 * FWHM_PER_SIGMA, 12)
  })
})

describe('pixel-averaged profiles (README §13.3)', () => {
  it('match scipy.integrate.quad means over each pixel: Gaussian and Lorentzian to 1e-12 of the peak, Voigt to 1e-8', () => {
    for (const c of fx.pixels as { kind: string; sigma: number; gamma: number; centre: number; lo: number[]; hi: number[]; mean: number[] }[]) {
      const out = new Float64Array(c.lo.length)
      if (c.kind === 'gaussian') gaussianPixels(c.lo, c.hi, 0, c.lo.length, c.centre, c.sigma, out)
      else if (c.kind === 'lorentzian') lorentzianPixels(c.lo, c.hi, 0, c.lo.length, c.centre, c.gamma, out)
      else voigtPixels(c.lo, c.hi, 0, c.lo.length, c.centre, c.sigma, c.gamma, out)
      const peak = Math.max(...c.mean)
      const tol = c.kind === 'voigt' ? 1e-8 : 1e-12
      c.mean.forEach((m, i) => expect(Math.abs(out[i] - m) / peak, `${c.kind} pixel ${i}`).toBeLessThan(tol))
    }
  })

  it('pixel means times widths sum to the mass inside the pixels (Φ differences, closed form)', () => {
    const centres = Array.from({ length: 101 }, (_, i) => 6500 + 0.8 * i)
    const { lo, hi } = pixelBounds(centres)
    const out = new Float64Array(centres.length)
    gaussianPixels(lo, hi, 0, centres.length, 6540.3, 1.1, out)
    let s = 0
    for (let i = 0; i < out.length; i++) s += out[i] * (hi[i] - lo[i])
    expect(s).toBeCloseTo(gaussianMass((lo[0] - 6540.3) / 1.1, (hi[100] - 6540.3) / 1.1), 13)
    expect(s).toBeCloseTo(1, 12)
  })

  it('analytic derivatives of Gaussian pixel means agree with central differences (closed form, README §13.3)', () => {
    const lo = [0, 1, 2, 3, 4], hi = [1, 2, 3, 4, 5]
    const out = new Float64Array(5), dc = new Float64Array(5), ds = new Float64Array(5)
    const up = new Float64Array(5), dn = new Float64Array(5)
    gaussianPixels(lo, hi, 0, 5, 2.3, 0.9, out, dc, ds)
    const h = 1e-6
    gaussianPixels(lo, hi, 0, 5, 2.3 + h, 0.9, up)
    gaussianPixels(lo, hi, 0, 5, 2.3 - h, 0.9, dn)
    for (let i = 0; i < 5; i++) expect(dc[i]).toBeCloseTo((up[i] - dn[i]) / (2 * h), 7)
    gaussianPixels(lo, hi, 0, 5, 2.3, 0.9 + h, up)
    gaussianPixels(lo, hi, 0, 5, 2.3, 0.9 - h, dn)
    for (let i = 0; i < 5; i++) expect(ds[i]).toBeCloseTo((up[i] - dn[i]) / (2 * h), 7)
  })

  it('a Voigt of vanishing γ tends to the exact Gaussian means, of vanishing σ to the exact Lorentzian means', () => {
    const centres = Array.from({ length: 60 }, (_, i) => i)
    const { lo, hi } = pixelBounds(centres)
    const g = new Float64Array(60), v = new Float64Array(60), l = new Float64Array(60)
    gaussianPixels(lo, hi, 0, 60, 30.2, 0.4, g)
    voigtPixels(lo, hi, 0, 60, 30.2, 0.4, 1e-9, v)
    for (let i = 0; i < 60; i++) expect(Math.abs(v[i] - g[i])).toBeLessThan(1e-8)
    lorentzianPixels(lo, hi, 0, 60, 30.2, 1.5, l)
    voigtPixels(lo, hi, 0, 60, 30.2, 1e-5, 1.5, v)
    for (let i = 0; i < 60; i++) expect(Math.abs(v[i] / l[i] - 1)).toBeLessThan(1e-6)
  })

  it('pixel edges: midpoints, half a spacing out at the ends, and no pixel stretched across a hole (project choice, README §13.3)', () => {
    const b = pixelBounds([10, 11, 12, 20, 21, 22])
    expect(Array.from(b.lo)).toEqual([9.5, 10.5, 11.5, 19.5, 20.5, 21.5])
    expect(Array.from(b.hi)).toEqual([10.5, 11.5, 12.5, 20.5, 21.5, 22.5])
  })
})
