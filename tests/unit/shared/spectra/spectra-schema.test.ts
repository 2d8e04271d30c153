import { describe, expect, it } from 'vitest'
import { FitOptionsSchema, SPECTRA_MAX_PER_REQUEST, SPECTRUM_MAX_PIXELS, SpectrumSchema } from '../../../../shared/schemas/spectra.schema.ts'
import { DEFAULT_FIT_OPTIONS, fitSpectrum } from '../../../../shared/spectra/index.ts'
import { ScienceInputError } from '../../../../shared/flags.ts'

/** The spectrum object and fit options (shared/science/README.md §13.10): issues carry the member's path. */
const base = () => ({
  id: 'LNS-0000001', redshift: 0.03, wavelength: Array.from({ length: 20 }, (_, i) => 6500 + i), flux: Array(20).fill(1), error: Array(20).fill(0.1),
})
const paths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) => (r.error?.issues ?? []).map((i) => '/' + i.path.join('/'))

describe('SpectrumSchema', () => {
  it('accepts a spectrum and defaults the medium to air', () => {
    const r = SpectrumSchema.safeParse(base())
    expect(r.success).toBe(true)
    expect(r.data?.wavelengthMedium).toBe('air')
  })
  it('wavelengths not strictly increasing → an issue at /wavelength', () => {
    const s = base()
    s.wavelength[7] = s.wavelength[6]
    expect(paths(SpectrumSchema.safeParse(s))).toEqual(['/wavelength'])
  })
  it('arrays of unequal length → an issue at the shorter one', () => {
    const s = { ...base(), flux: Array(19).fill(1) }
    expect(paths(SpectrumSchema.safeParse(s))).toEqual(['/flux'])
  })
  it('exactly one of error and ivar: neither or both → an issue at the spectrum itself', () => {
    const { error: _e, ...none } = base()
    expect(paths(SpectrumSchema.safeParse(none))).toEqual(['/'])
    expect(paths(SpectrumSchema.safeParse({ ...base(), ivar: Array(20).fill(100) }))).toEqual(['/'])
  })
  it('error may hold null (a bad pixel), ivar may hold 0 but not null; a non-positive error is refused at its element', () => {
    const s = base()
    ;(s.error as (number | null)[])[3] = null
    expect(SpectrumSchema.safeParse(s).success).toBe(true)
    const { error: _e, ...rest } = base()
    expect(SpectrumSchema.safeParse({ ...rest, ivar: [0, ...Array(19).fill(4)] }).success).toBe(true)
    expect(paths(SpectrumSchema.safeParse({ ...rest, ivar: [null, ...Array(19).fill(4)] }))).toEqual(['/ivar/0'])
    const bad = base()
    bad.error[4] = 0
    expect(paths(SpectrumSchema.safeParse(bad))).toEqual(['/error/4'])
  })
  it(`at most ${SPECTRUM_MAX_PIXELS} pixels; ${SPECTRA_MAX_PER_REQUEST} spectra per request is the route's limit`, () => {
    expect(SPECTRUM_MAX_PIXELS).toBe(50_000)
    expect(SPECTRA_MAX_PER_REQUEST).toBe(1_000)
    const n = SPECTRUM_MAX_PIXELS + 1
    const big = { ...base(), wavelength: Array.from({ length: n }, (_, i) => 3000 + i * 0.1), flux: Array(n).fill(1), error: Array(n).fill(1) }
    expect(paths(SpectrumSchema.safeParse(big))).toEqual(['/wavelength', '/flux', '/error'])
  })
  it('resolution takes exactly one of fwhmAngstrom, fwhmKmPerS, resolvingPower', () => {
    expect(SpectrumSchema.safeParse({ ...base(), resolution: { resolvingPower: 2000 } }).success).toBe(true)
    expect(paths(SpectrumSchema.safeParse({ ...base(), resolution: { resolvingPower: 2000, fwhmAngstrom: 2 } }))).toEqual(['/resolution'])
    expect(paths(SpectrumSchema.safeParse({ ...base(), resolution: {} }))).toEqual(['/resolution'])
  })
})

describe('FitOptionsSchema', () => {
  it('defaults equal DEFAULT_FIT_OPTIONS', () => {
    expect(FitOptionsSchema.parse({})).toEqual(DEFAULT_FIT_OPTIONS)
  })
  it('refuses unknown profiles, components 3 and negative draws at their paths', () => {
    expect(paths(FitOptionsSchema.safeParse({ profile: 'sinc' }))).toEqual(['/profile'])
    expect(paths(FitOptionsSchema.safeParse({ components: 3 }))).toEqual(['/components'])
    expect(paths(FitOptionsSchema.safeParse({ monteCarlo: { draws: -1 } }))).toEqual(['/monteCarlo/draws'])
  })
})

describe('fitSpectrum guards its own input', () => {
  it('throws ScienceInputError with the member path for unsorted wavelengths, unequal arrays, no error/ivar', () => {
    const s = base()
    s.wavelength[3] = 1
    expect(() => fitSpectrum(s)).toThrow(ScienceInputError)
    expect(() => fitSpectrum({ ...base(), flux: [1, 2] })).toThrow(/flux/)
    const { error: _e, ...none } = base()
    expect(() => fitSpectrum(none)).toThrow(ScienceInputError)
  })
  it('a spectrum covering no line gives an empty result with not-covered flags', () => {
    const r = fitSpectrum({ ...base(), wavelength: Array.from({ length: 20 }, (_, i) => 8000 + i) })
    expect(r.lines).toEqual({})
    expect(r.fit).toEqual({ chi2: 0, dof: 0, components: 0, broadHalpha: false })
    expect(r.flags).toContain('not-covered:halpha')
  })
})
