/**
 * Which lines a spectrum covers, the fit window of each line complex, and the starting continuum of
 * each window from its side bands (shared/science/README.md §13.5).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { selectInPlace } from '../stats/percentiles.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** Least fraction of a coverage interval that good pixels must fill (project choice). */
export const COVERAGE_MIN_FRACTION = 0.8

/**
 * True when good pixels span `halfKmPerS` on both sides of `centre`: both ends of the interval lie
 * inside the spectrum and good pixels fill at least 80 % of it (project choice, README §13.5).
 *
 * @param lo       lower pixel edges (Å), ascending
 * @param hi       upper pixel edges (Å)
 * @param good     1 for a usable pixel
 * @param centre   expected observed line centre (Å)
 * @param halfKmPerS  half-width of the interval (km/s)
 * @example isCovered([0, 1, 2], [1, 2, 3], [1, 1, 1], 1.5, 1e5) // true
 */
export function isCovered(lo: ArrayLike<number>, hi: ArrayLike<number>, good: ArrayLike<number>, centre: number, halfKmPerS: number): boolean {
  return isSpanCovered(lo, hi, good, centre * (1 - halfKmPerS / C), centre * (1 + halfKmPerS / C))
}

/** True when [a, b] lies inside the spectrum and good pixels fill ≥ 80 % of it. */
export function isSpanCovered(lo: ArrayLike<number>, hi: ArrayLike<number>, good: ArrayLike<number>, a: number, b: number): boolean {
  const n = lo.length
  if (n === 0 || a < lo[0] || b > hi[n - 1]) return false
  let filled = 0
  for (let i = lowerBound(hi, a); i < n && lo[i] < b; i++) {
    if (!good[i]) continue
    filled += Math.min(hi[i], b) - Math.max(lo[i], a)
  }
  return filled >= COVERAGE_MIN_FRACTION * (b - a)
}

/** First index i in [a, b) with values[i] ≥ x (values ascending there); b when there is none. */
export function lowerBound(values: ArrayLike<number>, x: number, a = 0, b = values.length): number {
  while (a < b) {
    const m = (a + b) >>> 1
    if (values[m] < x) a = m + 1
    else b = m
  }
  return a
}

/** A straight-line continuum c₀ + c₁ t with t = (λ − mid)/half, and the side-band pixels it rejected. */
export interface SidebandContinuum {
  c0: number
  c1: number
  /** side-band pixels more than 5σ off the clipped fit (cosmic rays, sky residuals), left out of the fit */
  outlier: Uint8Array
  /** side-band pixels used in the final clipped fit */
  used: number
}

/** Clipping threshold and outlier threshold in robust σ units; at most this many clipping passes. */
export const CLIP_SIGMA = 3
export const OUTLIER_SIGMA = 5
const CLIP_PASSES = 5

/**
 * Straight-line continuum through the side bands of a window by weighted least squares with iterative
 * 3σ clipping, σ the larger of 1 and the robust scatter 1.4826·MAD of the normalised residuals
 * (common practice; 1.4826 makes the MAD a σ for normal noise). Falls back to all
 * pixels when fewer than 4 side-band pixels exist.
 *
 * @param lambda    pixel centres (Å)
 * @param y         flux densities
 * @param sigma     1σ errors (> 0)
 * @param sideband  1 for a side-band pixel
 * @param mid       centre of the window (Å)
 * @param half      half-width of the window (Å)
 * @example const c = sidebandContinuum([1, 2, 3, 4, 5], [2, 2, 2, 2, 2], [1, 1, 1, 1, 1], [1, 1, 1, 1, 1], 3, 2); [c.c0, c.c1] // ≈ [2, 0]
 */
export function sidebandContinuum(
  lambda: ArrayLike<number>, y: ArrayLike<number>, sigma: ArrayLike<number>, sideband: ArrayLike<number>, mid: number, half: number,
): SidebandContinuum {
  const n = lambda.length
  let count = 0
  for (let i = 0; i < n; i++) if (sideband[i]) count++
  const use = new Uint8Array(n)
  for (let i = 0; i < n; i++) use[i] = count >= 4 ? (sideband[i] ? 1 : 0) : 1
  const resid = new Float64Array(n)
  let c0 = 0
  let c1 = 0
  let scale = 1
  for (let pass = 0; pass < CLIP_PASSES; pass++) {
    ;[c0, c1] = weightedLine(lambda, y, sigma, use, mid, half)
    let m = 0
    for (let i = 0; i < n; i++) {
      if (!(count >= 4 ? sideband[i] : 1)) continue
      resid[m++] = Math.abs(y[i] - (c0 + c1 * (lambda[i] - mid) / half)) / sigma[i]
    }
    scale = Math.max(1, 1.4826 * median(resid.subarray(0, m)))
    let changed = false
    for (let i = 0; i < n; i++) {
      if (!(count >= 4 ? sideband[i] : 1)) continue
      const keep = Math.abs(y[i] - (c0 + c1 * (lambda[i] - mid) / half)) / sigma[i] <= CLIP_SIGMA * scale ? 1 : 0
      if (keep !== use[i]) changed = true
      use[i] = keep
    }
    if (!changed) break
  }
  const outlier = new Uint8Array(n)
  let used = 0
  for (let i = 0; i < n; i++) {
    if (use[i]) used++
    if (count >= 4 && sideband[i] && Math.abs(y[i] - (c0 + c1 * (lambda[i] - mid) / half)) / sigma[i] > OUTLIER_SIGMA * scale) outlier[i] = 1
  }
  return { c0, c1, outlier, used }
}

/** Weighted straight line through the pixels with use[i] = 1 (normal equations, 2×2). */
function weightedLine(lambda: ArrayLike<number>, y: ArrayLike<number>, sigma: ArrayLike<number>, use: Uint8Array, mid: number, half: number): [number, number] {
  let s = 0, st = 0, stt = 0, sy = 0, sty = 0
  for (let i = 0; i < lambda.length; i++) {
    if (!use[i]) continue
    const w = 1 / (sigma[i] * sigma[i])
    const t = (lambda[i] - mid) / half
    s += w
    st += w * t
    stt += w * t * t
    sy += w * y[i]
    sty += w * t * y[i]
  }
  const det = s * stt - st * st
  if (!(s > 0)) return [0, 0]
  if (!(Math.abs(det) > 1e-12 * s * stt)) return [sy / s, 0]
  return [(sy * stt - st * sty) / det, (s * sty - st * sy) / det]
}

function median(values: Float64Array): number {
  const n = values.length
  if (n === 0) return 0
  const a = Float64Array.from(values)
  const k = n >> 1
  selectInPlace(a, k, 0, n - 1)
  if (n % 2 === 1) return a[k]
  let below = -Infinity
  for (let i = 0; i < k; i++) if (a[i] > below) below = a[i]
  return 0.5 * (a[k] + below)
}
