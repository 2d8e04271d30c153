/**
 * Line profiles of unit area, their FWHMs, and their averages over pixels.
 *
 * Sources (shared/science/README.md §13.1–§13.3): Gaussian and Lorentzian closed forms (common
 * practice); the Voigt profile V(x; σ, γ) = Re w((x + iγ)/(σ√2)) / (σ√(2π)) (Armstrong 1967, JQSRT 7,
 * 61) with w from `faddeeva.ts` (Weideman 1994); the Voigt FWHM of Olivero & Longbothum 1977, JQSRT
 * 17, 233 (their accuracy claim 0.02 %). Pixels: a spectrum's value at a pixel is the mean of the
 * profile over the pixel, exactly from the CDF for Gaussians (error function) and Lorentzians
 * (arctangent), by Gauss–Legendre quadrature inside the pixel for the Voigt profile.
 */
import { erfc, faddeevaInto } from './faddeeva.ts'

/** FWHM/σ of a Gaussian, 2√(2 ln 2) (closed form). */
export const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)

const SQRT2 = Math.SQRT2
const SQRT_2PI = Math.sqrt(2 * Math.PI)

/**
 * Gaussian of unit area, exp(−x²/2σ²)/(σ√(2π)).
 *
 * @param x      offset from the centre (any unit)
 * @param sigma  σ (same unit), > 0
 * @example gaussianProfile(0, 1) // ≈ 0.3989422804 (1/√(2π))
 */
export function gaussianProfile(x: number, sigma: number): number {
  const u = x / sigma
  return Math.exp(-0.5 * u * u) / (sigma * SQRT_2PI)
}

/**
 * Lorentzian of unit area, (γ/π)/(x² + γ²); γ is the half width at half maximum.
 *
 * @example lorentzianProfile(0, 1) // ≈ 0.3183098862 (1/π)
 */
export function lorentzianProfile(x: number, gamma: number): number {
  return gamma / (Math.PI * (x * x + gamma * gamma))
}

const w = new Float64Array(2)

/**
 * Voigt profile of unit area: a Gaussian of σ convolved with a Lorentzian of HWHM γ (scipy's
 * `voigt_profile(x, sigma, gamma)` convention). γ = 0 gives the Gaussian.
 *
 * @example voigtProfile(0, 1, 1) // ≈ 0.20870928052 (scipy.special.voigt_profile(0, 1, 1))
 */
export function voigtProfile(x: number, sigma: number, gamma: number): number {
  if (gamma <= 0) return gaussianProfile(x, sigma)
  if (sigma <= 0) return lorentzianProfile(x, gamma)
  faddeevaInto(x / (sigma * SQRT2), gamma / (sigma * SQRT2), w)
  return w[0] / (sigma * SQRT_2PI)
}

/**
 * FWHM of a Gaussian of σ (closed form).
 *
 * @example gaussianFwhm(1) // ≈ 2.354820045
 */
export function gaussianFwhm(sigma: number): number {
  return FWHM_PER_SIGMA * sigma
}

/**
 * FWHM of a Lorentzian of HWHM γ, 2γ (closed form).
 *
 * @example lorentzianFwhm(1.5) // 3
 */
export function lorentzianFwhm(gamma: number): number {
  return 2 * gamma
}

/**
 * Voigt FWHM by Olivero & Longbothum 1977, JQSRT 17, 233: f_V ≈ 0.5346 f_L + √(0.2166 f_L² + f_G²)
 * with f_G = 2√(2 ln 2) σ and f_L = 2γ; exact in both limits, 0.02 % in between.
 *
 * @example voigtFwhm(1, 0) // ≈ 2.354820045
 */
export function voigtFwhm(sigma: number, gamma: number): number {
  const fg = FWHM_PER_SIGMA * sigma
  const fl = 2 * gamma
  return 0.5346 * fl + Math.sqrt(0.2166 * fl * fl + fg * fg)
}

/** A gap between pixel centres wider than this many times both neighbouring gaps is a hole in the spectrum. */
export const GAP_FACTOR = 1.5

/**
 * Lower and upper pixel edges from pixel centres: midpoints between neighbours, the outer edges half a
 * spacing out (common practice for a spectrum given by its centres). Where the spacing jumps by more
 * than 1.5× both neighbouring spacings (pixels left out of the file), the pixels on either side keep
 * the half spacing of their other side instead of stretching across the hole (project choice).
 *
 * @param centres  strictly increasing pixel centres (Å)
 * @returns lower and upper edges (Å)
 * @example const b = pixelBounds([1, 2, 3, 10, 11, 12]); [b.hi[2], b.lo[3]] // [3.5, 9.5]
 */
