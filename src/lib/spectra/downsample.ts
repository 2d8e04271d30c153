/**
 * Which pixels to draw. A spectrum has up to 50,000 pixels and the plot a thousand columns; drawing
 * every pixel costs SVG paths of 50,000 points per curve for nothing. Per bucket of consecutive
 * pixels we keep the first pixel and each series' lowest and highest (min–max decimation, common
 * practice for line plots), so narrow lines, spikes and gaps look as they do at full resolution.
 * A zoomed window has fewer pixels than buckets and is drawn whole.
 */

type Series = ArrayLike<number | null>

/** First index i with x[i] ≥ v (x ascending). */
export function lowerBound(x: ArrayLike<number>, v: number): number {
  let a = 0, b = x.length
  while (a < b) {
    const m = (a + b) >>> 1
    if (x[m] < v) a = m + 1
    else b = m
  }
  return a
}

/** First index i with x[i] > v (x ascending). */
export function upperBound(x: ArrayLike<number>, v: number): number {
  let a = 0, b = x.length
  while (a < b) {
    const m = (a + b) >>> 1
    if (x[m] <= v) a = m + 1
    else b = m
  }
  return a
}

const usable = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v)

/**
 * Indices (ascending) of the pixels to draw between `from` and `to` (Å), one pixel beyond each end so
 * the curves reach the edges of the plot.
 *
 * @param x        wavelengths, ascending
 * @param series   curves whose extremes must survive (data, model)
 * @param buckets  about the plot's width in pixels
 * @example Array.from(displayIndices([1, 2, 3], [[5, 6, 7]], 0, 10, 100)) // [0, 1, 2]
 */
export function displayIndices(x: ArrayLike<number>, series: readonly Series[], from: number, to: number, buckets: number): Int32Array {
  const n = x.length
  if (n === 0 || !(to >= from)) return new Int32Array(0)
  const i0 = Math.max(0, lowerBound(x, from) - 1)
  const i1 = Math.min(n - 1, upperBound(x, to))
  const count = i1 - i0 + 1
  const b = Math.max(1, Math.floor(buckets))
  if (count <= 2 * b) {
    const all = new Int32Array(count)
    for (let k = 0; k < count; k++) all[k] = i0 + k
    return all
  }
  // per bucket the first pixel and each series' lowest and highest, ascending, without repeats
  const out = new Int32Array(b * (1 + 2 * series.length) + 1)
  const picked = new Int32Array(1 + 2 * series.length)
  let m = 0
  for (let k = 0; k < b; k++) {
    const start = i0 + Math.floor((k * count) / b)
    const end = i0 + Math.floor(((k + 1) * count) / b) // exclusive
    let p = 0
    picked[p++] = start
    for (const s of series) {
      let lo = -1, hi = -1, vlo = Infinity, vhi = -Infinity
      for (let i = start; i < end; i++) {
        const v = s[i]
        if (!usable(v)) continue
        if (v < vlo) { vlo = v; lo = i }
        if (v > vhi) { vhi = v; hi = i }
      }
      if (lo >= 0) picked[p++] = lo
      if (hi >= 0) picked[p++] = hi
    }
    // insertion sort of at most a handful
    for (let a = 1; a < p; a++) {
      const v = picked[a]
      let c = a - 1
      while (c >= 0 && picked[c] > v) { picked[c + 1] = picked[c]; c-- }
      picked[c + 1] = v
    }
    for (let a = 0; a < p; a++) if (m === 0 || out[m - 1] !== picked[a]) out[m++] = picked[a]
  }
  if (out[m - 1] !== i1) out[m++] = i1
  return out.slice(0, m)
}

/** Whether indices are consecutive pixels (a window drawn whole). */
export function isRun(indices: Int32Array): boolean {
  return indices.length === 0 || indices[indices.length - 1] - indices[0] === indices.length - 1
}

/**
 * The values at `indices`; a missing or non-finite value becomes NaN (a gap in the curve). A run of
 * consecutive pixels of a Float64Array is a view on it, not a copy.
 */
export function take(values: ArrayLike<number | null> | undefined, indices: Int32Array): Float64Array {
  if (values instanceof Float64Array && isRun(indices)) return indices.length ? values.subarray(indices[0], indices[indices.length - 1] + 1) : new Float64Array(0)
  const out = new Float64Array(indices.length)
  for (let k = 0; k < indices.length; k++) {
    const v = values?.[indices[k]]
    out[k] = usable(v) ? v : NaN
  }
  return out
}
