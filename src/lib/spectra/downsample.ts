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
  const out: number[] = []
  const picked = new Set<number>()
  for (let k = 0; k < b; k++) {
    const start = i0 + Math.floor((k * count) / b)
    const end = i0 + Math.floor(((k + 1) * count) / b) // exclusive
    picked.clear()
    picked.add(start)
    for (const s of series) {
      let lo = -1, hi = -1
      for (let i = start; i < end; i++) {
        const v = s[i]
        if (!usable(v)) continue
        if (lo < 0 || v < (s[lo] as number)) lo = i
        if (hi < 0 || v > (s[hi] as number)) hi = i
      }
      if (lo >= 0) picked.add(lo)
      if (hi >= 0) picked.add(hi)
    }
    out.push(...[...picked].sort((p, q) => p - q))
  }
  if (out[out.length - 1] !== i1) out.push(i1)
  return Int32Array.from(out)
}

/** The values at `indices`; a missing or non-finite value becomes null (a gap in the curve). */
export function take(values: ArrayLike<number | null> | undefined, indices: Int32Array): (number | null)[] {
  const out = new Array<number | null>(indices.length)
  for (let k = 0; k < indices.length; k++) {
    const v = values?.[indices[k]]
    out[k] = usable(v) ? v : null
  }
  return out
}
