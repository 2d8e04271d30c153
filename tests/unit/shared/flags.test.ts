import { describe, expect, it } from 'vitest'
import { requireFinite, requirePositiveFinite, ScienceInputError } from '../../../shared/flags.ts'
import { belowMinSnrFlag, FLAG_FAMILIES, FLAG_WORDS, flagArgument, flagBit, ratioLimitFlag, ROW_FLAGS } from '../../../shared/vocabulary/flags.ts'

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

describe('flag families and their arguments (the registry in shared/vocabulary/flags.ts)', () => {
  // a sample argument of each kind, as flags carry them
  const SAMPLES: Record<string, [string, string]> = {
    line: ['halpha', 'hbeta'], diagram: ['nii', 'sii'], curve: ['nii-ka03', 'sii-ke01'], ratio: ['niiHa:upper', 'oiiiHb:lower'], doublet: ['sii', 'oii'], ion: ['oiii', 'nii'],
  }
  it('a family marked with an argument reads it into its text; the others do not depend on one', () => {
    for (const [name, family] of Object.entries(FLAG_FAMILIES)) {
      if (family.argument) {
        const [a, b] = SAMPLES[family.argument]
        expect(family.text(a), name).not.toBe(family.text(b))
        expect(flagArgument(name), name).toBe(family.argument)
      } else {
        expect(family.text('halpha'), name).toBe(family.text('nii'))
        expect(flagArgument(name), name).toBeUndefined()
      }
    }
  })
  it('the spectrum families that name a line say so', () => {
    expect(flagArgument('not-covered')).toBe('line')
    expect(flagArgument('unresolved')).toBe('line')
    expect(flagArgument('fit-not-converged')).toBeUndefined()
  })
})
