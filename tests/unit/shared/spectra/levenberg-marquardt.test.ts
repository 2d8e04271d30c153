import { describe, expect, it } from 'vitest'
import { levenbergMarquardt, type LeastSquaresProblem } from '../../../../shared/spectra/index.ts'

/**
 * Weighted Levenberg–Marquardt (Marquardt 1963, J. Soc. Ind. Appl. Math. 11, 431; Press et al. 2007,
 * Numerical Recipes 3rd ed., §15.5 — section number from memory; shared/science/README.md §13.7).
 */
function problem(x: number[], y: number[], s: number[], f: (p: Float64Array, x: number) => number, grad: (p: Float64Array, x: number) => number[], lower: number[], upper: number[]): LeastSquaresProblem {
  const n = x.length
  const k = lower.length
  return {
    y: Float64Array.from(y), weight: Float64Array.from(s.map((v) => 1 / (v * v))),
    lower: Float64Array.from(lower), upper: Float64Array.from(upper),
    columnStart: new Int32Array(k), columnEnd: new Int32Array(k).fill(n),
    model: (p, out) => { for (let i = 0; i < n; i++) out[i] = f(p, x[i]) },
    jacobian: (p, _m, cols) => { for (let i = 0; i < n; i++) grad(p, x[i]).forEach((g, j) => { cols[j][i] = g }) },
  }
}

describe('Levenberg–Marquardt with bounds and covariance (README §13.7)', () => {
  it('a straight line gives the weighted least-squares solution and covariance in closed form (Bevington & Robinson 2003, ch. 6)', () => {
    const x = [0, 1, 2, 3, 4, 5, 6]
    const y = [1.1, 2.9, 5.2, 6.8, 9.1, 11.2, 12.8]
    const s = [0.1, 0.2, 0.1, 0.3, 0.2, 0.1, 0.2]
    const r = levenbergMarquardt(problem(x, y, s, (p, t) => p[0] + p[1] * t, (_p, t) => [1, t], [-Infinity, -Infinity], [Infinity, Infinity]), new Float64Array([0, 0]))
    let S = 0, Sx = 0, Sxx = 0, Sy = 0, Sxy = 0
    x.forEach((t, i) => { const w = 1 / s[i] ** 2; S += w; Sx += w * t; Sxx += w * t * t; Sy += w * y[i]; Sxy += w * t * y[i] })
    const D = S * Sxx - Sx * Sx
    expect(r.converged).toBe(true)
    expect(r.p[0]).toBeCloseTo((Sxx * Sy - Sx * Sxy) / D, 10)
    expect(r.p[1]).toBeCloseTo((S * Sxy - Sx * Sy) / D, 10)
    expect(r.covariance[0]).toBeCloseTo(Sxx / D, 12)
    expect(r.covariance[3]).toBeCloseTo(S / D, 12)
    expect(r.covariance[1]).toBeCloseTo(-Sx / D, 12)
  })

  it('finds the minimum of a non-linear exponential decay from a poor start (Numerical Recipes §15.5 test case, common practice)', () => {
    const x = Array.from({ length: 30 }, (_, i) => i * 0.2)
    const y = x.map((t) => 5 * Math.exp(-0.7 * t) + 1)
    const s = x.map(() => 0.01)
    const f = (p: Float64Array, t: number) => p[0] * Math.exp(-p[1] * t) + p[2]
    const g = (p: Float64Array, t: number) => [Math.exp(-p[1] * t), -p[0] * t * Math.exp(-p[1] * t), 1]
    const r = levenbergMarquardt(problem(x, y, s, f, g, [-Infinity, 0, -Infinity], [Infinity, Infinity, Infinity]), new Float64Array([1, 3, 0]))
    expect(r.p[0]).toBeCloseTo(5, 8)
    expect(r.p[1]).toBeCloseTo(0.7, 8)
    expect(r.p[2]).toBeCloseTo(1, 8)
    expect(r.chi2).toBeLessThan(1e-12)
  })

  it('a bound holds: a mean of negative data constrained to ≥ 0 stops at 0 (projected steps)', () => {
    const x = [0, 1, 2, 3]
    const r = levenbergMarquardt(problem(x, [-1, -2, -1.5, -0.5], [1, 1, 1, 1], (p) => p[0], () => [1], [0], [Infinity]), new Float64Array([3]))
    expect(r.p[0]).toBe(0)
    expect(r.chi2).toBeCloseTo(1 + 4 + 2.25 + 0.25, 12)
  })
})
