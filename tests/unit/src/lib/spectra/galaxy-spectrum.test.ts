import { describe, expect, it } from 'vitest'
import { hasSpectrum } from '../../../../../src/lib/spectra/galaxy-spectrum'

describe('hasSpectrum', () => {
  it('reads the provenance of a record that came from a line fit', () => {
    expect(hasSpectrum({ id: 'G', provenance: { source: 'line-fit', spectrumId: '4', revision: 2 } })).toBe(true)
    expect(hasSpectrum({ id: 'G', spectrum: { id: '4' } })).toBe(true)
    expect(hasSpectrum({ id: 'G', spectrumId: 4 })).toBe(true)
  })

  it('says no for a record typed in or sent as a table', () => {
    expect(hasSpectrum({ id: 'G' })).toBe(false)
    expect(hasSpectrum({ id: 'G', provenance: { source: 'csv' }, spectrum: null })).toBe(false)
    expect(hasSpectrum(null)).toBe(false)
  })
})
