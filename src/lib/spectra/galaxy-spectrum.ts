/**
 * Whether a galaxy's record came from a line fit of its spectrum: the record's provenance names
 * the spectrum (`{ source: 'line-fit', spectrumId, revision }`), or the detail carries a spectrum
 * reference. Only then does the Galaxy screen ask for the spectrum (a galaxy without one answers 404).
 */
export function hasSpectrum(detail: unknown): boolean {
  if (!detail || typeof detail !== 'object') return false
  const d = detail as { provenance?: unknown; spectrum?: unknown; spectrumId?: unknown }
  if (d.spectrum !== undefined && d.spectrum !== null && d.spectrum !== false) return true
  if (d.spectrumId !== undefined && d.spectrumId !== null) return true
  const p = d.provenance as { source?: unknown; spectrumId?: unknown } | null | undefined
  return !!p && typeof p === 'object' && (p.source === 'line-fit' || (p.spectrumId !== undefined && p.spectrumId !== null))
}
