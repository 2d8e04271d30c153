import { describe, expect, it } from 'vitest'
import { percentileOfSorted, percentiles16_50_84, percentilesBySelection } from '../../../../shared/stats/percentiles.ts'
import { createRng } from '../../../../shared/stats/rng.ts'

describe('percentiles (Hyndman & Fan 1996, definition 7 — numpy default)', () => {
  it('interpolate linearly between order statistics', () => {
    // numpy.percentile([1, 2, 3, 4, 5], [16, 50, 84]) = 1.64, 3, 4.36 (numpy 1.24.2, linear method)
    expect(percentiles16_50_84([5, 1, 4, 2, 3])).toEqual({ p16: expect.closeTo(1.64, 12), p50: 3, p84: expect.closeTo(4.36, 12) })
    expect(percentileOfSorted([1, 2, 3, 4], 0.5)).toBe(2.5)
    expect(percentiles16_50_84([Number.NaN, Infinity])).toBeNull()
    expect(() => percentileOfSorted([], 0.5)).toThrow(RangeError)
  })
  it('selection gives exactly the sorted answer', () => {
    const rng = createRng(5)
    for (const m of [1, 2, 3, 10, 101, 2000]) {
      const a = Float64Array.from({ length: m }, () => rng.nextNormal())
      const sorted = Float64Array.from(a).sort()
      const out = new Float64Array(3)
      percentilesBySelection(a, m, out)
      expect(out[0]).toBe(percentileOfSorted(sorted, 0.16))
      expect(out[1]).toBe(percentileOfSorted(sorted, 0.5))
      expect(out[2]).toBe(percentileOfSorted(sorted, 0.84))
    }
  })
})
