import { describe, expect, it } from 'vitest'
import {
  broadLineExample, fitSpectrum, NAD_NOTE, sodiumExample, syntheticSpectrum, twoComponentExample, type DetectedLine, type NadResult,
} from '../../../../shared/spectra/index.ts'
import { assertAllFinite } from '../../../../shared/stats/finite.ts'
import { GalaxyInputSchema } from '../../../../shared/schemas/galaxy.schema.ts'

/**
 * The spectrum fit end to end on seeded synthetic spectra (shared/spectra/synthetic.ts): model choice by
 * the Bayesian information criterion (Schwarz 1978, Ann. Stat. 6, 461; ΔBIC > 10 and the extra part
 * detected, common practice — shared/science/README.md §13.7), Na I D and the curve of growth (README
 * §14), flags, limits and the Monte Carlo errors (README §13.9, §13.10).
 */
const oneComponent = (seed: number, extra: Partial<Parameters<typeof syntheticSpectrum>[0]> = {}) => syntheticSpectrum({
  seed, redshift: 0.03, wavelength: { start: 4900, end: 7000, step: 1.5 }, continuum: { level: 12 }, noise: 0.4, resolution: { fwhmAngstrom: 2.5 },
  lines: [
    { id: 'hbeta', flux: 90, sigma: 110 }, { id: 'oiii_5007', flux: 300, sigma: 110 }, { id: 'halpha', flux: 300, sigma: 110 },
    { id: 'nii_6584', flux: 120, sigma: 110 }, { id: 'sii_6717', flux: 50, sigma: 110 }, { id: 'sii_6731', flux: 40, sigma: 110 },
  ],
  ...extra,
})

describe('model choice by BIC (README §13.7)', () => {
  it('one-component truth → one component and no broad Hα (components and broadHalpha auto)', () => {
    const r = fitSpectrum(oneComponent(11).spectrum, { components: 'auto', broadHalpha: 'auto' })
    expect(r.fit.components).toBe(1)
    expect(r.fit.broadHalpha).toBe(false)
    expect(r.lines.halpha_broad).toBeUndefined()
    expect((r.lines.halpha as DetectedLine).components).toBeUndefined()
  })

  it('clear two-component truth → two components, narrower first, each recovered within 4σ', () => {
    const s = twoComponentExample(5)
    const r = fitSpectrum(s.spectrum, { components: 'auto' })
    expect(r.fit.components).toBe(2)
    expect(r.fit.broadHalpha).toBe(false)
    const ha = r.lines.halpha as DetectedLine
    const [core, wing] = ha.components as NonNullable<DetectedLine['components']>
    expect(core.sigmaIntrinsic).toBeLessThan(wing.sigmaIntrinsic)
    expect(Math.abs(core.flux - 330) / core.error).toBeLessThan(4)
    expect(Math.abs(wing.flux - 198) / wing.error).toBeLessThan(4)
    expect(Math.abs(wing.velocity + 250) / wing.velocityError).toBeLessThan(4)
    expect(Math.abs(core.sigmaIntrinsic - 90)).toBeLessThan(4 * core.sigmaError)
    // the line's flux is the sum, its velocity the flux-weighted mean of the components (closed form)
    expect(ha.flux).toBeCloseTo(core.flux + wing.flux, 9)
    expect(ha.velocity).toBeCloseTo((core.flux * core.velocity + wing.flux * wing.velocity) / ha.flux, 9)
  })

  it('broad Hα truth → broad found; its instrument-corrected FWHM feeds measurements.fwhm.halpha_broad', () => {
    const s = broadLineExample(2)
    const r = fitSpectrum(s.spectrum)
    expect(r.fit.broadHalpha).toBe(true)
    expect(r.fit.components).toBe(1)
    const b = r.lines.halpha_broad as DetectedLine
    expect(b.detected).toBe(true)
    expect(Math.abs(b.flux - 2600) / b.error).toBeLessThan(4)
    expect(Math.abs(b.sigmaIntrinsic - 1700)).toBeLessThan(4 * b.sigmaError)
    expect(r.measurements.fwhm.halpha_broad).toBeCloseTo(2.354820045 * b.sigmaIntrinsic, 6)
    // the narrow Hα stays narrow: the broad flux is not in it
    expect(Math.abs((r.lines.halpha as DetectedLine).flux - 420) / (r.lines.halpha as DetectedLine).error).toBeLessThan(4)
  })

  it('components: 2 forces two; broadHalpha: off never fits a broad line', () => {
    const r = fitSpectrum(broadLineExample(2).spectrum, { broadHalpha: 'off', components: 2, absorption: [] })
    expect(r.fit.broadHalpha).toBe(false)
    expect(r.fit.components).toBe(2)
  })
})

