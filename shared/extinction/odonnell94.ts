import { ccm89ABranches } from './ccm89.ts'

/** Valid range of O'Donnell 1994: that of CCM89, 1000–33 333 Å. */
export const ODONNELL94_RANGE_ANGSTROM = { min: 1000, max: 1e5 / 3 } as const

/** O'Donnell 1994, ApJ 422, 158, eq. (2): optical a(y), coefficients of y⁰ … y⁸ (shared/science/README.md §1.3). */
export const ODONNELL94_OPTICAL_A = [1, 0.104, -0.609, 0.701, 1.137, -1.718, -0.827, 1.647, -0.505] as const
/** O'Donnell 1994, eq. (2): optical b(y), coefficients of y⁰ … y⁸. */
export const ODONNELL94_OPTICAL_B = [0, 1.952, 2.908, -3.989, -7.985, 11.102, 5.491, -10.805, 3.347] as const

const ab: [number, number] = [0, 0]

/**
 * O'Donnell 1994 extinction curve: CCM89 with the optical/near-IR polynomials (1.1 ≤ x < 3.3 µm⁻¹)
 * replaced; IR, UV and far-UV branches are CCM89's.
 * Source: O'Donnell 1994, ApJ 422, 158, eq. (2) (equation number from memory, shared/science/README.md §12);
 * Cardelli, Clayton & Mathis 1989, ApJ 345, 245, eqs. (1), (2), (4), (5).
 *
 * @param wavelengthAngstrom  λ in Å (air), 1000–33 333 Å
 * @param rv  R_V, dimensionless
 * @returns k(λ) = A(λ)/E(B−V) in mag/mag
 * @throws {RangeError} outside 1000–33 333 Å
 * @example odonnell94K(4861.33, 3.1) // ≈ 3.663 (Hβ; python3-extinction 0.4.6, via shared/science/README.md §1.4)
 */
export function odonnell94K(wavelengthAngstrom: number, rv: number): number {
  const x = 1e4 / wavelengthAngstrom
  if (!(x >= 0.3 && x <= 10)) {
    throw new RangeError(`odonnell94K requires λ between 1000 and 33333.3 Å, got ${wavelengthAngstrom}`)
  }
  ccm89ABranches(x, ODONNELL94_OPTICAL_A, ODONNELL94_OPTICAL_B, ab)
  return rv * ab[0] + ab[1]
}
