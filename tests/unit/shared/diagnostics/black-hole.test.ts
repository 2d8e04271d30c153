import { describe, expect, it } from 'vitest'
import { blackHoleMassGreeneHo05 } from '../../../../shared/diagnostics/black-hole.ts'

describe('blackHoleMassGreeneHo05 (Greene & Ho 2005, ApJ 630, 122)', () => {
  it('reproduces the shared/science/README.md §7 checks', () => {
    // shared/science/README.md §7; 4 significant figures
    expect(blackHoleMassGreeneHo05(1e42, 1000)).toBeCloseTo(2.0e6, -1)
    expect(blackHoleMassGreeneHo05(1e43, 3000) / 6.822e7).toBeCloseTo(1, 3)
    expect(blackHoleMassGreeneHo05(1e41, 2000) / 2.351e6).toBeCloseTo(1, 3)
  })
})
