import { describe, expect, it } from 'vitest'
import { chi2Of, curveOf, errorBand, onContinuum, residuals, trimComponent } from '../../../../../src/lib/spectra/residuals'

// the curves are Float64Arrays with NaN for gaps
const a = (c: Float64Array) => Array.from(c)

describe('residuals', () => {
  it('are (data − model)/σ per pixel, NaN where a pixel is bad or unmodelled (common practice)', () => {
    expect(residuals([10, 12, 8, 5, 5], [10, 10, 10, null, 5], [1, 2, 0.5, 1, null])).toBeInstanceOf(Float64Array)
    expect(a(residuals([10, 12, 8, 5, 5], [10, 10, 10, null, 5], [1, 2, 0.5, 1, null]))).toEqual([0, 1, -4, NaN, NaN])
    expect(a(residuals([10, 12], [10, 10], [1, 0]))).toEqual([0, NaN])
    expect(a(residuals([10, 12], [10, 10], [1, 2], false))).toEqual([0, 2])
  })

  it('turn values into curves: null and non-finite values are gaps', () => {
    expect(a(curveOf([1, null, NaN, Infinity, -2]))).toEqual([1, NaN, NaN, NaN, -2])
  })

  it('sum to χ² over the good pixels of a range', () => {
    const r = chi2Of([10, 12, 8, 5], [10, 10, 10, 5], [1, 2, 0.5, null])
    expect(r).toEqual({ chi2: 0 + 1 + 16, pixels: 3 })
    expect(chi2Of([10, 12, 8, 5], [10, 10, 10, 5], [1, 2, 0.5, 1], 1, 3)).toEqual({ chi2: 17, pixels: 2 })
  })

  it('give the ±1σ band, with gaps at bad pixels', () => {
    const band = errorBand([10, 5, null], [2, null, 1])
    expect({ lower: a(band.lower), upper: a(band.upper) }).toEqual({ lower: [8, NaN, NaN], upper: [12, NaN, NaN] })
  })

  it('lift a component onto the continuum and trim it to its line', () => {
    expect(a(onContinuum([1, null, 2], [10, 10, null]))).toEqual([11, NaN, NaN])
    const gauss = Array.from({ length: 41 }, (_, i) => Math.exp(-0.5 * ((i - 20) / 2) ** 2))
    const t = a(trimComponent(gauss, 1e-3, 1))
    // exp(−x²/2) ≥ 1e-3 for |x| ≤ 3.72: |i − 20| ≤ 7, then one pixel of padding
    expect(t.findIndex((v) => !Number.isNaN(v))).toBe(12)
    expect(t.length - 1 - [...t].reverse().findIndex((v) => !Number.isNaN(v))).toBe(28)
    expect(t.slice(12, 29).every((v) => !Number.isNaN(v))).toBe(true)
    expect(t[20]).toBe(1)
    expect(a(trimComponent([0, 0, null]))).toEqual([0, 0, NaN])
  })

  it('trim two lines apart into two runs, padded on both sides, a gap between', () => {
    const v = Array.from({ length: 60 }, (_, i) => (i === 10 || i === 11 || i === 40 ? 1 : 0))
    const t = a(trimComponent(v, 0.5, 2))
    const kept = t.map((x, i) => (Number.isNaN(x) ? -1 : i)).filter((i) => i >= 0)
    expect(kept).toEqual([8, 9, 10, 11, 12, 13, 38, 39, 40, 41, 42])
    // a bad value inside a run stays a gap
    const withBad: (number | null)[] = [...v]
    withBad[12] = null
    expect(Number.isNaN(trimComponent(withBad, 0.5, 2)[12])).toBe(true)
  })
})
