/**
 * Evaluate the polynomial c₀ + c₁x + c₂x² + … by Horner's rule.
 * Source: Horner's scheme (common practice; e.g. Press et al. 2007, Numerical Recipes 3rd ed., §5.1).
 *
 * @param coefficients  c₀ … c_n, lowest order first (units of the result)
 * @param x             the argument (any unit the coefficients expect)
 * @returns the polynomial value
 * @example horner([1, 2, 3], 2) // 17 (1 + 4 + 12)
 */
export function horner(coefficients: readonly number[], x: number): number {
  let s = 0
  for (let i = coefficients.length - 1; i >= 0; i--) s = s * x + coefficients[i]
  return s
}

/**
 * Derivative of the polynomial c₀ + c₁x + … at x: c₁ + 2c₂x + 3c₃x² + …
 * Source: elementary calculus (common practice).
 *
 * @param coefficients  c₀ … c_n, lowest order first
 * @param x             the argument
 * @returns dP/dx at x
 * @example hornerDerivative([1, 2, 3], 2) // 14 (2 + 12)
 */
export function hornerDerivative(coefficients: readonly number[], x: number): number {
  let s = 0
  for (let i = coefficients.length - 1; i >= 1; i--) s = s * x + i * coefficients[i]
  return s
}