describe('Na I D with He I 5876 (README §14)', () => {
  const s = sodiumExample(4)
  const r = fitSpectrum(s.spectrum)
  const nad = r.absorption.nad as Extract<NadResult, { detected: true }>
  const truth = s.truth.nad as NonNullable<typeof s.truth.nad>
  it('the equivalent widths of D2 and D1 (rest frame, positive for absorption) match the exp(−τ) truth within 3 %', () => {
    expect(nad.detected).toBe(true)
    expect(nad.ewD2 / truth.ewD2).toBeCloseTo(1, 1)
    expect(Math.abs(nad.ewD2 / truth.ewD2 - 1)).toBeLessThan(0.03)
    expect(Math.abs(nad.ewD1 / truth.ewD1 - 1)).toBeLessThan(0.03)
    expect(nad.ew).toBeCloseTo(nad.ewD2 + nad.ewD1, 12)
    expect(nad.doubletRatio as number).toBeCloseTo(nad.ewD2 / nad.ewD1, 12)
  })
  it('log N from the doublet ratio within 0.1 dex of the truth, b within 30 %, velocity within 15 km/s', () => {
    expect(Math.abs((nad.logN as number) - truth.logN)).toBeLessThan(0.1)
    expect(Math.abs((nad.b as number) / truth.b - 1)).toBeLessThan(0.3)
    expect(Math.abs(nad.velocity - truth.velocity)).toBeLessThan(15)
    expect(nad.logNError as number).toBeGreaterThan(0)
  })
  it('He I 5876 emission is fitted with it; the stellar caution flag and note come with every Na I D result', () => {
    const hei = r.lines.hei_5876 as DetectedLine
    expect(hei.detected).toBe(true)
    expect(Math.abs(hei.flux - 25) / hei.error).toBeLessThan(4)
    expect(nad.flags).toContain('stellar-absorption-not-separated')
    expect(nad.note).toBe(NAD_NOTE)
    // He I is not a /diagnostics line: it stays out of measurements
    expect(r.measurements.lines).not.toHaveProperty('hei_5876')
  })
  it('He I at the D2 position is flagged blended:hei_5876 (project choice: centres within 2 (σ_HeI + σ_D2))', () => {
    const b = syntheticSpectrum({
      seed: 9, redshift: 0.028, wavelength: { start: 5800, end: 6200, step: 0.8 }, continuum: { level: 30 }, noise: 0.25, resolution: { fwhmAngstrom: 2.0 },
      lines: [{ id: 'hei_5876', flux: 40, sigma: 250, velocity: 300 }], nad: { logN: 13.0, b: 120, velocity: -200 },
    })
    expect(fitSpectrum(b.spectrum).flags).toContain('blended:hei_5876')
    expect(r.flags).not.toContain('blended:hei_5876')
  })
  it('no Na I D in the data → detected: false with an EW upper limit of minSnr·σ', () => {
    const none = syntheticSpectrum({ seed: 3, redshift: 0.028, wavelength: { start: 5800, end: 6200, step: 0.8 }, continuum: { level: 30 }, noise: 0.25, resolution: { fwhmAngstrom: 2.0 }, lines: [] })
    const n = fitSpectrum(none.spectrum).absorption.nad as Extract<NadResult, { detected: false }>
    expect(n.detected).toBe(false)
    expect(n.ewUpperLimit).toBeGreaterThan(0)
    expect(n.ewUpperLimit).toBeLessThan(0.2)
  })
})

