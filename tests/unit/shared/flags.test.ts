import { describe, expect, it } from 'vitest'
import { requireFinite, requirePositiveFinite, ScienceInputError } from '../../../shared/flags.ts'
import { belowMinSnrFlag, FLAG_WORDS, flagBit, ratioLimitFlag, ROW_FLAGS } from '../../../shared/vocabulary/flags.ts'

describe('flag vocabulary and input guards', () => {
  it('has unique kebab-case flags that fit the kernel words', () => {
    expect(new Set(ROW_FLAGS).size).toBe(ROW_FLAGS.length)
    for (const f of ROW_FLAGS) expect(f).toMatch(/^[a-zA-Z0-9:-]+$/)
    expect(ROW_FLAGS.length).toBeLessThanOrEqual(FLAG_WORDS * 32)
    expect(ROW_FLAGS).toEqual(expect.arrayContaining(['balmer-below-intrinsic', 'balmer-from-hgamma', 'curve-crossing-region',
      'metallicity-not-star-forming', 'sfr-not-star-forming', 'sfr-not-dereddened', 'n2Pp04-out-of-range', 'limit-not-decisive:nii']))
    expect(() => flagBit('no-such-flag')).toThrow()
    expect(belowMinSnrFlag('hbeta')).toBe('below-min-snr:hbeta')
    expect(ratioLimitFlag('niiHa', 'upper')).toBe('ratio-limit:niiHa:upper')
  })
  it('guards throw ScienceInputError with the path', () => {
    expect(() => requireFinite('/lines/hbeta/flux', Number.NaN)).toThrow(ScienceInputError)
    expect(() => requirePositiveFinite('/lines/hbeta/error', 0)).toThrow(/\/lines\/hbeta\/error must be greater than 0/)
    expect(requirePositiveFinite('/x', 2)).toBe(2)
    try {
      requireFinite('/redshift', 'a')
    } catch (e) {
      expect((e as ScienceInputError).path).toBe('/redshift')
    }
  })
})