export function pixelBounds(centres: ArrayLike<number>): { lo: Float64Array; hi: Float64Array } {
  const n = centres.length
  const lo = new Float64Array(n)
  const hi = new Float64Array(n)
  if (n === 1) {
    lo[0] = centres[0] - 0.5
    hi[0] = centres[0] + 0.5
    return { lo, hi }
  }
  const gaps = new Float64Array(n - 1)
  for (let i = 0; i < n - 1; i++) gaps[i] = centres[i + 1] - centres[i]
  for (let i = 0; i < n - 1; i++) {
    const d = gaps[i]
    const left = i > 0 ? gaps[i - 1] : NaN
    const right = i + 1 < n - 1 ? gaps[i + 1] : NaN
    const hole = (left > 0 || right > 0) && !(d <= GAP_FACTOR * left) && !(d <= GAP_FACTOR * right)
    if (hole) {
      hi[i] = centres[i] + 0.5 * (left > 0 ? left : right)
      lo[i + 1] = centres[i + 1] - 0.5 * (right > 0 ? right : left)
    } else {
      hi[i] = lo[i + 1] = centres[i] + 0.5 * d
    }
  }
  lo[0] = centres[0] - (hi[0] - centres[0])
  hi[n - 1] = centres[n - 1] + (centres[n - 1] - lo[n - 1])
  return { lo, hi }
}

/** Gaussian tail mass beyond u (standardised, u in units of σ) on u's own side: ½ erfc(|u|/√2). */
function tail(u: number): number {
  return 0.5 * erfc(Math.abs(u) / SQRT2)
}

/**
 * Mass of a unit Gaussian between standardised limits a < b, without cancellation in the tails.
 *
 * @example gaussianMass(-1, 1) // ≈ 0.6826894921 (Φ(1) − Φ(−1))
 */
export function gaussianMass(a: number, b: number): number {
  if (a >= 0) return tail(a) - tail(b)
  if (b <= 0) return tail(b) - tail(a)
  return 1 - tail(a) - tail(b)
}

/** Standardised distance beyond which a Gaussian pixel holds less than 1e-15 of the line (Φ(−8) = 6e-16). */
export const GAUSS_CUT = 8

/**
 * Mean of a unit-area Gaussian over each pixel [lo[j], hi[j]) for j in [j0, j1), written to out[j].
 * Exact through the error function (shared/science/README.md §13.3); a tail value is shared with
 * the next pixel when the pixels touch. With `dCentre` and `dSigma` also the derivatives of each
 * mean with respect to the centre and σ: (φ(u_a) − φ(u_b))/(σΔ) and (u_a φ(u_a) − u_b φ(u_b))/(σΔ),
 * φ the unit normal density, u the standardised edges (closed form).
 *
 * @param lo      lower pixel edges (Å)
 * @param hi      upper pixel edges (Å)
 * @param j0      first pixel
 * @param j1      one past the last pixel
 * @param centre  line centre (Å)
 * @param sigma   σ (Å), > 0
 * @param out     receives the means (Å⁻¹)
 */
export function gaussianPixels(
  lo: ArrayLike<number>, hi: ArrayLike<number>, j0: number, j1: number, centre: number, sigma: number, out: Float64Array,
  dCentre?: Float64Array, dSigma?: Float64Array,
): void {
  const inv = 1 / sigma
  let lastEdge = NaN
  let lastTail = 0
  for (let j = j0; j < j1; j++) {
    const a = lo[j]
    const ua = (a - centre) * inv
    const ub = (hi[j] - centre) * inv
    if (ub < -GAUSS_CUT || ua > GAUSS_CUT) {
      out[j] = 0
      lastEdge = NaN
      continue
    }
    const ta = a === lastEdge ? lastTail : tail(ua)
    const tb = tail(ub)
    const mass = ua >= 0 ? ta - tb : ub <= 0 ? tb - ta : 1 - ta - tb
    out[j] = mass / (hi[j] - a)
    lastEdge = hi[j]
    lastTail = tb
  }
  if (dCentre !== undefined && dSigma !== undefined) gaussianPixelDerivatives(lo, hi, j0, j1, centre, sigma, dCentre, dSigma)
}

/**
 * Only the derivatives of `gaussianPixels` (the same values, the same cut): no error function, so the
 * Jacobian of a fit whose profile means are already known costs one exponential an edge.
 */
