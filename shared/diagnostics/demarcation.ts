/**
 * Demarcation curves of the line-ratio diagrams and signed perpendicular distances to them
 * (shared/science/README.md §2.2, §2.6). x and y are log10 ratios (dex): x = log([N II]/Hα), log([S II]/Hα) or
 * log([O I]/Hα); y = log([O III]5007/Hβ).
 */

/** A hyperbola y = a/(x − x0) + c, used on its left branch x < x0. */
export interface HyperbolaCurve {
  a: number
  x0: number
  c: number
}

/** A straight line y = m x + q. */
export interface StraightLine {
  m: number
  q: number
}

/** Kauffmann et al. 2003, MNRAS 346, 1055, eq. 1: y = 0.61/(x_N − 0.05) + 1.30 (eq. no. from memory, shared/science/README.md §12). */
export const KA03: HyperbolaCurve = { a: 0.61, x0: 0.05, c: 1.3 }
/** Kewley et al. 2001, ApJ 556, 121, eq. 5: y = 0.61/(x_N − 0.47) + 1.19. */
export const KE01_NII: HyperbolaCurve = { a: 0.61, x0: 0.47, c: 1.19 }
/** Kewley et al. 2001, eq. 6: y = 0.72/(x_S − 0.32) + 1.30. */
export const KE01_SII: HyperbolaCurve = { a: 0.72, x0: 0.32, c: 1.3 }
/** Kewley et al. 2001, eq. 7: y = 0.73/(x_O + 0.59) + 1.33. */
export const KE01_OI: HyperbolaCurve = { a: 0.73, x0: -0.59, c: 1.33 }
/** Kewley et al. 2006, MNRAS 372, 961: Seyfert/LINER line on [S II], y = 1.89 x_S + 0.76. */
export const KE06_SII: StraightLine = { m: 1.89, q: 0.76 }
/** Kewley et al. 2006: Seyfert/LINER line on [O I], y = 1.18 x_O + 1.30. */
export const KE06_OI: StraightLine = { m: 1.18, q: 1.3 }
/** Schawinski et al. 2007, MNRAS 382, 1415: Seyfert/LINER line on [N II], y = 1.05 x_N + 0.45. */
export const S07_NII: StraightLine = { m: 1.05, q: 0.45 }

/** x_N where Ka03 and Ke01 [N II] cross; left of it Ka03 lies above Ke01 (shared/science/README.md §2.2). */
export const KA03_KE01_CROSSING_X = -1.2805

/**
 * y of a hyperbolic demarcation curve on its left branch; null at or right of the asymptote, where
 * the formula's value belongs to the other branch (e.g. Ka03 at x = 0.10 would give +13.5).
 * Source: the curve's paper (see KA03, KE01_*); shared/science/README.md §2.2.
 *
 * @param curve  the curve
 * @param x      log ratio, dex
 * @returns y in dex, or null for x ≥ x0
 * @example hyperbolaY(KA03, -0.4) // ≈ -0.0556 (shared/science/README.md §2.2)
 */
export function hyperbolaY(curve: HyperbolaCurve, x: number): number | null {
  return x < curve.x0 ? curve.a / (x - curve.x0) + curve.c : null
}

/**
 * Kauffmann et al. 2003 line (MNRAS 346, 1055, eq. 1): y = 0.61/(x − 0.05) + 1.30 for x < 0.05.
 * @param x  log([N II]6584/Hα), dex
 * @returns log([O III]5007/Hβ) of the curve in dex, or null at/right of the asymptote x = 0.05
 * @example kauffmann2003Line(0) // ≈ -10.9
 */
export const kauffmann2003Line = (x: number): number | null => hyperbolaY(KA03, x)

/**
 * Kewley et al. 2001 maximum-starburst line on [N II] (ApJ 556, 121, eq. 5).
 * @param x  log([N II]6584/Hα), dex
 * @returns y in dex, or null for x ≥ 0.47
 * @example kewley2001NiiLine(-0.5) // ≈ 0.5611
 */
export const kewley2001NiiLine = (x: number): number | null => hyperbolaY(KE01_NII, x)

/**
 * Kewley et al. 2001 line on [S II] (eq. 6).
 * @param x  log(([S II]6717+6731)/Hα), dex
 * @returns y in dex, or null for x ≥ 0.32
 * @example kewley2001SiiLine(-0.5) // ≈ 0.4220
 */
export const kewley2001SiiLine = (x: number): number | null => hyperbolaY(KE01_SII, x)

/**
 * Kewley et al. 2001 line on [O I] (eq. 7).
 * @param x  log([O I]6300/Hα), dex
 * @returns y in dex, or null for x ≥ −0.59
 * @example kewley2001OiLine(-1.5) // ≈ 0.5278
 */
export const kewley2001OiLine = (x: number): number | null => hyperbolaY(KE01_OI, x)

