import { describe, expect, it } from 'vitest'
import { extinctionK } from '../../../../shared/extinction/index.ts'
import { defaultRvFor, EXTINCTION_LAWS } from '../../../../shared/vocabulary/extinction-laws.ts'
import { balmerCoefficient } from '../../../../shared/diagnostics/balmer-decrement.ts'

describe('extinctionK', () => {
  it('gives the Balmer coefficients 2.5/(k(Hβ) − k(Hα)) of shared/science/README.md §1.2', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.2; 3 d.p. → ±0.0006
    const coeff = (law: (typeof EXTINCTION_LAWS)[number], rv: number) =>
      balmerCoefficient(extinctionK(law, 4861.33, rv), extinctionK(law, 6562.8, rv))
    expect(Math.abs(coeff('ccm89', 3.1) - 2.328)).toBeLessThan(6e-4)
    expect(Math.abs(coeff('odonnell94', 3.1) - 2.185)).toBeLessThan(6e-4)
    expect(Math.abs(coeff('calzetti00', 4.05) - 1.966)).toBeLessThan(6e-4)
    expect(Math.abs(coeff('fitzpatrick99', 3.1) - 1.989)).toBeLessThan(6e-4)
  })
  it('gives k(4363) − k(5007) = 0.675 (CCM89) and 0.636 (Calzetti)', () => {
    // shared/science/README.md §4 (python3-extinction 0.4.6); 3 d.p. → ±0.0006
    expect(Math.abs(extinctionK('ccm89', 4363.21, 3.1) - extinctionK('ccm89', 5006.84, 3.1) - 0.675)).toBeLessThan(6e-4)
    expect(Math.abs(extinctionK('calzetti00', 4363.21, 4.05) - extinctionK('calzetti00', 5006.84, 4.05) - 0.636)).toBeLessThan(6e-4)
  })
  it('throws RangeError for a bad law or R_V', () => {
    expect(() => extinctionK('nope' as never, 5000, 3.1)).toThrow(RangeError)
    expect(() => extinctionK('ccm89', 5000, 0)).toThrow(RangeError)
    expect(() => extinctionK('ccm89', 5000, Number.NaN)).toThrow(RangeError)
  })
})

describe('defaultRvFor', () => {
  it('is 4.05 for Calzetti 2000 and 3.1 otherwise', () => {
    // Calzetti et al. 2000, ApJ 533, 682: R′_V = 4.05 ± 0.80; 3.1 diffuse Milky Way (common practice)
    expect(defaultRvFor('calzetti00')).toBe(4.05)
    expect(defaultRvFor('ccm89')).toBe(3.1)
    expect(defaultRvFor('odonnell94')).toBe(3.1)
    expect(defaultRvFor('fitzpatrick99')).toBe(3.1)
  })
})