export function gaussianPixelDerivatives(
  lo: ArrayLike<number>, hi: ArrayLike<number>, j0: number, j1: number, centre: number, sigma: number, dCentre: Float64Array, dSigma: Float64Array,
): void {
  const inv = 1 / sigma
  let lastEdge = NaN
  let lastPhi = 0
  for (let j = j0; j < j1; j++) {
    const a = lo[j]
    const ua = (a - centre) * inv
    const ub = (hi[j] - centre) * inv
    if (ub < -GAUSS_CUT || ua > GAUSS_CUT) {
      dCentre[j] = dSigma[j] = 0
      lastEdge = NaN
      continue
    }
    const pa = a === lastEdge ? lastPhi : Math.exp(-0.5 * ua * ua) / SQRT_2PI
    const pb = Math.exp(-0.5 * ub * ub) / SQRT_2PI
    const f = inv / (hi[j] - a)
    dCentre[j] = (pa - pb) * f
    dSigma[j] = (ua * pa - ub * pb) * f
    lastPhi = pb
    lastEdge = hi[j]
  }
}

/**
 * Mean of a unit-area Lorentzian of HWHM γ over each pixel, exact through the arctangent (the
 * difference of two arctangents is taken as one where both edges lie on the same side).
 */
export function lorentzianPixels(
  lo: ArrayLike<number>, hi: ArrayLike<number>, j0: number, j1: number, centre: number, gamma: number, out: Float64Array,
): void {
  const inv = 1 / gamma
  for (let j = j0; j < j1; j++) {
    const a = (lo[j] - centre) * inv
    const b = (hi[j] - centre) * inv
    const ab = a * b
    const angle = ab > 0 ? Math.atan((b - a) / (1 + ab)) : Math.atan(b) - Math.atan(a)
    out[j] = angle / (Math.PI * (hi[j] - lo[j]))
  }
}

/** Gauss–Legendre nodes (on [−1, 1]) and weights for n points, by Newton's method on P_n (Press et al. 2007, Numerical Recipes 3rd ed., §4.6, routine gauleg). */
function gaussLegendreRule(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n)
  const wt = new Float64Array(n)
  const m = (n + 1) >> 1
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5))
    let pp = 0
    for (let iter = 0; iter < 100; iter++) {
      let p1 = 1
      let p2 = 0
      for (let j = 0; j < n; j++) {
        const p3 = p2
        p2 = p1
        p1 = ((2 * j + 1) * z * p2 - j * p3) / (j + 1)
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1)
      const z1 = z
      z = z1 - p1 / pp
      if (Math.abs(z - z1) < 1e-15) break
    }
    x[i] = -z
    x[n - 1 - i] = z
    wt[i] = wt[n - 1 - i] = 2 / ((1 - z * z) * pp * pp)
  }
  return { x, w: wt }
}

/** Largest number of Gauss–Legendre points per pixel. */
export const MAX_PIXEL_NODES = 16
const RULES = Array.from({ length: MAX_PIXEL_NODES + 1 }, (_, n) => (n >= 1 ? gaussLegendreRule(n) : { x: new Float64Array(0), w: new Float64Array(0) }))

/**
 * Gauss–Legendre points per pixel for a profile of Gaussian-equivalent σ_eq = FWHM/2.3548 and a
 * pixel of width Δ: 4 + ⌈3Δ/σ_eq⌉, at most 16 (project choice, shared/science/README.md §13.3: the
 * pixel mean then agrees with the exact Gaussian one to ≈ 1e-9 of the peak down to σ = 0.3 pixel).
 *
 * @example pixelNodes(1, 1) // 7
 */
export function pixelNodes(width: number, sigmaEquivalent: number): number {
  const n = 4 + Math.ceil((3 * width) / sigmaEquivalent)
  return n > MAX_PIXEL_NODES ? MAX_PIXEL_NODES : n
}

/**
 * Mean of a unit-area Voigt profile over each pixel by Gauss–Legendre quadrature inside the pixel
 * (`pixelNodes` points). γ = 0 falls back to the exact Gaussian, σ = 0 to the exact Lorentzian.
 */
export function voigtPixels(
  lo: ArrayLike<number>, hi: ArrayLike<number>, j0: number, j1: number, centre: number, sigma: number, gamma: number, out: Float64Array,
): void {
  if (gamma <= 0) return gaussianPixels(lo, hi, j0, j1, centre, sigma, out)
  if (sigma <= 0) return lorentzianPixels(lo, hi, j0, j1, centre, gamma, out)
  const s = 1 / (sigma * SQRT2)
  const y = gamma * s
  const norm = 1 / (sigma * SQRT_2PI)
  const sigmaEq = voigtFwhm(sigma, gamma) / FWHM_PER_SIGMA
  for (let j = j0; j < j1; j++) {
    const a = lo[j]
    const b = hi[j]
    const rule = RULES[pixelNodes(b - a, sigmaEq)]
    const half = 0.5 * (b - a)
    const mid = 0.5 * (a + b) - centre
    let sum = 0
    for (let k = 0; k < rule.x.length; k++) {
      faddeevaInto((mid + half * rule.x[k]) * s, y, w)
      sum += rule.w[k] * w[0]
    }
    out[j] = 0.5 * sum * norm
  }
}
