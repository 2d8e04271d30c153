import type { BinnedCounts } from '../../api/spectra-types'
import type { Histogram } from '../../api/types'

/**
 * The overview's kinematics histograms in the shape the histogram bars draw. The server sends bin
 * edges (one more than the counts); bin centres (as many as the counts) are turned into edges half
 * way between them, so either reads the same.
 */
export function histogramOf(b: BinnedCounts | null | undefined): Histogram | null {
  if (!b || !Array.isArray(b.bins) || !Array.isArray(b.counts) || b.counts.length === 0) return null
  const { bins, counts } = b
  if (bins.length === counts.length + 1) return { edges: [...bins], counts: [...counts] }
  if (bins.length !== counts.length) return null
  if (bins.length === 1) return { edges: [bins[0] - 0.5, bins[0] + 0.5], counts: [...counts] }
  const edges = [bins[0] - (bins[1] - bins[0]) / 2]
  for (let i = 0; i < bins.length - 1; i++) edges.push((bins[i] + bins[i + 1]) / 2)
  edges.push(bins[bins.length - 1] + (bins[bins.length - 1] - bins[bins.length - 2]) / 2)
  return { edges, counts: [...counts] }
}

/** Median of a histogram (linear inside its bin), null when it is empty. */
export function histogramMedian(h: Histogram | null): number | null {
  if (!h) return null
  const total = h.counts.reduce((a, c) => a + c, 0)
  if (!(total > 0)) return null
  let seen = 0
  for (let i = 0; i < h.counts.length; i++) {
    const c = h.counts[i]
    if (seen + c >= total / 2) {
      const f = c > 0 ? (total / 2 - seen) / c : 0
      return h.edges[i] + f * (h.edges[i + 1] - h.edges[i])
    }
    seen += c
  }
  return h.edges[h.edges.length - 1]
}
