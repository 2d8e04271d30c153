import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { fitSpectrum, syntheticSpectrum, type DetectedLine } from '../../../../shared/spectra/index.ts'

/**
 * Recovery of known lines: the fit against scipy.optimize.curve_fit on the same data
 * (tests/fixtures/spectra/curve_fit.json, make_curve_fit_fixture.py, python3-scipy 1.10.1), and the
 * pull distribution (fit − truth)/error over seeded noisy realisations, which for an unbiased fit
 * with correct errors is N(0, 1) (common practice; shared/science/README.md §13.9, §13.11).
 */
const cf = JSON.parse(readFileSync(new URL('../../../fixtures/spectra/curve_fit.json', import.meta.url), 'utf8'))
const ONE = { components: 1, broadHalpha: 'off', absorption: [] } as const

describe('agreement with scipy.optimize.curve_fit (README §13.7)', () => {
  const r = fitSpectrum(cf.spectrum, ONE)
  it('the same χ² and pixel count (dof = n − 10 free parameters)', () => {
    expect(r.fit.chi2).toBeCloseTo(cf.chi2, 6)
    expect(r.fit.dof).toBe(cf.n - 10)
  })
  it('fluxes, velocity and σ within 1e-4 of their error; errors within 1e-3 relative (covariance α⁻¹ = curve_fit pcov, absolute_sigma)', () => {
    for (const id of Object.keys(cf.lines)) {
      const a = r.lines[id] as DetectedLine
      const b = cf.lines[id]
      expect(a.detected, id).toBe(true)
      expect(Math.abs(a.flux - b.flux) / b.error, id).toBeLessThan(1e-4)
      expect(Math.abs(a.error / b.error - 1), id).toBeLessThan(1e-3)
      expect(Math.abs(a.velocity - b.velocity) / b.velocityError, id).toBeLessThan(1e-4)
      expect(Math.abs(a.velocityError / b.velocityError - 1), id).toBeLessThan(1e-3)
      expect(Math.abs(a.sigma - b.sigma) / b.sigmaError, id).toBeLessThan(1e-4)
      expect(Math.abs(a.sigmaError / b.sigmaError - 1), id).toBeLessThan(1e-3)
      expect(a.sigmaInstrumental as number).toBeCloseTo(b.sigmaInstrumental, 9)
    }
  })
  it('the fit recovers the truth the script drew within 3σ', () => {
    const hb = r.lines.hbeta as DetectedLine
    expect(Math.abs(hb.flux - cf.truth.hbeta) / hb.error).toBeLessThan(3)
    expect(Math.abs(hb.velocity - cf.truth.v) / hb.velocityError).toBeLessThan(3)
  })
})

describe('pull distributions over 200 seeded realisations (README §13.11)', () => {
  const truth = { hbeta: 180, oiii_5007: 540, velocity: 40, sigma: 150 }
  const fwhm = 2.5
  const draws = 200
  const pulls: Record<string, number[]> = { hbeta: [], oiii_5007: [], velocity: [], sigma: [] }
  for (let seed = 1; seed <= draws; seed++) {
    const s = syntheticSpectrum({
      seed, redshift: 0.02, wavelength: { start: 4905, end: 5160, step: 1 }, continuum: { level: 10, slope: 0.1 }, noise: 0.5,
      resolution: { fwhmAngstrom: fwhm },
      lines: [{ id: 'hbeta', flux: truth.hbeta, velocity: truth.velocity, sigma: truth.sigma }, { id: 'oiii_5007', flux: truth.oiii_5007, velocity: truth.velocity, sigma: truth.sigma }],
    })
    const r = fitSpectrum(s.spectrum, ONE)
    const hb = r.lines.hbeta as DetectedLine
    const o3 = r.lines.oiii_5007 as DetectedLine
    pulls.hbeta.push((hb.flux - truth.hbeta) / hb.error)
    pulls.oiii_5007.push((o3.flux - truth.oiii_5007) / o3.error)
    pulls.velocity.push((hb.velocity - truth.velocity) / hb.velocityError)
    const sigmaTrue = Math.hypot(truth.sigma, hb.sigmaInstrumental as number)
    pulls.sigma.push((hb.sigma - sigmaTrue) / hb.sigmaError)
  }
  for (const key of Object.keys(pulls)) {
    it(`${key}: pull mean within ±0.15 and width 0.85–1.15`, () => {
      const a = pulls[key]
      const mean = a.reduce((s, x) => s + x, 0) / a.length
      const sd = Math.sqrt(a.reduce((s, x) => s + (x - mean) ** 2, 0) / (a.length - 1))
      expect(Math.abs(mean)).toBeLessThan(0.15)
      expect(sd).toBeGreaterThan(0.85)
      expect(sd).toBeLessThan(1.15)
    })
  }
})
