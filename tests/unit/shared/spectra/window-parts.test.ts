import { describe, expect, it } from 'vitest'
import { createSpectrumModel, prepareSpectrum, setupFit, sodiumExample, windowPixels, withoutAbsorption } from '../../../../shared/spectra/index.ts'
import { variableProjection } from '../../../../shared/spectra/variable-projection.ts'
import { runFit } from '../../../../shared/spectra/fit.ts'
import { syntheticSpectrum } from '../../../../shared/spectra/synthetic.ts'

/**
 * The pieces the staged fit rests on (shared/science/README.md §13.7, project choice): held parameters,
 * the emission-only view of the pixels, and one window on its own, whose χ² is that window's share of the
 * whole (the windows share no pixels and their linear parameters are solved window by window).
 */
const s = sodiumExample(3)
const spec = prepareSpectrum(s.spectrum)
const setup = setupFit(spec, s.spectrum, false, true, 1)
const config = { profile: 'gaussian', components: 1, broad: false, hasInstrument: setup.hasInstrument } as const

describe('window parts of the spectrum fit (README §13.7)', () => {
  it('a held parameter keeps its value and is neither iterated nor free', () => {
    const free = createSpectrumModel(setup.pixels, config)
    const held = createSpectrumModel(setup.pixels, config, new Map([['n0.v', 25], ['n0.s', 90]]))
    const iv = held.names.indexOf('n0.v')
    expect(held.separable.nonlinear.length).toBe(free.separable.nonlinear.length - 2)
    expect([held.problem.lower[iv], held.problem.upper[iv]]).toEqual([25, 25])
    const r = variableProjection(held.separable, held.initial())
    expect(r.p[iv]).toBe(25)
    expect(r.p[held.names.indexOf('n0.s')]).toBe(90)
  })

  it('without absorption the Na I D window keeps its continuum and He I but no equivalent widths', () => {
    const m = createSpectrumModel(withoutAbsorption(setup.pixels), config)
    expect(m.ewParam).toBeNull()
    expect(m.groups.some((g) => g.kind === 'absorption')).toBe(false)
    const nadWindow = setup.pixels.windows.find((w) => w.absorption.length > 0)
    expect(nadWindow).toBeDefined()
    expect(m.names).toContain(`${nadWindow?.id}.c0`)
  })

  it('the χ² of the whole is the sum of its windows alone at the same kinematics (to rounding)', () => {
    const whole = createSpectrumModel(setup.pixels, config)
    const fit = variableProjection(whole.separable, whole.initial())
    const held = new Map(whole.names.map((name, j) => [name, fit.p[j]] as const).filter(([name]) => name.startsWith('n0.') || name.startsWith('absorption.') || name.startsWith('nad.')))
    let sum = 0
    setup.pixels.windows.forEach((_, wi) => {
      const part = createSpectrumModel(windowPixels(setup.pixels, wi), config, held)
      sum += variableProjection(part.separable, part.initial(), { covariance: false }).chi2
    })
    expect(sum).toBeCloseTo(fit.chi2, 6)
  })
})

describe('a width that reaches zero (README §13.7)', () => {
  // σ_λ² = (λσ/c)² + σ_inst² is flat in σ at σ = 0: a start there is a stationary point of the fit
  const wide = syntheticSpectrum({
    seed: 11, redshift: 0.2, wavelength: { start: 6400 * 1.2, end: 6800 * 1.2, step: 1.5 }, continuum: { level: 9 }, noise: 1.7,
    resolution: { fwhmAngstrom: 2.8 }, lines: [{ id: 'halpha', flux: 170, sigma: 63 }, { id: 'nii_6584', flux: 100, sigma: 63 }],
  })
  const ws = setupFit(prepareSpectrum(wide.spectrum), wide.spectrum, false, false, 1)
  const model = createSpectrumModel(ws.pixels, { profile: 'gaussian', components: 1, broad: false, hasInstrument: true })
  const is = model.names.indexOf('n0.s')

  it('Gauss–Newton alone stays at zero width from a start there', () => {
    const p0 = model.initial()
    p0[is] = 0
    expect(variableProjection(model.separable, p0).p[is]).toBe(0)
  })

  it('the fit probes wider widths and finds the drawn one (σ = 63 km/s, seeded synthetic truth) within 3σ', () => {
    const p0 = model.initial()
    p0[is] = 0
    const r = runFit(model, p0)
    const sd = Math.sqrt(r.covariance[is * r.p.length + is])
    expect(r.p[is]).toBeGreaterThan(30)
    expect(Math.abs(r.p[is] - 63)).toBeLessThan(3 * sd)
  })
})
