import { describe, expect, it } from 'vitest'
import type { SpectrumData, SpectrumModelCurves } from '../../../../../src/api/spectra-types'
import { fluxAxisTitle, prepareCurves, residualRange, spectrumLayout, spectrumTraces, windowChange } from '../../../../../src/lib/spectra/spectrum-figure'

const n = 2000
const wavelength = Array.from({ length: n }, (_, i) => 6400 + 0.5 * i)
const gauss = (c: number, s: number, a: number) => wavelength.map((l) => a * Math.exp(-0.5 * ((l - c) / s) ** 2))
const continuum = wavelength.map(() => 10)
const ha = gauss(6600, 2, 30), nii = gauss(6620, 2, 10)
const total = continuum.map((c, i) => c + ha[i] + nii[i])
// a bad pixel (100) reads flux 0 with its error null, as the server stores it
const spectrum: SpectrumData = {
  id: 1, galaxyId: 'G', redshift: 0.005, wavelengthMedium: 'air', fluxUnit: 1e-17, resolution: null, fileName: 'g.csv', source: 'columns wavelength, flux, error',
  createdAt: '2026-12-03T07:00:00Z', wavelength,
  flux: total.map((v, i) => (i === 100 ? 0 : v + (i % 2 ? 0.5 : -0.5))), error: wavelength.map((_, i) => (i === 100 ? null : 0.5)),
}
const model: SpectrumModelCurves = {
  continuum, total, windows: [],
  components: [{ line: 'halpha', kind: 'narrow', values: ha }, { line: 'nii_6584', kind: 'narrow', values: nii }],
}

describe('spectrum figure', () => {
  it('writes the flux unit on the axis', () => {
    expect(fluxAxisTitle(1e-17)).toBe('F_λ (10⁻¹⁷ erg s⁻¹ cm⁻² Å⁻¹)')
    expect(fluxAxisTitle(1)).toBe('F_λ (erg s⁻¹ cm⁻² Å⁻¹)')
    expect(fluxAxisTitle(2.5e-17)).toBe('F_λ (2.50e-17 erg s⁻¹ cm⁻² Å⁻¹)')
  })

  it('draws band, data, continuum, one trace per component kind, model and residual', () => {
    const c = prepareCurves(spectrum, model)
    const traces = spectrumTraces(c, { range: null, buckets: 400, dark: false, fluxUnit: 1e-17 })
    expect(traces.map((t) => t.name)).toEqual(['error band lower', '±1σ', 'Data', 'Continuum', 'Narrow lines', 'Model', 'Residual'])
    const residual = traces[6] as { y: (number | null)[]; yaxis: string }
    expect(residual.yaxis).toBe('y2')
    // data = model ± 0.5 with σ = 0.5: every residual is ±1
    expect(residual.y.filter((v) => v !== null).every((v) => Math.abs(Math.abs(v!) - 1) < 1e-9)).toBe(true)
    // the two lines are separate runs of one trace, split by a null
    const narrow = traces[4] as { x: (number | null)[]; text: string[] }
    expect(narrow.x.filter((v) => v === null).length).toBe(2)
    expect(new Set(narrow.text.filter(Boolean))).toEqual(new Set(['Hα 6563', '[N II] 6584']))
  })

  it('draws only the pixels of the zoomed window, all of them', () => {
    const c = prepareCurves(spectrum, model)
    const traces = spectrumTraces(c, { range: [6590, 6610], buckets: 400, dark: false, fluxUnit: 1 })
    const x = (traces[2] as { x: number[] }).x
    expect(x[0]).toBe(6589.5)
    expect(x[x.length - 1]).toBe(6610.5)
    expect(x.length).toBe(43)
  })

  it('overlays a refit with its own model and residual', () => {
    const trial = { ...model, total: total.map((v) => v + 1) }
    const c = prepareCurves(spectrum, model, trial)
    const names = spectrumTraces(c, { range: null, buckets: 300, dark: true, fluxUnit: 1, trialName: 'Refit (Voigt)' }).map((t) => t.name)
    expect(names).toContain('Refit (Voigt)')
    expect(names).toContain('Refit: Narrow lines')
    expect(names).toContain('Refit residual')
  })

  it('keeps residuals within ±3σ … ±10σ and shares the x axis', () => {
    expect(residualRange([{ yaxis: 'y2', y: [0.2, -1] } as never])).toEqual([-3, 3])
    expect(residualRange([{ yaxis: 'y2', y: [5, -2] } as never])[1]).toBeCloseTo(5.5, 12)
    expect(residualRange([{ yaxis: 'y2', y: [50] } as never])).toEqual([-10, 10])
    const c = prepareCurves(spectrum, model)
    const o = { range: [6590, 6610] as [number, number], buckets: 400, dark: false, fluxUnit: 1 }
    const layout = spectrumLayout(spectrumTraces(c, o), o, true)
    expect(layout.xaxis?.anchor).toBe('y2')
    expect(layout.xaxis?.range).toEqual([6590, 6610])
    expect(layout.yaxis?.autorange).toBe(true)
    expect(spectrumLayout([], { ...o, range: null }, false).yaxis2).toBeUndefined()
  })
})

describe('window changes from plotly', () => {
  it('reads a zoom box, a pan, a double click and an unrelated event', () => {
    expect(windowChange({ 'xaxis.range[0]': 6550, 'xaxis.range[1]': 6600, 'yaxis.range[0]': 0, 'yaxis.range[1]': 40 })).toEqual({ x: [6550, 6600], y: [0, 40] })
    expect(windowChange({ 'xaxis.range': [6500, 6520] })).toEqual({ x: [6500, 6520], y: undefined })
    expect(windowChange({ 'xaxis.autorange': true, 'yaxis.autorange': true })).toEqual({ x: 'auto', y: 'auto' })
    expect(windowChange({ dragmode: 'pan' })).toEqual({ x: undefined, y: undefined })
    expect(windowChange(null)).toEqual({})
  })
})