describe('flags, limits and measurements (README §13.10)', () => {
  const s = oneComponent(21)
  const r = fitSpectrum(s.spectrum, {}, { minSnr: 3 })
  it('lines outside the spectrum are absent with not-covered:<id>; Na I D likewise with not-covered:nad', () => {
    expect(r.lines.oii_3726).toBeUndefined()
    expect(r.flags).toContain('not-covered:oii_3726')
    expect(r.flags).toContain('not-covered:hgamma')
    const blue = fitSpectrum({ ...s.spectrum, wavelength: s.spectrum.wavelength.slice(0, 200), flux: s.spectrum.flux.slice(0, 200), error: s.spectrum.error.slice(0, 200) })
    expect(blue.flags).toContain('not-covered:nad')
    expect(blue.absorption.nad).toBeUndefined()
  })
  it('an undetected line is { detected: false, upperLimit: minSnr·σ_F } and goes to measurements as { upperLimit }', () => {
    const oi = r.lines.oi_6300
    expect(oi.detected).toBe(false)
    if (oi.detected) return
    expect(oi.upperLimit).toBeGreaterThan(0)
    expect(r.measurements.lines.oi_6300).toEqual({ upperLimit: oi.upperLimit })
    const strict = fitSpectrum(s.spectrum, {}, { minSnr: 5 }).lines.oi_6300
    expect(strict.detected).toBe(false)
    if (!strict.detected) expect(strict.upperLimit / oi.upperLimit).toBeCloseTo(5 / 3, 3)
  })
  it('measurements are a valid galaxy for /diagnostics (GalaxyInputSchema) and every number is finite', () => {
    assertAllFinite(r)
    const g = GalaxyInputSchema.safeParse({ id: 'x', lines: r.measurements.lines, ew: r.measurements.ew, fwhm: r.measurements.fwhm })
    expect(g.success).toBe(true)
    expect(r.measurements.ew.halpha as number).toBeCloseTo((r.lines.halpha as DetectedLine).ew as number, 12)
  })
  it('the EW is rest frame against the fitted continuum, emission positive: F/(C (1 + z)) (README §13.8)', () => {
    const ha = r.lines.halpha as DetectedLine
    expect(ha.ew as number).toBeCloseTo(300 / (12 * 1.03), 0)
    expect(Math.abs((ha.ew as number) - 300 / (12 * 1.03)) / (ha.ewError as number)).toBeLessThan(4)
  })
  it('no resolution → no-instrumental-correction and uncorrected widths', () => {
    const { resolution: _omit, ...bare } = s.spectrum
    const u = fitSpectrum(bare, { broadHalpha: 'off', absorption: [] })
    expect(u.flags).toContain('no-instrumental-correction')
    const ha = u.lines.halpha as DetectedLine
    expect(ha.sigmaInstrumental).toBeUndefined()
    expect(ha.sigmaIntrinsic).toBe(ha.sigma)
  })
  it('lines narrower than the instrument → sigmaIntrinsic 0 and unresolved:<id> (σ ≤ σ_inst)', () => {
    const n = oneComponent(5, { noise: 0, lines: [{ id: 'halpha', flux: 300, sigma: 0 }, { id: 'nii_6584', flux: 100, sigma: 0 }] })
    const u = fitSpectrum(n.spectrum, { broadHalpha: 'off', absorption: [] })
    const ha = u.lines.halpha as DetectedLine
    expect(ha.sigmaIntrinsic).toBe(0)
    expect(ha.sigma).toBeCloseTo(ha.sigmaInstrumental as number, 4)
    expect(u.flags).toContain('unresolved:halpha')
    expect(u.flags).not.toContain('unresolved:hbeta')
  })
  it('a fixed Balmer absorption EW adds EW·C·(1 + z) to the Balmer fluxes and EW to their EWs, flagged', () => {
    const c = fitSpectrum(s.spectrum, { balmerAbsorptionEw: 1.5 })
    const a = r.lines.hbeta as DetectedLine
    const b = c.lines.hbeta as DetectedLine
    expect(c.flags).toContain('balmer-absorption-corrected')
    expect((b.ew as number) - (a.ew as number)).toBeCloseTo(1.5, 9)
    expect(b.flux - a.flux).toBeCloseTo(1.5 * 1.03 * a.flux / ((a.ew as number) * 1.03), 6)
    expect((c.lines.oiii_5007 as DetectedLine).flux).toBe((r.lines.oiii_5007 as DetectedLine).flux)
  })
  it('vacuum wavelengths: the same lines in a vacuum spectrum give the same fluxes (rest wavelengths converted, README §13.4)', () => {
    const v = oneComponent(21, { medium: 'vacuum' })
    const rv = fitSpectrum(v.spectrum, { broadHalpha: 'off', absorption: [] })
    expect(Math.abs((rv.lines.halpha as DetectedLine).velocity)).toBeLessThan(4 * (rv.lines.halpha as DetectedLine).velocityError)
    expect(Math.abs((rv.lines.halpha as DetectedLine).flux - 300) / (rv.lines.halpha as DetectedLine).error).toBeLessThan(4)
  })
})

