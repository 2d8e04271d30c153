/**
 * The Faddeeva function w(z) = exp(−z²) erfc(−iz) in the upper half plane, and the real error
 * functions that follow from it.
 *
 * Algorithm: Weideman 1994, "Computation of the complex error function", SIAM J. Numer. Anal. 31,
 * 1497: his rational series with the coefficients computed at start-up by the discrete cosine sum his
 * paper gives as an FFT (his optimal L = √(N/√2), N = 32 terms; section numbers from memory): w(z) ≈ 2 p(Z)/(L − iz)² + π^(−1/2)/(L − iz) with
 * Z = (L + iz)/(L − iz). For |z| ≥ 6 the Laplace continued fraction is used instead
 * (Abramowitz & Stegun 1964, eq. 7.1.14 — equation number from memory; the choice of Gautschi 1970,
 * SIAM J. Numer. Anal. 7, 187, for large |z|), 16 levels deep: Weideman's absolute error (≈ 2e-15)
 * would otherwise be a large relative error of the small real part far out in the wings.
 * Checked against scipy.special.wofz / erfc (tests/fixtures/spectra/profiles.json; shared/science/README.md
 * §13.2): Re w to ≤ 2e-7 relative for Im z ≥ 1e-5, |w| to ≈ 3e-13. Valid for Im z ≥ 0, which is all a
 * line profile needs.
 */

/** Terms of the rational series (N = 32: |Δw|/|w| ≤ 3e-13 against scipy's wofz, shared/science/README.md §13.2). */
export const WEIDEMAN_TERMS = 32

const N = WEIDEMAN_TERMS
const L = Math.sqrt(N / Math.SQRT2)
const INV_SQRT_PI = 1 / Math.sqrt(Math.PI)
/** |z|² from which the continued fraction replaces the rational series. */
const FAR_SQUARED = 36
/** Depth of the continued fraction (1e-14 relative at |z| = 6). */
const FRACTION_DEPTH = 16

/**
 * a₁ … a_N of Weideman 1994: a_n = (1/4N) Σ_{k=−2N+1}^{2N−1} f(t_k) cos(π k n / 2N), with
 * t_k = L tan(θ_k/2), θ_k = π k/2N and f(t) = exp(−t²)(L² + t²) — the real part of his FFT written out.
 */
function weidemanCoefficients(): Float64Array {
  const m = 2 * N
  const a = new Float64Array(N + 1)
  for (let n = 1; n <= N; n++) {
    let s = 0
    for (let k = -m + 1; k <= m - 1; k++) {
      const t = L * Math.tan((k * Math.PI) / m / 2)
      s += Math.exp(-t * t) * (L * L + t * t) * Math.cos((Math.PI * k * n) / m)
    }
    a[n] = s / (2 * m)
  }
  return a
}

const A = weidemanCoefficients()

/** Real and imaginary part of w(z), written into `out` (out[0] = Re w, out[1] = Im w). */
export function faddeevaInto(x: number, y: number, out: Float64Array | number[]): void {
  if (x * x + y * y >= FAR_SQUARED) {
    // w(z) = (i/√π) / (z − (1/2)/(z − 1/(z − (3/2)/(z − …)))), evaluated from the bottom up
    let tr = x
    let ti = y
    for (let k = FRACTION_DEPTH; k >= 1; k--) {
      const q = tr * tr + ti * ti
      tr = x - (0.5 * k * tr) / q
      ti = y + (0.5 * k * ti) / q
    }
    const q = INV_SQRT_PI / (tr * tr + ti * ti)
    out[0] = ti * q
    out[1] = tr * q
    return
  }
  // q = L − iz = (L + y) − ix ; Z = (L + iz)/(L − iz) = ((L − y) + ix)/q
  const qr = L + y
  const qi = -x
  const qq = qr * qr + qi * qi
  // 1/q
  const ir = qr / qq
  const ii = -qi / qq
  const pr0 = L - y
  const pi0 = x
  const zr = pr0 * ir - pi0 * ii
  const zi = pr0 * ii + pi0 * ir
  // p(Z) = Σ_{n=1}^{N} a_n Z^(n−1) by Horner
  let pr = A[N]
  let pi = 0
  for (let n = N - 1; n >= 1; n--) {
    const tr = pr * zr - pi * zi + A[n]
    pi = pr * zi + pi * zr
    pr = tr
  }
  // 2 p / q² + (1/√π)/q = (1/q)(2 p/q + 1/√π)
  const sr = 2 * (pr * ir - pi * ii) + INV_SQRT_PI
  const si = 2 * (pr * ii + pi * ir)
  out[0] = sr * ir - si * ii
  out[1] = sr * ii + si * ir
}

