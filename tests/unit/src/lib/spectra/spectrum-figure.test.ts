import { describe, expect, it } from 'vitest'
import type { SpectrumData, SpectrumModelCurves } from '../../../../../src/api/spectra-types'
import { fluxAxisTitle, imageLayout, legendItems, prepareCurves, residualRange, spectrumLayout, spectrumTraces, windowChange } from '../../../../../src/lib/spectra/spectrum-figure'

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
    const residual = traces[6] as { y: Float64Array; yaxis: string }
    expect(residual.yaxis).toBe('y2')
    // data = model ± 0.5 with σ = 0.5: every residual is ±1; the bad pixel is a gap
    const r = Array.from(residual.y)
    expect(r.filter((v) => !Number.isNaN(v)).every((v) => Math.abs(Math.abs(v) - 1) < 1e-9)).toBe(true)
    expect(r.filter((v) => Number.isNaN(v)).length).toBe(1)
    // the two lines are separate runs of one trace, split by a NaN gap
    const narrow = traces[4] as { x: Float64Array; text: string[] }
    expect(Array.from(narrow.x).filter((v) => Number.isNaN(v)).length).toBe(2)
    expect(new Set(narrow.text.filter(Boolean))).toEqual(new Set(['Hα 6563', '[N II] 6584']))
    // every curve is a typed array (plotly takes them without copying)
    for (const t of traces) expect((t as { y: unknown }).y).toBeInstanceOf(Float64Array)
  })

  it('draws only the pixels of the zoomed window, all of them', () => {
    const c = prepareCurves(spectrum, model)
    const traces = spectrumTraces(c, { range: [6590, 6610], buckets: 400, dark: false, fluxUnit: 1 })
    const x = (traces[2] as { x: Float64Array }).x
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

describe('the legend', () => {
  it('lists the shown curves once each, in order, and hides what is switched off', () => {
    const c = prepareCurves(spectrum, model)
    const o = { range: null, buckets: 400, dark: false, fluxUnit: 1 }
    const items = legendItems(spectrumTraces(c, o))
    expect(items.map((i) => i.name)).toEqual(['±1σ', 'Data', 'Continuum', 'Narrow lines', 'Model'])
    expect(items.find((i) => i.name === '±1σ')!.fill).toBeTruthy()
    expect(items.find((i) => i.name === 'Continuum')!.dash).toBe('dash')
    // the band is one entry for its two traces
    const hidden = new Set([items[0].key, 'Model'])
    const traces = spectrumTraces(c, { ...o, hidden })
    const visible = (name: string) => (traces.find((t) => t.name === name) as { visible?: boolean }).visible !== false
    expect(visible('error band lower')).toBe(false)
    expect(visible('±1σ')).toBe(false)
    expect(visible('Model')).toBe(false)
    expect(visible('Data')).toBe(true)
    expect(legendItems(traces, hidden).filter((i) => i.hidden).map((i) => i.name)).toEqual(['±1σ', 'Model'])
  })

  it('puts plotly\'s legend into the saved image', () => {
    const l = imageLayout({ margin: { l: 64, t: 8 }, showlegend: false })
    expect(l.showlegend).toBe(true)
    expect(l.margin).toEqual({ l: 64, t: 40 })
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
