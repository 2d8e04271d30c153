import { describe, expect, it } from 'vitest'
import { spectraFromFile, spectrumFromText } from '../../../../shared/formats/spectrum-text.ts'

describe('spectra from text tables (common practice layouts)', () => {
  it('reads a CSV with a header, units in brackets and an error column', () => {
    const s = spectrumFromText('wavelength [nm],flux [1e-17 erg/s/cm2/A],err\n650.0,10.5,0.5\n650.1,11.0,0.6\n')
    expect(s.wavelength).toEqual([6500, 6501])
    expect(s.flux).toEqual([10.5, 11])
    expect(s.error).toEqual([0.5, 0.6])
    expect(s.fluxUnit).toBe(1e-17)
  })

  it('takes the names from a # comment just before whitespace-separated numbers, with ivar', () => {
    const s = spectrumFromText('# observed 2026-11-30\n# lambda flux ivar\n6500 10 4\n6501 nan 4\n6502 12 0\n')
    expect(s.wavelength).toEqual([6500, 6501, 6502])
    expect(s.flux).toEqual([10, 0, 12])
    expect(s.ivar).toEqual([4, 0, 0]) // a NaN flux marks the pixel bad
  })

  it('reads positional columns with no header, variance by name, loglam, and ; with decimal commas', () => {
    expect(spectrumFromText('6500 1 0.1\n6501 2 0.2\n').error).toEqual([0.1, 0.2])
    expect(spectrumFromText('wave\tflux\tvar\n6500\t1\t0.04\n').error![0]).toBeCloseTo(0.2, 15)
    expect(spectrumFromText('loglam,flux,error\n3.8,1,0.1\n').wavelength[0]).toBeCloseTo(10 ** 3.8, 9)
    const s = spectrumFromText('wavelength;flux;error\n6500,5;1,25;0,1\n6501,5;1,5;0,1\n')
    expect(s.wavelength).toEqual([6500.5, 6501.5])
    expect(s.flux).toEqual([1.25, 1.5])
  })

  it('marks missing and non-positive errors as bad pixels', () => {
    expect(spectrumFromText('wave,flux,error\n1,2,\n2,3,0\n3,4,-1\n4,5,0.5\n').error).toEqual([null, null, null, 0.5])
  })

  it('says which line is wrong', () => {
    expect(() => spectrumFromText('wave,flux,error\n6500,1,0.1\n6501,abc,0.1\n')).toThrow(/line 3: .* not a number/)
    expect(() => spectrumFromText('wave,flux,error\n6500,1\n')).toThrow(/line 2: 2 values where 3 columns/)
    expect(() => spectrumFromText('a,b\nc,d\n')).toThrow(/line 2: expected numbers after the header/)
    expect(() => spectrumFromText('')).toThrow(/no rows of numbers/)
    expect(() => spectrumFromText('time,counts\n1,2\n')).toThrow(/no wavelength column/)
    expect(() => spectrumFromText('wave [furlong],flux\n1,2\n')).toThrow(/wavelength unit "furlong"/)
  })

  it('tells FITS from text by the first card', () => {
    expect(spectraFromFile(new TextEncoder().encode('6500 1 0.1\n'))).toHaveLength(1)
  })
})
