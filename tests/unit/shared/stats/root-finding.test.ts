import { describe, expect, it } from 'vitest'
import { brentRoot, newtonBisect } from '../../../../shared/stats/root-finding.ts'

describe('bracketing root finders', () => {
  it('find √2 and the Dottie number', () => {
    // √2 = 1.41421356237…; cos x = x at 0.739085133215… (common practice)
    expect(newtonBisect((x) => x * x - 2, (x) => 2 * x, 0, 2, 1e-14) as number).toBeCloseTo(Math.SQRT2, 13)
    expect(brentRoot((x) => Math.cos(x) - x, 0, 1, 1e-14) as number).toBeCloseTo(0.7390851332151607, 13)
  })
  it('return null without a sign change and stay inside the bracket for a flat start', () => {
    expect(newtonBisect((x) => x * x + 1, (x) => 2 * x, -1, 1, 1e-12)).toBeNull()
    expect(brentRoot((x) => x * x + 1, -1, 1, 1e-12)).toBeNull()
    // derivative zero at the midpoint: bisection takes over
    expect(newtonBisect((x) => x * x * x - 0.001, (x) => 3 * x * x, -1, 1, 1e-14) as number).toBeCloseTo(0.1, 12)
  })
  it('pass parameters and a first guess', () => {
    const p = Float64Array.of(3)
    expect(newtonBisect((x, q) => x - q[0], () => 1, 0, 10, 1e-14, 100, p, 9) as number).toBeCloseTo(3, 14)
  })
})
