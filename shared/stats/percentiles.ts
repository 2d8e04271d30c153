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
 * @example percentiles16_50_84([1, 2, 3, 4, 5]) // ≈ { p16: 1.64, p50: 3, p84: 4.36 }
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

/**
 * Rearrange a[lo..hi] so that a[k] holds the value it would have if sorted, with smaller-or-equal
 * values before it and greater-or-equal after (quickselect with median-of-three pivots).
 * Source: Hoare 1961, Comm. ACM 4, 321 ("FIND", Algorithm 65); common practice.
 *
 * @param a   array (modified in place)
 * @param k   target index, lo ≤ k ≤ hi
 * @param lo  first index considered
 * @param hi  last index considered
 */
export function selectInPlace(a: Float64Array, k: number, lo: number, hi: number): void {
  while (hi > lo) {
    const mid = (lo + hi) >>> 1
    // median of three into a[mid]
    if (a[mid] < a[lo]) swap(a, mid, lo)
    if (a[hi] < a[lo]) swap(a, hi, lo)
    if (a[hi] < a[mid]) swap(a, hi, mid)
    const pivot = a[mid]
    let i = lo
    let j = hi
    while (i <= j) {
      while (a[i] < pivot) i++
      while (a[j] > pivot) j--
      if (i <= j) {
        swap(a, i, j)
        i++
        j--
      }
    }
    if (k <= j) hi = j
    else if (k >= i) lo = i
    else return
  }
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]
  a[i] = a[j]
  a[j] = t
}

/**
 * p16, p50, p84 of the first m values of `a` (all finite), with the same linear interpolation as
 * `percentileOfSorted` (Hyndman & Fan 1996, definition 7) but in O(m) expected time by selection
 * instead of sorting. `a` is reordered.
 *
 * @param a    values (reordered in place)
 * @param m    number of values used, ≥ 1
 * @param out  receives [p16, p50, p84]
 * @example const o = new Float64Array(3); percentilesBySelection(Float64Array.of(5, 1, 4, 2, 3), 5, o); o // ≈ [1.64, 3, 4.36]
 */
export function percentilesBySelection(a: Float64Array, m: number, out: Float64Array): void {
  let from = 0
  for (let q = 0; q < 3; q++) {
    const h = PERCENTILE_POINTS[q] * (m - 1)
    const k = Math.floor(h)
    selectInPlace(a, k, from, m - 1)
    let next = a[k]
    if (k + 1 < m) {
      next = Infinity
      for (let j = k + 1; j < m; j++) if (a[j] < next) next = a[j]
    }
    out[q] = a[k] + (h - k) * (next - a[k])
    from = k // later percentiles lie at or right of k
  }
}

const PERCENTILE_POINTS = [0.16, 0.5, 0.84] as const
