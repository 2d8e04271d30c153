import { horner } from '../stats/polynomial.ts'

/** Valid range of CCM89: 0.3 ≤ x ≤ 10 µm⁻¹, i.e. 1000 Å ≤ λ ≤ 33 333 Å (Cardelli et al. 1989, §III). */
export const CCM89_RANGE_ANGSTROM = { min: 1000, max: 1e5 / 3 } as const

/** Cardelli, Clayton & Mathis 1989, eqs. (3a) and (3b): optical a(y), b(y), coefficients of y⁰ … y⁷. */
export const CCM89_OPTICAL_A = [1, 0.17699, -0.50447, -0.02427, 0.72085, 0.01979, -0.7753, 0.32999] as const
export const CCM89_OPTICAL_B = [0, 1.41338, 2.28305, 1.07233, -5.38434, -0.62251, 5.3026, -2.09002] as const

/**
 * CCM89 a(x) and b(x) in the IR, UV and far-UV, with the optical polynomials passed in (so that
 * O'Donnell 1994 can replace only the optical branch). Writes [a, b] into `out`.
 * Source: Cardelli, Clayton & Mathis 1989, ApJ 345, 245:
 *   eqs. (2a, 2b)  IR, 0.3 ≤ x < 1.1: a = 0.574 x^1.61, b = −0.527 x^1.61
 *   eqs. (3a, 3b)  optical/NIR, 1.1 ≤ x < 3.3, y = x − 1.82: polynomials (`opticalA`, `opticalB`)
 *   eqs. (4a, 4b)  UV, 3.3 ≤ x < 8, with F_a, F_b for x ≥ 5.9
 *   eqs. (5a, 5b)  far-UV, 8 ≤ x ≤ 10
 * (coefficients: shared/science/README.md §1.3, confirmed by the python3-extinction fixture; equation numbers from memory, shared/science/README.md §12).
 *
 * @param x  1/λ in µm⁻¹, 0.3 ≤ x ≤ 10 (not checked here)
 */
export function ccm89ABranches(
  x: number, opticalA: readonly number[], opticalB: readonly number[], out: [number, number],
): void {
  if (x < 1.1) {
    const p = Math.pow(x, 1.61)
    out[0] = 0.574 * p
    out[1] = -0.527 * p
  } else if (x < 3.3) {
    const y = x - 1.82
    out[0] = horner(opticalA, y)
    out[1] = horner(opticalB, y)
  } else if (x < 8) {
    let fa = 0
    let fb = 0
    if (x >= 5.9) {
      const u = x - 5.9
      fa = -0.04473 * u * u - 0.009779 * u * u * u
      fb = 0.213 * u * u + 0.1207 * u * u * u
    }
    out[0] = 1.752 - 0.316 * x - 0.104 / ((x - 4.67) * (x - 4.67) + 0.341) + fa
    out[1] = -3.09 + 1.825 * x + 1.206 / ((x - 4.62) * (x - 4.62) + 0.263) + fb
  } else {
    const v = x - 8
    out[0] = -1.073 - 0.628 * v + 0.137 * v * v - 0.07 * v * v * v
    out[1] = 13.67 + 4.257 * v - 0.42 * v * v + 0.374 * v * v * v
  }
}

const ab: [number, number] = [0, 0]

/**
 * CCM89 extinction curve k(λ) = A(λ)/E(B−V) = R_V·a(x) + b(x), over all four branches (IR, optical,
 * UV, far-UV).
 * Source: Cardelli, Clayton & Mathis 1989, ApJ 345, 245, eq. (1) A(λ)/A(V) = a(x) + b(x)/R_V with
 * eqs. (2)–(5) for a(x), b(x) (see `ccm89ABranches`).
 *
 * @param wavelengthAngstrom  λ in Å (air, shared/science/README.md §0), 1000–33 333 Å
 * @param rv  R_V = A(V)/E(B−V), dimensionless
 * @returns k(λ) in magnitudes of extinction per magnitude of E(B−V)
 * @throws {RangeError} outside 1000–33 333 Å (never extrapolated, shared/science/README.md §1.3)
 * @example ccm89K(6562.8, 3.1) // ≈ 2.535 (Hα; python3-extinction 0.4.6, via shared/science/README.md §1.4)
 */
export function ccm89K(wavelengthAngstrom: number, rv: number): number {
  const x = 1e4 / wavelengthAngstrom // Å → µm⁻¹
  if (!(x >= 0.3 && x <= 10)) {
    throw new RangeError(`ccm89K requires λ between 1000 and 33333.3 Å, got ${wavelengthAngstrom}`)
  }
  ccm89ABranches(x, CCM89_OPTICAL_A, CCM89_OPTICAL_B, ab)
  return rv * ab[0] + ab[1]
}