/**
 * y of a straight Seyfert/LINER line, y = m x + q (Kewley et al. 2006; Schawinski et al. 2007).
 * @param line  the line
 * @param x     log ratio, dex
 * @returns y in dex
 * @example straightLineY(S07_NII, 0) // 0.45
 */
export function straightLineY(line: StraightLine, x: number): number {
  return line.m * x + line.q
}

/**
 * Whether a point is on the star-forming side of a hyperbolic curve: strictly left of the asymptote
 * and strictly below the curve (shared/science/README.md §2.3; at/right of the asymptote is the AGN side).
 *
 * @param curve  the curve
 * @param x      dex
 * @param y      dex
 * @returns true on the star-forming side
 * @example isBelowHyperbola(KA03, 0.1, -5) // false (right of the asymptote)
 */
export function isBelowHyperbola(curve: HyperbolaCurve, x: number, y: number): boolean {
  return x < curve.x0 && y < curve.a / (x - curve.x0) + curve.c
}

/**
 * Signed perpendicular distance from (x, y) to a straight line, positive above (the Seyfert side):
 * (y − m x − q)/√(1 + m²). Source: shared/science/README.md §2.6 (project convention).
 *
 * @param line  the line
 * @param x     dex
 * @param y     dex
 * @returns distance in dex
 * @example signedDistanceToLine(S07_NII, 0.6, 0) // ≈ -0.7448 (shared/science/README.md §2.6)
 */
export function signedDistanceToLine(line: StraightLine, x: number, y: number): number {
  return (y - line.m * x - line.q) / Math.sqrt(1 + line.m * line.m)
}

/**
 * First-order 1σ error of the signed distance to a straight line from independent errors of x and y:
 * √((m σ_x)² + σ_y²)/√(1 + m²). Source: shared/science/README.md §2.6, §9 (first-order propagation).
 *
 * @param line    the line
 * @param sigmaX  σ of x, dex
 * @param sigmaY  σ of y, dex
 * @returns σ of the distance, dex
 * @example signedDistanceToLineError(S07_NII, 0.1, 0.05) // ≈ 0.0802049
 */
export function signedDistanceToLineError(line: StraightLine, sigmaX: number, sigmaY: number): number {
  const a = line.m * sigmaX
  return Math.sqrt(a * a + sigmaY * sigmaY) / Math.sqrt(1 + line.m * line.m)
}

/**
 * First-order 1σ error of a perpendicular distance from the unit normal (n_x, n_y) at the closest
 * point (as written by `signedDistanceToHyperbola` into `out`): √((n_x σ_x)² + (n_y σ_y)²).
 * Source: shared/science/README.md §2.6, §9 (first-order propagation; the closest point moves only to second order).
 *
 * @param normalX  n_x
 * @param normalY  n_y
 * @param sigmaX   σ of x, dex
 * @param sigmaY   σ of y, dex
 * @returns σ of the distance, dex
 * @example distanceErrorAlongNormal(0.6, 0.8, 0.1, 0.05) // ≈ 0.0721110
 */
export function distanceErrorAlongNormal(normalX: number, normalY: number, sigmaX: number, sigmaY: number): number {
  const a = normalX * sigmaX
  const b = normalY * sigmaY
  return Math.sqrt(a * a + b * b)
}

// p(t) = t⁴ + u t³ − a v t − a² and p′(t) for the closest point on a hyperbola (see below).
function quarticP(t: number, u: number, av: number, a2: number): number {
  return ((t + u) * t * t - av) * t - a2
}
function quarticDp(t: number, u: number, av: number): number {
  return (4 * t + 3 * u) * t * t - av
}
function quarticDdp(t: number, u: number): number {
  return 6 * t * (2 * t + u)
}

// Root of g on [lo, hi] (g(lo)·g(hi) ≤ 0) by bracketed Newton steps from `start`; `which` selects p or p′.
// Starting at the end where g·g″ > 0 (Fourier's condition) makes Newton converge monotonically, so the
// bisection fallback is rarely taken.
function polyRoot(which: 0 | 1, lo: number, hi: number, start: number, u: number, av: number, a2: number): number {
  const glo = which === 0 ? quarticP(lo, u, av, a2) : quarticDp(lo, u, av)
  let a = lo
  let b = hi
  if (glo > 0) {
    a = hi
    b = lo
  }
  let t = start
  for (let i = 0; i < 100; i++) {
    const g = which === 0 ? quarticP(t, u, av, a2) : quarticDp(t, u, av)
    if (g === 0) return t
    if (g < 0) a = t
    else b = t
    const d = which === 0 ? quarticDp(t, u, av) : quarticDdp(t, u)
    let next = t - g / d
    if (Math.abs(next - t) <= 1e-12 * (1 + Math.abs(t))) return next
    if (!((next - a) * (next - b) < 0)) next = 0.5 * (a + b)
    t = next
  }
  return t
}

// closest stationary point found so far (module state: the search allocates nothing per call)
let bestD2 = Infinity
let bestT = 1