describe('Lorentzian and Voigt profiles (README §13.1, §13.6)', () => {
  it('a noiseless Voigt line is recovered exactly: σ, γ, flux and σ = FWHM_V/2.3548', () => {
    const s = syntheticSpectrum({
      seed: 1, redshift: 0.01, wavelength: { start: 6400, end: 6720, step: 0.7 }, continuum: { level: 5 }, noise: 0, profile: 'voigt',
      resolution: { fwhmKmPerS: 120 }, lines: [{ id: 'halpha', flux: 200, sigma: 80, gamma: 60 }, { id: 'nii_6584', flux: 60, sigma: 80, gamma: 60 }],
    })
    const r = fitSpectrum(s.spectrum, { profile: 'voigt', broadHalpha: 'off', absorption: [] })
    const ha = r.lines.halpha as DetectedLine
    expect(ha.flux).toBeCloseTo(200, 4)
    expect(ha.gammaIntrinsic as number).toBeCloseTo(60, 3)
    expect(ha.sigmaInstrumental as number).toBeCloseTo(120 / 2.354820045, 6)
  })
  it('a noiseless Lorentzian (an intrinsic Lorentzian convolved with the instrument) is recovered exactly', () => {
    const s = syntheticSpectrum({
      seed: 1, redshift: 0.01, wavelength: { start: 6400, end: 6720, step: 0.7 }, continuum: { level: 5 }, noise: 0, profile: 'lorentzian',
      resolution: { resolvingPower: 3000 }, lines: [{ id: 'halpha', flux: 200, gamma: 90 }],
    })
    const r = fitSpectrum(s.spectrum, { profile: 'lorentzian', broadHalpha: 'off', absorption: [] })
    expect((r.lines.halpha as DetectedLine).flux).toBeCloseTo(200, 4)
    expect((r.lines.halpha as DetectedLine).gammaIntrinsic as number).toBeCloseTo(90, 3)
  })
})

describe('Monte Carlo errors (README §13.9)', () => {
  it('seeded: the same seed gives the same errors; at S/N ≳ 20 they match the covariance errors within 20 %', () => {
    const s = oneComponent(8)
    const opts = { broadHalpha: 'off', absorption: [], monteCarlo: { draws: 150, seed: 7 } } as const
    const a = fitSpectrum(s.spectrum, opts)
    const b = fitSpectrum(s.spectrum, opts)
    const c = fitSpectrum(s.spectrum, { broadHalpha: 'off', absorption: [] })
    expect(b.lines.halpha).toEqual(a.lines.halpha)
    for (const id of ['halpha', 'oiii_5007', 'nii_6584']) {
      const m = a.lines[id] as DetectedLine
      const k = c.lines[id] as DetectedLine
      expect(m.flux).toBe(k.flux)
      expect(Math.abs(m.error / k.error - 1), id).toBeLessThan(0.2)
      expect(Math.abs(m.velocityError / k.velocityError - 1), id).toBeLessThan(0.2)
    }
  })
})
