import { describe, expect, it } from 'vitest'
import { histogramMedian, histogramOf } from '../../../../../src/lib/spectra/kinematics'

describe('kinematics histograms', () => {
  it('take bin edges as they are', () => {
    expect(histogramOf({ bins: [-100, 0, 100], counts: [3, 5] })).toEqual({ edges: [-100, 0, 100], counts: [3, 5] })
  })

  it('turn bin centres into edges half way between them', () => {
    expect(histogramOf({ bins: [50, 150, 250], counts: [1, 2, 3] })).toEqual({ edges: [0, 100, 200, 300], counts: [1, 2, 3] })
    expect(histogramOf({ bins: [7], counts: [4] })).toEqual({ edges: [6.5, 7.5], counts: [4] })
  })

  it('refuse shapes that do not fit together', () => {
    expect(histogramOf({ bins: [1, 2, 3, 4], counts: [1] })).toBeNull()
    expect(histogramOf({ bins: [], counts: [] })).toBeNull()
    expect(histogramOf(null)).toBeNull()
  })

  it('interpolate the median inside its bin', () => {
    // 10 values: 2 in [0,100), 6 in [100,200), 2 in [200,300): the 5th value sits half way into the middle bin
    expect(histogramMedian({ edges: [0, 100, 200, 300], counts: [2, 6, 2] })).toBe(150)
    expect(histogramMedian({ edges: [0, 1], counts: [0] })).toBeNull()
  })
})