// Keep the stationary point t if it is the closest so far.
function keepIfCloser(t: number, u: number, v: number, a: number): void {
  if (!(t > 0)) return
  const dx = u + t
  const dy = v + a / t
  const d2 = dx * dx + dy * dy
  if (d2 < bestD2) {
    bestD2 = d2
    bestT = t
  }
}

/**
 * Signed perpendicular (Euclidean) distance from (x, y) to the left branch of a hyperbolic
 * demarcation curve, positive on the AGN side (above the curve, or at/right of the asymptote),
 * negative on the star-forming side, together with the unit normal at the closest point (for error
 * propagation: σ_d² = (n_x σ_x)² + (n_y σ_y)²).
 *
 * Method: with the curve point (x0 − t, c − a/t), t > 0, the squared distance is stationary where
 * p(t) = t⁴ + u t³ − a v t − a² = 0 (u = x − x0, v = y − c). p is concave then convex (p″ = 6t(2t + u)),
 * so it has at most three positive roots: the largest (a local minimum of the distance) is found by
 * Newton steps from an upper bound in the convex part, and a smaller one in the concave part (the
 * other local minimum) only when p's local maximum there is positive, by bracketed Newton steps. The
 * closer of the two wins, so the global minimum is found even where two local minima exist. Source: shared/science/README.md §2.6 (project convention); derivation, common practice.
 *
 * @param curve  hyperbola (a > 0)
 * @param x      dex
 * @param y      dex
 * @param out    optional [distance, n_x, n_y] receiver (avoids an allocation in the kernel)
 * @returns the signed distance in dex
 * @example signedDistanceToHyperbola(KE01_NII, -0.4, 0.49885) // ≈ +0.0078 (0.01 dex above Ke01(−0.40) = 0.48885; shared/science/README.md §2.6)
 */
export function signedDistanceToHyperbola(curve: HyperbolaCurve, x: number, y: number, out?: Float64Array | number[]): number {
  const a = curve.a
  const u = x - curve.x0
  const v = y - curve.c
  const av = a * v
  const a2 = a * a
  const bound = 1 + Math.max(Math.abs(u), Math.abs(av), a2)
  bestD2 = Infinity
  bestT = 1
  // p″ = 6t(2t + u): p is concave on (0, tm) and convex on (tm, ∞), tm = max(0, −u/2).
  const tm = u < 0 ? Math.min(-u / 2, bound) : 0
  // (1) the largest root, if it lies in the convex part: Newton from `bound` (p > 0, p″ > 0 there)
  //     decreases monotonically onto it (Fourier's condition); leaving the convex part means there is none.
  //     Start from the larger of the vertical (t = −u) and horizontal (t = −a/v) projections of the point
  //     onto the curve when p > 0 there (still Fourier's condition), which is usually close to the root.
  let t = bound
  const guess = Math.max(-u, v < 0 ? -a / v : 0)
  if (guess > tm && guess < bound && quarticP(guess, u, av, a2) > 0) t = guess
  let largest = -1
  for (let i = 0; i < 100; i++) {
    const step = quarticP(t, u, av, a2) / quarticDp(t, u, av)
    const next = t - step
    if (!(next >= tm)) break
    if (Math.abs(step) <= 1e-12 * (1 + next)) {
      largest = next
      break
    }
    t = next
  }
  if (largest > 0) keepIfCloser(largest, u, v, a)
  // (2) a smaller root in the concave part (0, tm), where p first rises from p(0) = −a² < 0 to its local
  //     maximum at c1 (p′(c1) = 0). On [0, tm], t³(t + u) ≤ 0, so p ≤ −a v·tm − a² there: skip when ≤ 0.
  if (u < 0 && -av * tm - a2 > 0) {
    const dpm = quarticDp(tm, u, av)
    if (-av > 0 && dpm < 0) {
      const c1 = polyRoot(1, 0, tm, 0.5 * tm, u, av, a2)
      if (quarticP(c1, u, av, a2) > 0) keepIfCloser(polyRoot(0, 0, c1, 0.5 * c1, u, av, a2), u, v, a)
    } else if (largest < 0) {
      // p′ ≥ 0 throughout: the single root lies in the concave part
      keepIfCloser(polyRoot(0, 0, tm, 0.5 * tm, u, av, a2), u, v, a)
    }
  }
  if (bestD2 === Infinity) {
    // not reached for a > 0 (p(0) < 0 < p(bound) always brackets a root); kept as a safe fallback
    keepIfCloser(polyRoot(0, 0, bound, 0.5 * bound, u, av, a2), u, v, a)
  }
  const sign = isBelowHyperbola(curve, x, y) ? -1 : 1
  const distance = sign * Math.sqrt(bestD2)
  if (out) {
    // normal of y = c − a/t at x = x0 − t: slope dy/dx = −a/t², normal ∝ (a/t², 1), pointing to the AGN side
    const s = a / (bestT * bestT)
    const norm = Math.sqrt(1 + s * s)
    out[0] = distance
    out[1] = s / norm
    out[2] = 1 / norm
  }
  return distance
}
