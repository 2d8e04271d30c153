/**
 * Electron density from the [S II] 6717/6731 and [O II] 3729/3726 doublets.
 * Source: Sanders et al. 2016, ApJ 816, 23, fit R(n_e) = a(b + n_e)/(c + n_e) at T = 10⁴ K
 * (coefficients, table number from memory, shared/science/README.md §12; shared/science/README.md §3).
 */

/** Coefficients of R(n_e) = a(b + n_e)/(c + n_e); a dimensionless, b and c in cm⁻³. */
export interface DoubletFit {
  a: number
  b: number
  c: number
}

/** Sanders et al. 2016, ApJ 816, 23: [S II] R = F(6717)/F(6731) at 10⁴ K (shared/science/README.md §3). */
export const SANDERS16_SII: DoubletFit = { a: 0.4315, b: 2107, c: 627.1 }
/** Sanders et al. 2016: [O II] R = F(3729)/F(3726) at 10⁴ K (shared/science/README.md §3). */
export const SANDERS16_OII: DoubletFit = { a: 0.3771, b: 2468, c: 638.4 }

/** Densities (cm⁻³, at 10⁴ K) bounding the fits' usable range: R(1) and R(10⁵) (shared/science/README.md §3). */
export const DENSITY_FIT_MIN_CM3 = 1
export const DENSITY_FIT_MAX_CM3 = 1e5

export const DENSITY_OK = 0
export const DENSITY_LOW_LIMIT = 1
export const DENSITY_HIGH_LIMIT = 2

/**
 * Doublet ratio at a given density and temperature: R = a(b + n′)/(c + n′), n′ = n_e(10⁴ K/T)^½,
 * because the ratio depends on n_e/√T (collisional de-excitation ∝ n_e T^−½; Osterbrock & Ferland
 * 2006 §5.6 — from memory, shared/science/README.md §12). Source: Sanders et al. 2016, ApJ 816, 23; shared/science/README.md §3.
 *
 * @param fit           SANDERS16_SII or SANDERS16_OII
 * @param neCm3         electron density, cm⁻³, ≥ 0
 * @param temperatureK  electron temperature, K, > 0
 * @returns the line ratio, dimensionless
 * @example doubletRatioFromDensity(SANDERS16_SII, 496.17, 1e4) // ≈ 1.000
 */
export function doubletRatioFromDensity(fit: DoubletFit, neCm3: number, temperatureK: number): number {
  const n = neCm3 * Math.sqrt(1e4 / temperatureK)
  return (fit.a * (fit.b + n)) / (fit.c + n)
}

/**
 * Whether a doublet ratio lies inside the fit's usable range, R(10⁵) < R < R(1) (n_e at 10⁴ K):
 * R ≥ R(1) → low-density limit, R ≤ R(10⁵) → high-density limit (shared/science/README.md §3, project convention).
 *
 * @param fit    SANDERS16_SII or SANDERS16_OII
 * @param ratio  observed doublet ratio, dimensionless
 * @returns DENSITY_OK, DENSITY_LOW_LIMIT or DENSITY_HIGH_LIMIT
 * @example densityRangeStatus(SANDERS16_SII, 1.45) // DENSITY_LOW_LIMIT (R(1) = 1.4482)
 */
export function densityRangeStatus(fit: DoubletFit, ratio: number): number {
  if (ratio >= doubletRatioFromDensity(fit, DENSITY_FIT_MIN_CM3, 1e4)) return DENSITY_LOW_LIMIT
  if (ratio <= doubletRatioFromDensity(fit, DENSITY_FIT_MAX_CM3, 1e4)) return DENSITY_HIGH_LIMIT
  return DENSITY_OK
}

/**
 * Electron density from a doublet ratio: n_e = (cR − ab)/(a − R) · (T/10⁴ K)^½.
 * Source: inverse of the Sanders et al. 2016 (ApJ 816, 23) fit; temperature scaling shared/science/README.md §3.
 * Meant for R inside the usable range (check `densityRangeStatus` first); outside it the inverse is
 * meaningless (negative or singular) and callers report null with a limit flag.
 *
 * @param fit           SANDERS16_SII or SANDERS16_OII
 * @param ratio         doublet ratio, dimensionless
 * @param temperatureK  electron temperature, K, > 0
 * @returns n_e in cm⁻³
 * @example electronDensityFromDoubletRatio(SANDERS16_SII, 1.0, 1e4) // ≈ 496.2 (shared/science/README.md §3)
 */
export function electronDensityFromDoubletRatio(fit: DoubletFit, ratio: number, temperatureK: number): number {
  return ((fit.c * ratio - fit.a * fit.b) / (fit.a - ratio)) * Math.sqrt(temperatureK / 1e4)
}

/**
 * |dn_e/dR| for the first-order error σ_n = |dn_e/dR| σ_R, with dn_e/dR = a(c − b)/(a − R)² · (T/10⁴)^½.
 * Source: derivative of the Sanders et al. 2016 inverse (shared/science/README.md §3).
 *
 * @param fit           SANDERS16_SII or SANDERS16_OII
 * @param ratio         doublet ratio, dimensionless
 * @param temperatureK  K
 * @returns |dn_e/dR| in cm⁻³ per unit ratio
 * @example densityRatioDerivative(SANDERS16_SII, 1.0, 1e4) // ≈ 1975.8
 */
export function densityRatioDerivative(fit: DoubletFit, ratio: number, temperatureK: number): number {
  const d = fit.a - ratio
  return Math.abs((fit.a * (fit.c - fit.b)) / (d * d)) * Math.sqrt(temperatureK / 1e4)
}

/**
 * Electron density from the [S II] 6717/6731 ratio (Sanders et al. 2016), or null at a density limit.
 *
 * @param ratio         F(6717)/F(6731), dimensionless
 * @param temperatureK  K (default 10⁴)
 * @returns n_e in cm⁻³, or null when R is at or beyond the low/high-density limit
 * @example electronDensityFromSiiRatio(1.2) // ≈ 203.8 (shared/science/README.md §3)
 */
export function electronDensityFromSiiRatio(ratio: number, temperatureK = 1e4): number | null {
  return densityRangeStatus(SANDERS16_SII, ratio) === DENSITY_OK
    ? electronDensityFromDoubletRatio(SANDERS16_SII, ratio, temperatureK)
    : null
}

/**
 * Electron density from the [O II] 3729/3726 ratio (Sanders et al. 2016), or null at a density limit.
 *
 * @param ratio         F(3729)/F(3726), dimensionless
 * @param temperatureK  K (default 10⁴)
 * @returns n_e in cm⁻³, or null when at or beyond a limit
 * @example electronDensityFromOiiRatio(1.2) // ≈ 200.0 (shared/science/README.md §3)
 */
export function electronDensityFromOiiRatio(ratio: number, temperatureK = 1e4): number | null {
  return densityRangeStatus(SANDERS16_OII, ratio) === DENSITY_OK
    ? electronDensityFromDoubletRatio(SANDERS16_OII, ratio, temperatureK)
    : null
}
