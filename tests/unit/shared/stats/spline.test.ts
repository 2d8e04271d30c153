import { describe, expect, it } from 'vitest'
import { evaluateSpline, naturalCubicSpline } from '../../../../shared/stats/spline.ts'
import { horner, hornerDerivative } from '../../../../shared/stats/polynomial.ts'

describe('natural cubic spline (Press et al. 2007, §3.3)', () => {
  it('interpolates its knots and is exact for straight lines', () => {
    const s = naturalCubicSpline([0, 1, 2, 4], [1, 3, 2, 5])
    expect(evaluateSpline(s, 1)).toBeCloseTo(3, 14)
    expect(evaluateSpline(s, 4)).toBeCloseTo(5, 14)
    const line = naturalCubicSpline([0, 1, 3], [1, 3, 7])
    expect(evaluateSpline(line, 2.2)).toBeCloseTo(5.4, 14)
    // three knots 0,1,0: natural spline value 0.6875 at 0.5 (worked by hand: y2 = [0, −3, 0])
    expect(evaluateSpline(naturalCubicSpline([0, 1, 2], [0, 1, 0]), 0.5)).toBeCloseTo(0.6875, 14)
  })
  it('rejects bad knots', () => {
    expect(() => naturalCubicSpline([0, 1], [0, 1])).toThrow(RangeError)
    expect(() => naturalCubicSpline([0, 1, 1], [0, 1, 2])).toThrow(RangeError)
  })
})

describe('Horner evaluation', () => {
  it('evaluates a polynomial and its derivative', () => {
    expect(horner([1, 2, 3], 2)).toBe(17)
    expect(hornerDerivative([1, 2, 3], 2)).toBe(14)
  })
})
