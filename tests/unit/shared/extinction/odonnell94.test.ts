import { describe, expect, it } from 'vitest'
import { ccm89K } from '../../../../shared/extinction/ccm89.ts'
import { odonnell94K } from '../../../../shared/extinction/odonnell94.ts'

describe('odonnell94K', () => {
  it('matches k at the line wavelengths for R_V = 3.1', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4; 3 d.p. → ±0.0006
    const table: Array<[number, number]> = [
      [6562.8, 2.519], [4861.33, 3.663], [4340.47, 4.15], [4101.74, 4.341], [5006.84, 3.522], [4363.21, 4.131],
      [6583.45, 2.51], [5754.64, 2.921], [6716.44, 2.455], [6300.3, 2.632], [3726.03, 4.673], [3728.82, 4.67],
    ]
    for (const [l, k] of table) expect(Math.abs(odonnell94K(l, 3.1) - k), `${l} Å`).toBeLessThan(6e-4)
  })
  it('equals CCM89 outside the optical branch (same IR/UV formulas)', () => {
    // O'Donnell 1994, ApJ 422, 158 replaces only 1.1 ≤ x < 3.3 µm⁻¹ (shared/science/README.md §1.3): exact identity
    for (const l of [1200, 1500, 2175, 3000, 9500, 12200, 22000]) expect(odonnell94K(l, 3.1)).toBe(ccm89K(l, 3.1))
  })
  it('refuses wavelengths outside its range', () => {
    expect(() => odonnell94K(900, 3.1)).toThrow(RangeError)
  })
})
