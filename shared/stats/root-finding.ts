/** A function of x with parameters passed alongside (lets hot callers avoid allocating closures). */
export type ParametricFunction = (x: number, params: Float64Array) => number

const NO_PARAMS = new Float64Array(0)

/**
 * Root of a continuous function on a bracket [lo, hi] with f(lo)·f(hi) ≤ 0, by Newton steps that
 * fall back to bisection whenever a step would leave the current bracket (a "safeguarded" Newton
 * method; Press et al. 2007, Numerical Recipes 3rd ed., §9.4, routine rtsafe — from memory, shared/science/README.md §12).
 * The bracket shrinks every iteration, so the method cannot diverge.
 *
 * @param f        the function (any units)
 * @param fPrime   its derivative
 * @param lo       lower end of the bracket
 * @param hi       upper end of the bracket
 * @param absTol   stop when the bracket or the step is below this (unit of x)
 * @param maxIter  iteration cap (default 100)
 * @param params   optional parameters handed to f and fPrime
 * @param start    optional first guess inside the bracket (default: its midpoint)
 * @returns the root, or null when f(lo) and f(hi) have the same sign (no bracketed root)
 * @example newtonBisect((x) => x * x - 2, (x) => 2 * x, 0, 2, 1e-12) // ≈ 1.41421356
 */
export function newtonBisect(
  f: ParametricFunction,
  fPrime: ParametricFunction,
  lo: number,
  hi: number,
  absTol: number,
  maxIter = 100,
  params: Float64Array = NO_PARAMS,
  start = Number.NaN,
): number | null {
  let flo = f(lo, params)
  const fhi = f(hi, params)
  if (flo === 0) return lo
  if (fhi === 0) return hi
  if (flo * fhi > 0 || !Number.isFinite(flo) || !Number.isFinite(fhi)) return null
  // orient so that f(a) < 0 < f(b)
  let a = lo
  let b = hi
  if (flo > 0) {
    a = hi
    b = lo
    flo = fhi
  }
  let x = start > Math.min(lo, hi) && start < Math.max(lo, hi) ? start : 0.5 * (lo + hi)
  for (let i = 0; i < maxIter; i++) {
    const fx = f(x, params)
    if (fx === 0) return x
    if (fx < 0) a = x
    else b = x
    const d = fPrime(x, params)
    let next = x - fx / d
    // a converged Newton step may land on the bracket end just moved to x: accept it before the safeguard
    if (Math.abs(next - x) <= absTol) return next
    const inside = (next - a) * (next - b) < 0
    if (!inside || !Number.isFinite(next)) next = 0.5 * (a + b)
    if (Math.abs(b - a) <= absTol) return next
    x = next
  }
  return x
}

/**
 * Root of f on [lo, hi] by Brent's method (inverse quadratic interpolation, secant and bisection).
 * Source: Brent 1973, Algorithms for Minimization without Derivatives, ch. 4 (common practice;
 * Press et al. 2007 §9.3, routine zbrent).
 *
 * @param f       continuous function with f(lo)·f(hi) ≤ 0
 * @param lo      lower end of the bracket
 * @param hi      upper end of the bracket
 * @param absTol  absolute tolerance on x
 * @param maxIter iteration cap (default 200)
 * @returns the root, or null when the ends do not bracket a root
 * @example brentRoot((x) => Math.cos(x) - x, 0, 1, 1e-12) // ≈ 0.7390851332
 */
export function brentRoot(f: (x: number) => number, lo: number, hi: number, absTol: number, maxIter = 200): number | null {
  let a = lo
  let b = hi
  let fa = f(a)
  let fb = f(b)
  if (fa === 0) return a
  if (fb === 0) return b
  if (fa * fb > 0 || !Number.isFinite(fa) || !Number.isFinite(fb)) return null
  let c = a
  let fc = fa
  let d = b - a
  let e = d
  for (let i = 0; i < maxIter; i++) {
    if (fb * fc > 0) {
      c = a
      fc = fa
      d = b - a
      e = d
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b; b = c; c = a
      fa = fb; fb = fc; fc = fa
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * absTol
    const m = 0.5 * (c - b)
    if (Math.abs(m) <= tol || fb === 0) return b
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa
      let p: number
      let q: number
      if (a === c) {
        p = 2 * m * s
        q = 1 - s
      } else {
        const qq = fa / fc
        const r = fb / fc
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1))
        q = (qq - 1) * (r - 1) * (s - 1)
      }
      if (p > 0) q = -q
      else p = -p
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d
        d = p / q
      } else {
        d = m
        e = m
      }
    } else {
      d = m
      e = m
    }
    a = b
    fa = fb
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol
    fb = f(b)
  }
  return b
}
