import { describe, expect, it } from 'vitest'
import { adaptiveGaussLegendre, gaussLegendre10 } from '../../../../shared/stats/integration.ts'

describe('Gauss–Legendre quadrature (Abramowitz & Stegun 1964, 25.4.29)', () => {
  it('is exact for polynomials up to degree 19', () => {
    // ∫₀¹ x¹⁹ dx = 1/20 exactly (10-point rule, degree of exactness 2n − 1)
    expect(gaussLegendre10((x) => x ** 19, 0, 1)).toBeCloseTo(0.05, 14)
    expect(gaussLegendre10((x) => x * x, 0, 3)).toBeCloseTo(9, 13)
  })
  it('adapts to a relative error far below 1e-8', () => {
    expect(Math.abs(adaptiveGaussLegendre(Math.exp, 0, 1) - (Math.E - 1))).toBeLessThan(1e-13)
    // ∫₀^π sin = 2; ∫₀¹ √x = 2/3 (end-point singularity in the derivative)
    expect(adaptiveGaussLegendre(Math.sin, 0, Math.PI)).toBeCloseTo(2, 12)
    expect(Math.abs(adaptiveGaussLegendre(Math.sqrt, 0, 1) - 2 / 3) / (2 / 3)).toBeLessThan(1e-9)
  })
})
