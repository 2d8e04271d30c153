import { describe, expect, it } from 'vitest'
import { ccm89K } from '../../../../shared/extinction/ccm89.ts'

describe('ccm89K', () => {
  it('equals R_V at x = 1.82 µm⁻¹, where eqs. (3a, 3b) give a = 1, b = 0', () => {
    // Cardelli, Clayton & Mathis 1989, ApJ 345, 245, eq. (3): y = 0 → a = 1, b = 0 (exact identity)
    expect(ccm89K(1e4 / 1.82, 3.1)).toBeCloseTo(3.1, 12)
  })
  it('matches k at the line wavelengths for R_V = 3.1', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4; quoted to 3 d.p., hence ±0.0006
    const table: Array<[number, number]> = [
      [6562.8, 2.535], [4861.33, 3.609], [4340.47, 4.174], [4101.74, 4.437], [5006.84, 3.473], [4958.91, 3.516],
      [4363.21, 4.148], [6583.45, 2.525], [6548.05, 2.542], [5754.64, 2.943], [6716.44, 2.462], [6730.82, 2.455],
      [6300.3, 2.661], [3726.03, 4.772], [3728.82, 4.77],
    ]
    for (const [l, k] of table) expect(Math.abs(ccm89K(l, 3.1) - k), `${l} Å`).toBeLessThan(6e-4)
  })
  it('covers the IR, optical, UV and far-UV branches', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4 "more wavelengths"; 3 d.p. → ±0.0006
    const table: Array<[number, number]> = [
      [1500, 8.258], [2175, 9.874], [3000, 5.636], [3650, 4.826], [4400, 4.106], [5500, 3.096], [7000, 2.326],
      [9000, 1.484], [12200, 0.909], [16500, 0.559], [22000, 0.352],
    ]
    for (const [l, k] of table) expect(Math.abs(ccm89K(l, 3.1) - k), `${l} Å`).toBeLessThan(6e-4)
    // far-UV branch (x = 9.5): python3-extinction 0.4.6 gives A = 21.48… at 910 Å; at 1050 Å we check continuity instead
    expect(Math.abs(ccm89K(1250.0001, 3.1) - ccm89K(1249.9999, 3.1))).toBeLessThan(0.01)
  })
  it('depends on R_V as shared/science/README.md §1.4 tabulates', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4 ("CCM89 at other R_V"); ±0.0006
    expect(Math.abs(ccm89K(6562.8, 2.5) - 1.99)).toBeLessThan(6e-4)
    expect(Math.abs(ccm89K(4861.33, 2.5) - 3.0)).toBeLessThan(6e-4)
    expect(Math.abs(ccm89K(6562.8, 4.0) - 3.353)).toBeLessThan(6e-4)
    expect(Math.abs(ccm89K(4861.33, 4.0) - 4.523)).toBeLessThan(6e-4)
    expect(Math.abs(ccm89K(6562.8, 5.0) - 4.262)).toBeLessThan(6e-4)
    expect(Math.abs(ccm89K(4861.33, 5.0) - 5.538)).toBeLessThan(6e-4)
  })
  it('agrees with the widely quoted k(Hα) = 2.53, k(Hβ) = 3.61', () => {
    // common practice (shared/science/README.md §1.4); quoted to 2 d.p., hence ±0.01
    expect(Math.abs(ccm89K(6562.8, 3.1) - 2.53)).toBeLessThan(0.01)
    expect(Math.abs(ccm89K(4861.33, 3.1) - 3.61)).toBeLessThan(0.01)
  })
  it('refuses wavelengths outside 1000–33 333 Å with a RangeError naming the value', () => {
    // Cardelli et al. 1989 validity 0.3 ≤ x ≤ 10 µm⁻¹; shared/science/README.md §1.3: never extrapolate
    expect(() => ccm89K(999, 3.1)).toThrow(RangeError)
    expect(() => ccm89K(34000, 3.1)).toThrow(/34000/)
    expect(() => ccm89K(Number.NaN, 3.1)).toThrow(RangeError)
  })
})
