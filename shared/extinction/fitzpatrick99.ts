import { evaluateSpline, naturalCubicSpline, type NaturalCubicSpline } from '../stats/spline.ts'

/** Service range of Fitzpatrick 1999: 1150 Å – 6 µm (F99 claims validity down to 1150 Å; project convention). */
export const FITZPATRICK99_RANGE_ANGSTROM = { min: 1150, max: 60000 } as const

/** Fitzpatrick & Massa 1990 UV parameters as fixed by Fitzpatrick 1999, §3 / Table 3 (shared/science/README.md §1.3). */
const F99_X0 = 4.596 // µm⁻¹, bump centre
const F99_GAMMA = 0.99 // µm⁻¹, bump width
const F99_C3 = 3.23
const F99_C4 = 0.41
const F99_C5 = 5.9 // µm⁻¹, start of the far-UV curvature term
/** Far-UV curvature F(x) = 0.5392 (x − 5.9)² + 0.05644 (x − 5.9)³ (Fitzpatrick & Massa 1990, ApJS 72, 163). */
const F99_FUV = [0.5392, 0.05644] as const

/** UV/optical boundary: the FM90 formula is used for λ ≤ 2700 Å. */
const F99_UV_EDGE_X = 1e4 / 2700

/** Spline knots in x = 1/λ (µm⁻¹): 0, IR (26 500, 12 200 Å), optical (6000, 5470, 4670, 4110 Å), UV (2700, 2600 Å). */
const F99_KNOT_X = [0, 1e4 / 26500, 1e4 / 12200, 1e4 / 6000, 1e4 / 5470, 1e4 / 4670, 1e4 / 4110, 1e4 / 2700, 1e4 / 2600]

/**
 * Fitzpatrick & Massa (1990) UV curve as parameterised by Fitzpatrick 1999, in k(λ) = A(λ)/E(B−V):
 *   k = R_V + c₁ + c₂x + c₃ D(x) + c₄ F(x), D = x²/((x² − x₀²)² + x²γ²),
 *   c₂ = −0.824 + 4.717/R_V, c₁ = 2.030 − 3.007 c₂.
 * Source: Fitzpatrick 1999, PASP 111, 63, §3 and Table 3 (x₀ = 4.596, γ = 0.99, c₃ = 3.23, c₄ = 0.41);
 * Fitzpatrick & Massa 1990, ApJS 72, 163, eqs. (2)–(4) (equation numbers from memory, shared/science/README.md §12).
 *
 * @param x   1/λ in µm⁻¹ (meant for x ≥ 1/0.27)
 * @param rv  R_V, dimensionless
 * @returns k in mag/mag
 * @example fitzpatrick99UvK(1e4 / 2175, 3.1) // ≈ 9.535 (python3-extinction 0.4.6, via shared/science/README.md §1.4)
 */
export function fitzpatrick99UvK(x: number, rv: number): number {
  const c2 = -0.824 + 4.717 / rv
  const c1 = 2.03 - 3.007 * c2
  const x2 = x * x
  const y = x2 - F99_X0 * F99_X0
  const d = x2 / (y * y + x2 * F99_GAMMA * F99_GAMMA)
  let k = c1 + c2 * x + F99_C3 * d
  if (x >= F99_C5) {
    const u = x - F99_C5
    k += F99_C4 * (F99_FUV[0] * u * u + F99_FUV[1] * u * u * u)
  }
  return k + rv
}

/**
 * The nine spline anchors k(x_i) of Fitzpatrick 1999 in the form used by python3-extinction 0.4.6 and
 * the Goddard IDL routine FM_UNRED it mirrors: k = 0 at x = 0; IR anchors 0.26469·R_V/3.1 and
 * 0.82925·R_V/3.1; optical anchors as polynomials in R_V (the *updated* values from E. Fitzpatrick,
 * not F99 Table 4 — python3-extinction documentation, via shared/science/README.md §1.3); the two UV anchors from
 * `fitzpatrick99UvK` at 2700 and 2600 Å.
 * Source: Fitzpatrick 1999, PASP 111, 63, §4 (spline construction); anchor values as in the library
 * (coefficients from memory, confirmed against python3-extinction 0.4.6 to 1e-14 by the fixture test).
 *
 * @param rv  R_V, dimensionless
 * @returns the anchor ordinates k(x_i), mag/mag, in knot order
 * @example fitzpatrick99Anchors(3.1)[0] // 0
 */
export function fitzpatrick99Anchors(rv: number): number[] {
  const rv2 = rv * rv
  return [
    0,
    (0.26469 * rv) / 3.1,
    (0.82925 * rv) / 3.1,
    -0.422809 + 1.0027 * rv + 2.13572e-4 * rv2,
    -5.1354e-2 + 1.00216 * rv - 7.35778e-5 * rv2,
    0.700127 + 1.00184 * rv - 3.32598e-5 * rv2,
    1.19456 + 1.01707 * rv - 5.46959e-3 * rv2 + 7.97809e-4 * rv2 * rv - 4.45636e-5 * rv2 * rv2,
    fitzpatrick99UvK(F99_KNOT_X[7], rv),
    fitzpatrick99UvK(F99_KNOT_X[8], rv),
  ]
}

// Splines depend only on R_V; a handful of R_V values are used per process.
const splineCache = new Map<number, NaturalCubicSpline>()

function splineFor(rv: number): NaturalCubicSpline {
  let s = splineCache.get(rv)
  if (!s) {
    if (splineCache.size > 64) splineCache.clear()
    s = naturalCubicSpline(F99_KNOT_X, fitzpatrick99Anchors(rv))
    splineCache.set(rv, s)
  }
  return s
}

/**
 * Fitzpatrick 1999 extinction curve k(λ) = A(λ)/E(B−V): the FM90 UV formula for λ ≤ 2700 Å and a
 * natural cubic spline through the R_V-dependent optical/IR anchors (`fitzpatrick99Anchors`) for
 * longer wavelengths, reproducing python3-extinction 0.4.6 `fitzpatrick99`.
 * Source: Fitzpatrick 1999, PASP 111, 63, §§3–4; Fitzpatrick & Massa 1990, ApJS 72, 163.
 *
 * @param wavelengthAngstrom  λ in Å (air), 1150–60 000 Å
 * @param rv  R_V, dimensionless
 * @returns k(λ) in mag/mag
 * @throws {RangeError} outside 1150–60 000 Å
 * @example fitzpatrick99K(6562.8, 3.1) // ≈ 2.358 (Hα; python3-extinction 0.4.6, via shared/science/README.md §1.4)
 */
export function fitzpatrick99K(wavelengthAngstrom: number, rv: number): number {
  if (!(wavelengthAngstrom >= FITZPATRICK99_RANGE_ANGSTROM.min && wavelengthAngstrom <= FITZPATRICK99_RANGE_ANGSTROM.max)) {
    throw new RangeError(`fitzpatrick99K requires λ between 1150 and 60000 Å, got ${wavelengthAngstrom}`)
  }
  const x = 1e4 / wavelengthAngstrom
  return x >= F99_UV_EDGE_X ? fitzpatrick99UvK(x, rv) : evaluateSpline(splineFor(rv), x)
}
