import { describe, expect, it } from 'vitest'
import { blackHoleLog10MassError, blackHoleMassGreeneHo05 } from '../../../../shared/diagnostics/black-hole.ts'

describe('blackHoleMassGreeneHo05 (Greene & Ho 2005, ApJ 630, 122)', () => {
  it('reproduces the shared/science/README.md §7 checks', () => {
    // shared/science/README.md §7; 4 significant figures
    expect(blackHoleMassGreeneHo05(1e42, 1000)).toBeCloseTo(2.0e6, -1)
    expect(blackHoleMassGreeneHo05(1e43, 3000) / 6.822e7).toBeCloseTo(1, 3)
    expect(blackHoleMassGreeneHo05(1e41, 2000) / 2.351e6).toBeCloseTo(1, 3)
  })
})

describe('blackHoleLog10MassError', () => {
  it('is the luminosity exponent times σ(log L), the slope of log M in log L', () => {
    // Greene & Ho 2005, ApJ 630, 122: M ∝ L^0.55 (shared/science/README.md §7); first order (§9): checked against the
    // numerical slope of blackHoleMassGreeneHo05 (common practice)
    const h = 1e-6
    const slope = (Math.log10(blackHoleMassGreeneHo05(1e43 * (1 + h), 3000)) - Math.log10(blackHoleMassGreeneHo05(1e43 * (1 - h), 3000))) /
      (Math.log10(1 + h) - Math.log10(1 - h))
    expect(slope).toBeCloseTo(0.55, 8)
    expect(blackHoleLog10MassError(0.1)).toBeCloseTo((0.55 * 0.1) / Math.LN10, 15)
  })
})
