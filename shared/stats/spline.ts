/** A natural cubic spline: knots and second derivatives, ready for `evaluateSpline`. */
export interface NaturalCubicSpline {
  x: Float64Array
  y: Float64Array
  /** second derivatives at the knots (zero at both ends: "natural") */
  y2: Float64Array
}

/**
 * Natural cubic spline through (x_i, y_i), i.e. the interpolating cubic spline with zero second
 * derivative at both end knots.
 * Source: Press et al. 2007, Numerical Recipes 3rd ed., §3.3, eqs. (3.3.7)–(3.3.9) (tridiagonal
 * system for the second derivatives; from memory, shared/science/README.md §12 equation numbers).
 *
 * @param x  strictly increasing knot abscissae (any unit)
 * @param y  ordinates at the knots (any unit)
 * @returns the spline; evaluate with `evaluateSpline`
 * @throws {RangeError} fewer than 3 knots, unequal lengths or non-increasing x
 * @example evaluateSpline(naturalCubicSpline([0, 1, 2], [0, 1, 0]), 0.5) // 0.6875
 */
export function naturalCubicSpline(x: readonly number[], y: readonly number[]): NaturalCubicSpline {
  const n = x.length
  if (n < 3 || y.length !== n) throw new RangeError(`naturalCubicSpline needs ≥ 3 knots of equal length, got ${n}`)
  for (let i = 1; i < n; i++) {
    if (!(x[i] > x[i - 1])) throw new RangeError(`naturalCubicSpline needs increasing x, got x[${i}] = ${x[i]}`)
  }
  const y2 = new Float64Array(n)
  const u = new Float64Array(n)
  for (let i = 1; i < n - 1; i++) {
    const sig = (x[i] - x[i - 1]) / (x[i + 1] - x[i - 1])
    const p = sig * y2[i - 1] + 2
    y2[i] = (sig - 1) / p
    const d = (y[i + 1] - y[i]) / (x[i + 1] - x[i]) - (y[i] - y[i - 1]) / (x[i] - x[i - 1])
    u[i] = ((6 * d) / (x[i + 1] - x[i - 1]) - sig * u[i - 1]) / p
  }
  y2[n - 1] = 0
  for (let k = n - 2; k >= 0; k--) y2[k] = y2[k] * y2[k + 1] + u[k]
  return { x: Float64Array.from(x), y: Float64Array.from(y), y2 }
}

/**
 * Value of a natural cubic spline at `t` (the end cubics are used beyond the end knots).
 * Source: Press et al. 2007, Numerical Recipes 3rd ed., §3.3, eq. (3.3.3) (from memory, shared/science/README.md §12).
 *
 * @param s  spline from `naturalCubicSpline`
 * @param t  abscissa (unit of the knots)
 * @returns the interpolated ordinate
 * @example evaluateSpline(naturalCubicSpline([0, 1, 2], [0, 1, 0]), 1) // 1
 */
export function evaluateSpline(s: NaturalCubicSpline, t: number): number {
  const { x, y, y2 } = s
  let lo = 0
  let hi = x.length - 1
  while (hi - lo > 1) {
    const mid = (hi + lo) >> 1
    if (x[mid] > t) hi = mid
    else lo = mid
  }
  const h = x[hi] - x[lo]
  const a = (x[hi] - t) / h
  const b = (t - x[lo]) / h
  return a * y[lo] + b * y[hi] + ((a * a * a - a) * y2[lo] + (b * b * b - b) * y2[hi]) * (h * h) / 6
}