const scratch = new Float64Array(2)

/**
 * The Faddeeva function w(x + iy) for y ≥ 0 (Weideman 1994, SIAM J. Numer. Anal. 31, 1497).
 *
 * @param x  real part
 * @param y  imaginary part, ≥ 0
 * @returns [Re w, Im w]
 * @example faddeeva(0, 0)[0] // ≈ 1.0000000000 (w(0) = 1)
 */
export function faddeeva(x: number, y: number): [number, number] {
  faddeevaInto(x, y, scratch)
  return [scratch[0], scratch[1]]
}

/**
 * Re w(x + iy) for y ≥ 0, the Voigt function K(x, y) (Armstrong 1967, JQSRT 7, 61).
 *
 * @example voigtK(0, 1) // ≈ 0.4275835762 (erfcx(1), scipy.special.erfcx)
 */
export function voigtK(x: number, y: number): number {
  faddeevaInto(x, y, scratch)
  return scratch[0]
}

/**
 * Scaled complementary error function erfcx(x) = exp(x²) erfc(x) = w(ix) for x ≥ 0. On the imaginary
 * axis Z = (L − x)/(L + x) is real, so the series is a real polynomial (and the continued fraction a
 * real one): the same approximation as `faddeeva`, at a quarter of the cost.
 *
 * @param x  ≥ 0
 * @example erfcx(0) // ≈ 1.0000000000
 */
export function erfcx(x: number): number {
  if (x >= 6) {
    let t = x
    for (let k = FRACTION_DEPTH; k >= 1; k--) t = x + (0.5 * k) / t
    return INV_SQRT_PI / t
  }
  const q = 1 / (L + x)
  const z = (L - x) * q
  // p(z) = Σ a_n z^(n−1) as four interleaved Horner chains in z⁴ (N a multiple of 4): the same sum in a quarter of the dependent steps
  const z2 = z * z
  const z4 = z2 * z2
  let c0 = A[N - 3]
  let c1 = A[N - 2]
  let c2 = A[N - 1]
  let c3 = A[N]
  for (let n = N - 7; n >= 1; n -= 4) {
    c0 = c0 * z4 + A[n]
    c1 = c1 * z4 + A[n + 1]
    c2 = c2 * z4 + A[n + 2]
    c3 = c3 * z4 + A[n + 3]
  }
  const p = (c0 + z * c1) + z2 * (c2 + z * c3)
  return q * (2 * p * q + INV_SQRT_PI)
}

/**
 * Complementary error function erfc(x) for any real x, from erfc(x) = exp(−x²) w(ix) (x ≥ 0) and
 * erfc(−x) = 2 − erfc(x) (Abramowitz & Stegun 1964, eqs. 7.1.2 and 7.1.3).
 *
 * @example erfc(1) // ≈ 0.15729920705029 (scipy.special.erfc)
 */
export function erfc(x: number): number {
  if (x >= 0) return x > 27 ? 0 : Math.exp(-x * x) * erfcx(x) // below 1e-316 past 27
  return 2 - erfc(-x)
}

/**
 * Error function erf(x) = 1 − erfc(x), computed without cancellation near 0 only to ≈ 1e-13 absolute.
 *
 * @example erf(0.5) // ≈ 0.52049987781305 (scipy.special.erf)
 */
export function erf(x: number): number {
  return x >= 0 ? 1 - erfc(x) : erfc(-x) - 1
}
