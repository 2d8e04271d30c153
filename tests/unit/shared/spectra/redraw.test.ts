import { describe, expect, it } from 'vitest'
import { broadLineExample, fitSpectrum, sodiumExample, twoComponentExample } from '../../../../shared/spectra/index.ts'
import { modelOf } from '../../../../shared/spectra/redraw.ts'
import type { SpectrumFitResult, SpectrumInput } from '../../../../shared/spectra/types.ts'

/**
 * The fitted model redrawn on the spectrum's pixels (shared/spectra/redraw.ts) is the model the fit
 * minimised: its χ² over the drawn pixels is the fit's χ² (the weighted sum of squared residuals,
 * shared/science/README.md §13.6, common practice), and the continuum plus every component is the total.
 */
function chi2Of(s: SpectrumInput & { error: number[] }, total: Array<number | null>) {
  let chi2 = 0, n = 0
  total.forEach((m, i) => { if (m !== null) { chi2 += ((s.flux[i]! - m) / s.error[i]!) ** 2; n++ } })
  return { chi2, n }
}

function checkSums(m: ReturnType<typeof modelOf>) {
  m.total.forEach((t, i) => {
    if (t === null) { expect(m.continuum[i]).toBeNull(); return }
    const sum = m.continuum[i]! + m.components.reduce((a, c) => a + (c.values[i] ?? 0), 0)
    expect(Math.abs(sum - t)).toBeLessThan(1e-9 * Math.max(1, Math.abs(t)))
  })
}

describe('modelOf: the fit redrawn on the spectrum', () => {
  it('narrow lines and broad Hα: the χ² of the drawn model is the fit\'s, and continuum + components = total', () => {
    const { spectrum } = broadLineExample(3)
    const r = fitSpectrum(spectrum, { broadHalpha: 'auto' })
    expect(r.fit.broadHalpha).toBe(true)
    const m = modelOf(spectrum, r)
    expect(m.total).toHaveLength(spectrum.wavelength.length)
    const { chi2, n } = chi2Of(spectrum, m.total)
    expect(chi2).toBeCloseTo(r.fit.chi2, 6)
    expect(n).toBeGreaterThan(r.fit.dof)
    checkSums(m)
    const kinds = new Map(m.components.map((c) => [`${c.line}|${c.kind}`, c]))
    expect(kinds.has('halpha|narrow')).toBe(true)
    expect(kinds.has('halpha_broad|broad')).toBe(true)
    expect(kinds.has('oiii_5007|narrow')).toBe(true)
    // the broad line adds flux (its integral ≈ the fitted flux, to the pixel sampling: common practice)
    const broad = kinds.get('halpha_broad|broad')!.values
    const step = spectrum.wavelength[1]! - spectrum.wavelength[0]!
    const integral = broad.reduce<number>((a, v) => a + (v ?? 0), 0) * step
    expect(integral / (r.lines.halpha_broad as { flux: number }).flux).toBeCloseTo(1, 1)
    // outside the windows nothing is drawn
    expect(m.total[0]).toBeNull()
    expect(m.windows.length).toBeGreaterThan(1)
    for (const w of m.windows) expect(w.to).toBeGreaterThan(w.from)
  })

  it('two narrow components and Na I D absorption are drawn apart', () => {
    const two = twoComponentExample(5)
    const r2 = fitSpectrum(two.spectrum, { components: 2, broadHalpha: 'off' })
    const m2 = modelOf(two.spectrum, r2)
    expect(chi2Of(two.spectrum, m2.total).chi2).toBeCloseTo(r2.fit.chi2, 6)
    expect(m2.components.some((c) => c.kind === 'narrow2' && c.line === 'oiii_5007')).toBe(true)
    checkSums(m2)

    const nad = sodiumExample(2)
    const rn = fitSpectrum(nad.spectrum, {})
    const mn = modelOf(nad.spectrum, rn)
    expect(chi2Of(nad.spectrum, mn.total).chi2).toBeCloseTo(rn.fit.chi2, 6)
    const abs = mn.components.find((c) => c.kind === 'absorption')!
    expect(abs.line).toBe('nad')
    expect(Math.min(...abs.values.filter((v): v is number => v !== null))).toBeLessThan(0) // absorption takes flux away
    checkSums(mn)
  })

  it('a result without a model (nothing fitted) draws nothing', () => {
    const { spectrum } = sodiumExample(1)
    const m = modelOf(spectrum, { } as Pick<SpectrumFitResult, 'model'>)
    expect(m.components).toEqual([])
    expect(m.total.every((v) => v === null)).toBe(true)
  })
})
