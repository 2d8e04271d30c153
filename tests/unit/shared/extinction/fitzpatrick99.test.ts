import { describe, expect, it } from 'vitest'
import { fitzpatrick99Anchors, fitzpatrick99K, fitzpatrick99UvK } from '../../../../shared/extinction/fitzpatrick99.ts'

describe('fitzpatrick99K', () => {
  it('matches k at the line wavelengths and the fixture wavelengths for R_V = 3.1', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4; 3 d.p. → ±0.0006
    const table: Array<[number, number]> = [
      [6562.8, 2.358], [4861.33, 3.615], [4340.47, 4.112], [4101.74, 4.322], [5006.84, 3.47], [6583.45, 2.346],
      [6716.44, 2.276], [6300.3, 2.506], [3726.03, 4.665], [1500, 8.068], [2175, 9.535], [3000, 5.57], [3650, 4.739],
      [4400, 4.059], [5500, 3.031], [7000, 2.133], [9000, 1.403], [12200, 0.829], [16500, 0.512], [22000, 0.338],
    ]
    for (const [l, k] of table) expect(Math.abs(fitzpatrick99K(l, 3.1) - k), `${l} Å`).toBeLessThan(6e-4)
  })
  it('passes the spline through its anchors (natural cubic spline interpolates the knots)', () => {
    // Fitzpatrick 1999, PASP 111, 63, §4: the curve is a spline through the anchor points (exact identity)
    const anchors = fitzpatrick99Anchors(3.1)
    const knots = [26500, 12200, 6000, 5470, 4670, 4110]
    knots.forEach((l, j) => expect(fitzpatrick99K(l, 3.1)).toBeCloseTo(anchors[j + 1], 12))
    // the UV anchor at 2700 Å is the FM90 value
    expect(fitzpatrick99K(2700, 3.1)).toBeCloseTo(fitzpatrick99UvK(1e4 / 2700, 3.1), 12)
  })
  it('refuses λ outside 1150 Å – 6 µm (project convention, shared/science/README.md §1.3)', () => {
    expect(() => fitzpatrick99K(1100, 3.1)).toThrow(RangeError)
    expect(() => fitzpatrick99K(61000, 3.1)).toThrow(RangeError)
  })
})
