import { horner } from '../stats/polynomial.ts'

/** Valid range of the Calzetti et al. 2000 curve: 0.12–2.20 µm (Calzetti et al. 2000, eq. 4). */
export const CALZETTI00_RANGE_ANGSTROM = { min: 1200, max: 22000 } as const

/** Calzetti et al. 2000, eq. (4), 0.12 ≤ λ < 0.63 µm: polynomial in 1/λ (µm⁻¹), coefficients of (1/λ)⁰ … (1/λ)³. */
const CALZETTI00_BLUE = [-2.156, 1.509, -0.198, 0.011] as const
/** Calzetti et al. 2000, eq. (4), 0.63 ≤ λ ≤ 2.20 µm: coefficients of (1/λ)⁰, (1/λ)¹. */
const CALZETTI00_RED = [-1.857, 1.04] as const
/** Calzetti et al. 2000, eq. (4): overall factor 2.659. */
const CALZETTI00_SCALE = 2.659
/** Branch point 0.63 µm; λ ≥ 0.63 µm uses the red branch (shared/science/README.md §1.3, project convention). */
const CALZETTI00_BRANCH_ANGSTROM = 6300

/**
 * Calzetti et al. 2000 starburst attenuation curve k′(λ) = A(λ)/E_s(B−V).
 * Source: Calzetti et al. 2000, ApJ 533, 682, eq. (4), with R′_V = 4.05 ± 0.80 (eq. 5):
 *   0.12 ≤ λ < 0.63 µm: k′ = 2.659(−2.156 + 1.509/λ − 0.198/λ² + 0.011/λ³) + R′_V
 *   0.63 ≤ λ ≤ 2.20 µm: k′ = 2.659(−1.857 + 1.040/λ) + R′_V
 * The branches differ by 0.025 at 0.63 µm; [O I] 6300.30 Å falls on the red branch.
 *
 * @param wavelengthAngstrom  λ in Å (air), 1200–22 000 Å
 * @param rv  R′_V, dimensionless (the published value is 4.05; `defaultRvFor('calzetti00')`)
 * @returns k′(λ) in mag/mag
 * @throws {RangeError} outside 1200–22 000 Å (the formula goes negative beyond ~3.2 µm)
 * @example calzetti00K(6562.8, 4.05) // ≈ 3.326 (Hα; python3-extinction 0.4.6, via shared/science/README.md §1.4)
 */
export function calzetti00K(wavelengthAngstrom: number, rv: number): number {
  if (!(wavelengthAngstrom >= CALZETTI00_RANGE_ANGSTROM.min && wavelengthAngstrom <= CALZETTI00_RANGE_ANGSTROM.max)) {
    throw new RangeError(`calzetti00K requires λ between 1200 and 22000 Å, got ${wavelengthAngstrom}`)
  }
  const x = 1e4 / wavelengthAngstrom
  const branch = wavelengthAngstrom >= CALZETTI00_BRANCH_ANGSTROM ? CALZETTI00_RED : CALZETTI00_BLUE
  return CALZETTI00_SCALE * horner(branch, x) + rv
}
