import { describe, expect, it } from 'vitest'
import { spectraFromJson, SpectrumJsonError } from '../../../../shared/formats/spectrum-json.ts'
import { spectraFromFile, spectrumFileKind } from '../../../../shared/formats/spectrum-text.ts'

const s = { id: 'J-1', redshift: 0.02, fluxUnit: 1e-17, wavelengthMedium: 'vacuum', wavelength: [6500, 6501, 6502], flux: [1, 2, 3], error: [0.1, null, 0.1], resolution: { resolvingPower: 2000 } }
const enc = (v: unknown) => new TextEncoder().encode(JSON.stringify(v))

describe('spectra from JSON files (the spectrum object of POST /spectra/fit)', () => {
  it('reads one spectrum, an array, or a whole request body, keeping every member', () => {
    const [one] = spectraFromJson(JSON.stringify(s))
    expect(one).toEqual({ ...s, source: 'JSON /spectra/0' })
    expect(spectraFromJson(JSON.stringify([s, { ...s, id: 'J-2' }])).map((x) => x.id)).toEqual(['J-1', 'J-2'])
    expect(spectraFromJson(JSON.stringify({ spectra: [s] }))[0]!.source).toBe('JSON /spectra/0')
  })

  it('is told apart from FITS and text by its first character, after a BOM or white space', () => {
    expect(spectrumFileKind(enc(s))).toBe('json')
    expect(spectrumFileKind(new TextEncoder().encode('\uFEFF  \n[' ))).toBe('json')
    expect(spectrumFileKind(new TextEncoder().encode('wavelength,flux\n'))).toBe('text')
    expect(spectraFromFile(new TextEncoder().encode('\uFEFF' + JSON.stringify(s)))[0]!.id).toBe('J-1')
  })

  it('names the member at fault with its JSON Pointer', () => {
    const bad: Array<[unknown, string, RegExp]> = [
      [{ ...s, flux: [1, 'x', 3] }, '/spectra/0/flux/1', /number/],
      [{ ...s, error: undefined }, '/spectra/0', /exactly one of error and ivar/],
      [{ ...s, ivar: [1, 1, 1] }, '/spectra/0', /exactly one/],
      [[s, { ...s, colour: 'red' }], '/spectra/1/colour', /not a member/],
      [{ ...s, resolution: { fwhmAngstrom: 2, resolvingPower: 2000 } }, '/spectra/0/resolution', /one of/],
      [{ spectra: 'none' }, '/spectra', /array/],
      [{ ...s, wavelengthMedium: 'water' }, '/spectra/0/wavelengthMedium', /air or vacuum/],
    ]
    for (const [v, path, message] of bad) {
      let caught: unknown
      try { spectraFromJson(JSON.stringify(v)) } catch (e) { caught = e }
      expect(caught, path).toBeInstanceOf(SpectrumJsonError)
      expect((caught as SpectrumJsonError).path).toBe(path)
      expect((caught as SpectrumJsonError).message).toMatch(message)
    }
    expect(() => spectraFromJson('{"wavelength": [1,')).toThrow(/not valid JSON/)
  })
})
