/** The 16th, 50th and 84th percentiles of a sample (the ±1σ band of a normal distribution). */
export interface Percentiles {
  p16: number
  p50: number
  p84: number
}

/**
 * Percentile of an ascending-sorted sample by linear interpolation between order statistics,
 * position h = p·(n − 1) (Hyndman & Fan 1996, Am. Stat. 50, 361, definition 7; numpy's default).
 *
 * @param sorted  ascending finite values, n ≥ 1
 * @param p       fraction in [0, 1]
 * @returns the interpolated percentile (unit of the sample)
 * @throws {RangeError} empty sample or p outside [0, 1]
 * @example percentileOfSorted([1, 2, 3, 4], 0.5) // 2.5
 */
export function percentileOfSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length
  if (n === 0) throw new RangeError('percentileOfSorted needs a non-empty sample')
  if (!(p >= 0 && p <= 1)) throw new RangeError(`percentileOfSorted requires p in [0, 1], got ${p}`)
  const h = p * (n - 1)
  const lo = Math.floor(h)
  const hi = Math.min(lo + 1, n - 1)
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo])
}

/**
 * p16, p50 and p84 of the finite values of a sample (non-finite values, the kernel's "no value",
 * are skipped); null when no value is finite.
 * Source: Hyndman & Fan 1996, Am. Stat. 50, 361, definition 7 (linear interpolation).
 *
 * @param values   sample (any unit); not modified
 * @param scratch  optional buffer of length ≥ values.length, to avoid an allocation per call
 * @returns the three percentiles, or null
 * @example percentiles16_50_84([1, 2, 3, 4, 5]) // { p16: 1.64, p50: 3, p84: 4.36 }
 */
export function percentiles16_50_84(values: ArrayLike<number>, scratch?: Float64Array): Percentiles | null {
  const buf = scratch && scratch.length >= values.length ? scratch : new Float64Array(values.length)
  let m = 0
  for (let i = 0; i < values.length; i++) {
    const v = values[i]
    if (Number.isFinite(v)) buf[m++] = v
  }
  if (m === 0) return null
  const sorted = buf.subarray(0, m).sort()
  return { p16: percentileOfSorted(sorted, 0.16), p50: percentileOfSorted(sorted, 0.5), p84: percentileOfSorted(sorted, 0.84) }
}
