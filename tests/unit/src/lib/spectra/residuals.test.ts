import { describe, expect, it } from 'vitest'
import { chi2Of, errorBand, onContinuum, residuals, trimComponent } from '../../../../../src/lib/spectra/residuals'

describe('residuals', () => {
  it('are (data − model)/σ per pixel, null where a pixel is bad or unmodelled (common practice)', () => {
    expect(residuals([10, 12, 8, 5, 5], [10, 10, 10, null, 5], [1, 2, 0.5, 1, null])).toEqual([0, 1, -4, null, null])
    expect(residuals([10, 12], [10, 10], [1, 0])).toEqual([0, null])
    expect(residuals([10, 12], [10, 10], [1, 2], false)).toEqual([0, 2])
  })

  it('sum to χ² over the good pixels of a range', () => {
    const r = chi2Of([10, 12, 8, 5], [10, 10, 10, 5], [1, 2, 0.5, null])
    expect(r).toEqual({ chi2: 0 + 1 + 16, pixels: 3 })
    expect(chi2Of([10, 12, 8, 5], [10, 10, 10, 5], [1, 2, 0.5, 1], 1, 3)).toEqual({ chi2: 17, pixels: 2 })
  })

  it('give the ±1σ band, with gaps at bad pixels', () => {
    expect(errorBand([10, 5, null], [2, null, 1])).toEqual({ lower: [8, null, null], upper: [12, null, null] })
  })

  it('lift a component onto the continuum and trim it to its line', () => {
    expect(onContinuum([1, null, 2], [10, 10, null])).toEqual([11, null, null])
    const gauss = Array.from({ length: 41 }, (_, i) => Math.exp(-0.5 * ((i - 20) / 2) ** 2))
    const t = trimComponent(gauss, 1e-3, 1)
    // exp(−x²/2) ≥ 1e-3 for |x| ≤ 3.72: |i − 20| ≤ 7, then one pixel of padding
    expect(t.findIndex((v) => v !== null)).toBe(12)
    expect(t.length - 1 - [...t].reverse().findIndex((v) => v !== null)).toBe(28)
    expect(t[20]).toBe(1)
    expect(trimComponent([0, 0, null])).toEqual([0, 0, null])
  })
})
