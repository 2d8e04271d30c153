import { describe, expect, it } from 'vitest'
import { calzetti00K } from '../../../../shared/extinction/calzetti00.ts'

describe('calzetti00K', () => {
  it('matches k at the line wavelengths for R′_V = 4.05', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.4; 3 d.p. → ±0.0006
    const table: Array<[number, number]> = [
      [6562.8, 3.326], [4861.33, 4.598], [4340.47, 5.125], [5006.84, 4.464], [4363.21, 5.1], [6583.45, 3.313],
      [5754.64, 3.853], [6716.44, 3.23], [6300.3, 3.501], [3726.03, 5.859], [1500, 10.334], [22000, 0.369],
    ]
    for (const [l, k] of table) expect(Math.abs(calzetti00K(l, 4.05) - k), `${l} Å`).toBeLessThan(6e-4)
  })
  it('uses the red branch from 0.63 µm on; the branches differ by 0.025 there', () => {
    // Calzetti et al. 2000, ApJ 533, 682, eq. (4); 3.4766 vs 3.5017 at 0.63 µm (shared/science/README.md §1.3)
    expect(calzetti00K(6300, 4.05)).toBeCloseTo(3.5017, 4)
    expect(calzetti00K(6299.999999, 4.05)).toBeCloseTo(3.4766, 4)
    // [O I] 6300.30 Å (air) is on the red branch: k = 3.5015 (shared/science/README.md §1.3)
    expect(calzetti00K(6300.3, 4.05)).toBeCloseTo(3.5015, 4)
  })
  it('refuses λ outside 0.12–2.2 µm instead of going negative', () => {
    // shared/science/README.md §1.3: the library extrapolates silently beyond 2.2 µm; the service must refuse
    expect(() => calzetti00K(1199, 4.05)).toThrow(RangeError)
    expect(() => calzetti00K(32000, 4.05)).toThrow(/22000/)
  })
})
