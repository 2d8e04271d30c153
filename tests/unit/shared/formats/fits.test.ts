import { readFileSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import { FitsError, readFits, readImage, readTableColumn, tableColumns } from '../../../../shared/formats/fits.ts'
import { fluxUnitOf, spectraFromFits, wcsWavelengths } from '../../../../shared/formats/spectrum-fits.ts'

// Files and expected values written by Debian's python3-astropy: tests/fixtures/formats/make_fits_fixtures.py
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), '../../../fixtures/formats')
const expected = JSON.parse(readFileSync(join(FIXTURES, 'fits-expected.json'), 'utf8')) as {
  writtenBy: string
  spectra: { file: string; medium: string; object?: string; wavelength: number[]; flux: (number | null)[]; error?: number[]; ivar?: number[]; fluxUnit?: number }[]
  header: Record<string, unknown> & { file: string }
}
const file = (name: string) => new Uint8Array(readFileSync(join(FIXTURES, 'fits', name)))

function close(actual: readonly (number | null)[], wanted: readonly (number | null)[], relative: number) {
  expect(actual.length).toBe(wanted.length)
  for (let i = 0; i < wanted.length; i++) {
    const w = wanted[i]
    if (w === null) continue
    expect(Math.abs((actual[i] as number) - w)).toBeLessThanOrEqual(relative * Math.max(Math.abs(w), 1e-30))
  }
}

describe('FITS reader against files written by astropy', () => {
  it.each(expected.spectra.map((s) => [s.file, s] as const))('%s reads as astropy wrote it', (name, want) => {
    const [s] = spectraFromFits(file(name))
    // wavelengths: the WCS evaluated in double precision here and in astropy's numpy (FITS 4.0 §8; Greisen et al. 2006)
    close(s!.wavelength, want.wavelength, 1e-12)
    // stored float32 values widen exactly; scaled integers agree to double rounding
    close(s!.flux, want.flux, 1e-12)
    if (want.error) close(s!.error!, want.error, 1e-12)
    if (want.ivar) close(s!.ivar!, want.ivar, 1e-12)
    expect(s!.wavelengthMedium ?? 'air').toBe(want.medium)
    if (want.object) expect(s!.id).toBe(want.object)
    if (want.fluxUnit) expect(s!.fluxUnit).toBe(want.fluxUnit)
  })

  it('marks a BLANK integer pixel bad and scales the others by BSCALE/BZERO (FITS 4.0 §5.3)', () => {
    const hdus = readFits(file('image-dcflag-int16.fits'))
    const image = readImage(file('image-dcflag-int16.fits'), hdus[0]!)
    expect(Number.isNaN(image.data[17])).toBe(true)
    const [s] = spectraFromFits(file('image-dcflag-int16.fits'))
    expect(s!.flux[17]).toBe(0)
    expect(s!.error).toBeUndefined() // no noise array in this file: intake refuses it
  })

  it('keeps quoted strings with doubled quotes, CONTINUE long strings, logicals and HIERARCH keywords (FITS 4.0 §4.2, Appendix of the long-string convention)', () => {
    const [h] = readFits(file(expected.header.file))
    expect(h!.header.get('OBSERVER')).toBe(expected.header.OBSERVER)
    expect(h!.header.get('LONGSTR')).toBe(expected.header.LONGSTR)
    expect(h!.header.get('SIMPLEOK')).toBe(true)
    expect(h!.header.get('ESO DET CHIP TEMP')).toBe(-120.5)
  })

  it('reads table columns with TSCAL/TZERO and their declared units', () => {
    const bytes = file('table-rows.fits')
    const hdus = readFits(bytes)
    const cols = tableColumns(hdus[1]!)
    expect(cols.map((c) => [c.name, c.type, c.repeat, c.unit])).toEqual([
      ['WAVELENGTH', 'D', 1, 'Angstrom'], ['FLUX', 'E', 1, '1e-17 erg/s/cm2/Angstrom'], ['IVAR', 'E', 1, undefined], ['MASKNAME', 'A', 8, undefined],
    ])
    expect(readTableColumn(bytes, hdus[1]!, cols[0]!).length).toBe(240)
    expect(() => readTableColumn(bytes, hdus[1]!, cols[3]!)).toThrow(/MASKNAME holds text/)
  })

  it('refuses broken files with a reason, never a crash', () => {
    const good = file('image-linear-air.fits')
    expect(() => readFits(new TextEncoder().encode('wavelength,flux\n1,2\n'))).toThrow(FitsError)
    expect(() => readFits(good.subarray(0, 2880 + 100))).toThrow(/ends inside the data unit/)
    expect(() => readFits(good.subarray(0, 800))).toThrow(/no END card/)
    const noSimple = good.slice()
    noSimple.set(new TextEncoder().encode('SIMPLE  =                    F'), 0)
    expect(() => readFits(noSimple)).toThrow(/SIMPLE = T/)
  })

  it('evaluates linear, -LOG and DC-FLAG wavelength axes (Greisen et al. 2006, A&A 446, 747, eq. 5 and Table 1; DC-FLAG common practice)', () => {
    const linear = wcsWavelengths(new Map<string, string | number>([['CRVAL1', 5000], ['CDELT1', 2], ['CRPIX1', 3]]), 3)
    expect(linear).toEqual([4996, 4998, 5000])
    const log = wcsWavelengths(new Map<string, string | number>([['CTYPE1', 'WAVE-LOG'], ['CRVAL1', 5000], ['CDELT1', 5000 * Math.LN10 * 1e-4], ['CRPIX1', 1]]), 2)
    expect(log[1]! / log[0]!).toBeCloseTo(10 ** 1e-4, 14) // −LOG with CDELT1 = λ_r·ln10·Δlog10λ steps by Δlog10λ
    const nm = wcsWavelengths(new Map<string, string | number>([['CRVAL1', 500], ['CDELT1', 0.1], ['CUNIT1', 'nm']]), 2)
    expect(nm).toEqual([5000, 5001])
    expect(() => wcsWavelengths(new Map<string, string | number>([['CTYPE1', 'RA---TAN'], ['CRVAL1', 1], ['CDELT1', 1]]), 2)).toThrow(/not a wavelength axis/)
    expect(() => wcsWavelengths(new Map<string, string | number>([['CRVAL1', 1]]), 2)).toThrow(/no wavelength solution/)
  })

  it('reads the flux scale from the unit strings spectra carry (common practice)', () => {
    expect(fluxUnitOf('1e-17 erg/s/cm2/Angstrom')).toBe(1e-17)
    expect(fluxUnitOf('10**(-17) erg/(s cm2 Angstrom)')).toBe(1e-17)
    expect(fluxUnitOf('erg/s/cm^2/A')).toBe(1)
    expect(fluxUnitOf('1E-20 erg s-1 cm-2 Angstrom-1')).toBe(1e-20)
    expect(fluxUnitOf('Jy')).toBeUndefined()
    expect(fluxUnitOf('counts')).toBeUndefined()
  })

  it('names the files the fixtures came from', () => {
    expect(expected.writtenBy).toMatch(/^astropy \d/)
  })
})
