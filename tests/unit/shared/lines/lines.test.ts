import { describe, expect, it } from 'vitest'
import { AIR_WAVELENGTH_ANGSTROM, isLineId, LINE_IDS, LINES } from '../../../../shared/vocabulary/lines.ts'

describe('the lines of the public API', () => {
  it('are the 16 identifiers of the public API in kernel order', () => {
    expect(LINE_IDS).toEqual(['halpha', 'hbeta', 'hgamma', 'hdelta', 'oiii_5007', 'oiii_4959', 'oiii_4363', 'nii_6584', 'nii_6548',
      'nii_5755', 'sii_6717', 'sii_6731', 'oi_6300', 'oii_3726', 'oii_3729', 'halpha_broad'])
    expect(isLineId('halpha')).toBe(true)
    expect(isLineId('hepsilon')).toBe(false)
    expect(isLineId('toString')).toBe(false)
  })
  it('carry the air wavelengths of shared/science/README.md §0', () => {
    // NIST ASD values as tabulated in shared/science/README.md §0 (last digit from memory, shared/science/README.md §12)
    expect(AIR_WAVELENGTH_ANGSTROM).toMatchObject({ halpha: 6562.8, hbeta: 4861.33, oiii_5007: 5006.84, nii_6584: 6583.45,
      sii_6717: 6716.44, sii_6731: 6730.82, oi_6300: 6300.3, oii_3726: 3726.03, oii_3729: 3728.82, nii_5755: 5754.64 })
    for (const l of LINES) expect(l.source).toMatch(/NIST/)
  })
})
