import { newtonBisect } from '../stats/root-finding.ts'
import { DENSITY_OK, densityRangeStatus, electronDensityFromDoubletRatio, SANDERS16_SII } from './density.ts'

/**
 * Low-density temperature-sensitive ratio model R(T) = A exp(B/T) / (1 + C n_e/T^½).
 * Source: Osterbrock & Ferland 2006, Astrophysics of Gaseous Nebulae and AGN, 2nd ed., eqs. 5.4, 5.5
 * (coefficients, shared/science/README.md §4).
 */
export interface TemperatureRatioModel {
  /** A, dimensionless */
  coefficient: number
  /** B, K */
  exponentK: number
  /** C, K^½ cm³ */
  densityCoefficient: number
}

/** Osterbrock & Ferland 2006, eq. 5.4: (j4959 + j5007)/j4363 = 7.90 exp(3.29×10⁴/T)/(1 + 4.5×10⁻⁴ n_e/T^½). */
export const OIII_TEMPERATURE_MODEL: TemperatureRatioModel = { coefficient: 7.9, exponentK: 3.29e4, densityCoefficient: 4.5e-4 }
/** Osterbrock & Ferland 2006, eq. 5.5: (j6548 + j6584)/j5755 = 8.23 exp(2.50×10⁴/T)/(1 + 4.4×10⁻³ n_e/T^½). */
export const NII_TEMPERATURE_MODEL: TemperatureRatioModel = { coefficient: 8.23, exponentK: 2.5e4, densityCoefficient: 4.4e-3 }

/** Fixed [O III] 5007/4959 used when 4959 is missing (Storey & Zeippen 2000, MNRAS 312, 813 — from memory, shared/science/README.md §4, §12). */
export const OIII_5007_TO_4959 = 2.98
/** Fixed [N II] 6584/6548 used when 6548 is missing (≈ 3.05, shared/science/README.md §4 — from memory, shared/science/README.md §12). */
export const NII_6584_TO_6548 = 3.05

/**
 * The doublet sum of a temperature ratio from its stronger line alone, with the fixed intensity ratio
 * of the doublet: F_strong (1 + 1/ratio) (flag `te-from-fixed-doublet-ratio:<…>`; shared/science/README.md §4).
 *
 * @param strongFlux   F(5007) or F(6584), any flux unit
 * @param strongToWeak OIII_5007_TO_4959 or NII_6584_TO_6548
 * @returns F(4959 + 5007) or F(6548 + 6584), same unit
 * @example doubletSumFromStrongLine(298, OIII_5007_TO_4959) // ≈ 398
 */
export function doubletSumFromStrongLine(strongFlux: number, strongToWeak: number): number {
  return strongFlux * (1 + 1 / strongToWeak)
}

/** Search range for T_e, K (shared/science/README.md §4, project convention). */
export const TEMPERATURE_MIN_K = 5000
export const TEMPERATURE_MAX_K = 30000
/** n_e assumed when [S II] gives no density (shared/science/README.md §4, project convention), cm⁻³. */
export const ASSUMED_DENSITY_CM3 = 100
/** Convergence of the T_e / n_e iteration, K (shared/science/README.md §4). */
export const TEMPERATURE_ITERATION_TOL_K = 0.1

/**
 * [O III] (4959+5007)/4363 or [N II] (6548+6584)/5755 ratio predicted at T and n_e
 * (Osterbrock & Ferland 2006, eqs. 5.4/5.5).
 *
 * @param model         OIII_TEMPERATURE_MODEL or NII_TEMPERATURE_MODEL
 * @param temperatureK  T_e, K
 * @param neCm3         n_e, cm⁻³
 * @returns the line ratio, dimensionless
 * @example temperatureRatio(OIII_TEMPERATURE_MODEL, 1e4, 100) // ≈ 211.96 (shared/science/README.md §4)
 */
export function temperatureRatio(model: TemperatureRatioModel, temperatureK: number, neCm3: number): number {
  return (model.coefficient * Math.exp(model.exponentK / temperatureK)) /
    (1 + (model.densityCoefficient * neCm3) / Math.sqrt(temperatureK))
}

/**
 * d ln R / dT of the model (for the first-order error σ_T = σ_lnR/|d ln R/dT|):
 * −B/T² + (C n_e T^−3/2 / 2)/(1 + C n_e T^−½).
 *
 * @param model         temperature model
 * @param temperatureK  K
 * @param neCm3         cm⁻³
 * @returns d ln R/dT in K⁻¹ (negative)
 * @example temperatureRatioLogSlope(OIII_TEMPERATURE_MODEL, 1e4, 100) // ≈ -3.29e-4
 */
export function temperatureRatioLogSlope(model: TemperatureRatioModel, temperatureK: number, neCm3: number): number {
  const s = Math.sqrt(temperatureK)
  const q = (model.densityCoefficient * neCm3) / s
  return -model.exponentK / (temperatureK * temperatureK) + (0.5 * q) / temperatureK / (1 + q)
}

/**
 * First-order 1σ error of T_e from the error of ln R: σ_T = σ_lnR / |d ln R/dT| at the solution.
 * Source: shared/science/README.md §4, §9 (first-order propagation through the inverse).
 *
 * @param model         temperature model
 * @param temperatureK  the solution T_e, K
 * @param neCm3         n_e used for it, cm⁻³
 * @param sigmaLnRatio  σ of ln R (= σ_R/R), dimensionless
 * @returns σ_T in K
 * @example temperatureError(OIII_TEMPERATURE_MODEL, 1e4, 0, 0.0329) // ≈ 100.0 (B/T² = 3.29e-4 K⁻¹ at n_e = 0)
 */
export function temperatureError(model: TemperatureRatioModel, temperatureK: number, neCm3: number, sigmaLnRatio: number): number {
  return sigmaLnRatio / Math.abs(temperatureRatioLogSlope(model, temperatureK, neCm3))
}

/**
 * Electron temperature from a temperature-sensitive ratio at fixed n_e, by bracketing root-finding on
 * 5000–30 000 K (the model decreases monotonically with T, so the root is unique). The root is sought
 * in u = 1/T, where ln R is almost linear: Newton steps from the exact zero-density root, with the
 * safeguarded bracketing solver `newtonBisect` on [1/30 000, 1/5000] K⁻¹ as the fallback.
 * Source: inverse of Osterbrock & Ferland 2006, eqs. 5.4/5.5; search range shared/science/README.md §4.
 *
 * @param model   OIII_TEMPERATURE_MODEL or NII_TEMPERATURE_MODEL
 * @param ratio   observed (dereddened) ratio, dimensionless, > 0
 * @param neCm3   n_e, cm⁻³
 * @param guessK  optional first guess of T (K) for the Newton steps (e.g. the previous iteration's T)
 * @returns T_e in K, or null when no root lies in 5000–30 000 K (`te-out-of-range`)
 * @example temperatureFromRatio(OIII_TEMPERATURE_MODEL, 200, 100) // ≈ 10180 (shared/science/README.md §4)
 */
export function temperatureFromRatio(model: TemperatureRatioModel, ratio: number, neCm3: number, guessK = Number.NaN): number | null {
  if (!(ratio > 0)) return null
  const b = model.exponentK
  const cn = model.densityCoefficient * neCm3
  const lnTarget = Math.log(ratio / model.coefficient)
  solverParams[0] = b
  solverParams[1] = cn
  solverParams[2] = lnTarget
  const lo = 1 / TEMPERATURE_MAX_K
  const hi = 1 / TEMPERATURE_MIN_K
  // The residual is strictly increasing in u (B ≫ the density term for any n_e ≤ 10⁶ cm⁻³), so the
  // root is unique: start from the guess or from the exact zero-density root u = ln(R/A)/B and take
  // Newton steps; a root outside the bracket means "out of range". If the steps do not settle
  // quickly, fall back to the safeguarded bracketing solver.
  let u = guessK > 0 ? 1 / guessK : lnTarget / b
  for (let i = 0; i < 6; i++) {
    residualAndSlope(u, solverParams)
    const step = residualScratch[0] / residualScratch[1]
    u -= step
    if (!(u > 0)) break
    if (Math.abs(step) <= 1e-11 * u) return u >= lo && u <= hi ? 1 / u : null
  }
  const root = newtonBisect(lnRatioResidual, lnRatioResidualSlope, lo, hi, 1e-14, 100, solverParams)
  return root === null ? null : 1 / root
}

// ln R(1/u) − ln R_obs + ln A as a function of u = 1/T; params [B, C·n_e, ln(R_obs/A)]
const solverParams = new Float64Array(3)
const residualScratch = new Float64Array(2)
function residualAndSlope(u: number, p: Float64Array): void {
  const s = Math.sqrt(u)
  const q = 1 + p[1] * s
  residualScratch[0] = p[0] * u - Math.log(q) - p[2]
  residualScratch[1] = p[0] - (0.5 * p[1]) / s / q
}
function lnRatioResidual(u: number, p: Float64Array): number {
  residualAndSlope(u, p)
  return residualScratch[0]
}
function lnRatioResidualSlope(u: number, p: Float64Array): number {
  residualAndSlope(u, p)
  return residualScratch[1]
}

/** Result of the T_e / n_e iteration. */
export interface TemperatureSolution {
  /** T_e, K, or null out of range */
  temperatureK: number | null
  /** n_e used in the last step, cm⁻³ */
  neCm3: number
  /** true when n_e = 100 cm⁻³ was assumed (no usable [S II] ratio) */
  densityAssumed: boolean
}

/**
 * T_e iterated with the [S II] density (shared/science/README.md §4, project convention): n_e from the [S II] ratio
 * at T (Sanders et al. 2016 with the (T/10⁴)^½ scaling); solve T at that n_e; repeat until
 * |ΔT| < 0.1 K. The plain iteration starts at 10⁴ K; this starts at the iteration's analytic fixed point
 * (see the comment in the body), which gives the same T_e within the 0.1 K tolerance in one step
 * (tested against the plain iteration). Without a usable [S II] ratio (missing, or at a density
 * limit) n_e = 100 cm⁻³ and a single solve suffices.
 *
 * @param model     OIII_TEMPERATURE_MODEL or NII_TEMPERATURE_MODEL
 * @param ratio     dereddened temperature-sensitive ratio, dimensionless
 * @param siiRatio  observed F(6717)/F(6731), or NaN when not usable
 * @param out       optional object to fill (the kernel reuses one instead of allocating per galaxy)
 * @returns the solution
 * @example temperatureWithDensityIteration(OIII_TEMPERATURE_MODEL, 211.96, NaN).temperatureK // ≈ 10000
 */
export function temperatureWithDensityIteration(
  model: TemperatureRatioModel, ratio: number, siiRatio: number,
  out: TemperatureSolution = { temperatureK: null, neCm3: 0, densityAssumed: false },
): TemperatureSolution {
  const useSii = Number.isFinite(siiRatio) && densityRangeStatus(SANDERS16_SII, siiRatio) === DENSITY_OK
  let t = 1e4
  if (useSii) {
    // With n_e(T) = n_e,fit·(T/10⁴)^½ the density term C n_e/T^½ = C n_e,fit/100 does not depend on T,
    // so the iteration's fixed point is T* = B / ln(R (1 + C n_e,fit/100)/A). Starting there instead of
    // at 10⁴ K changes only the number of steps (the first step already moves T by < 0.1 K), not the
    // result; when T* is outside the search range the iteration starts at 10⁴ K as usual.
    const q = (model.densityCoefficient * electronDensityFromDoubletRatio(SANDERS16_SII, siiRatio, 1e4)) / 100
    const fixedPoint = model.exponentK / Math.log((ratio * (1 + q)) / model.coefficient)
    if (fixedPoint >= TEMPERATURE_MIN_K && fixedPoint <= TEMPERATURE_MAX_K) t = fixedPoint
  }
  let ne = ASSUMED_DENSITY_CM3
  for (let i = 0; i < 50; i++) {
    ne = useSii ? electronDensityFromDoubletRatio(SANDERS16_SII, siiRatio, t) : ASSUMED_DENSITY_CM3
    const next = temperatureFromRatio(model, ratio, ne, t)
    if (next === null) {
      out.temperatureK = null
      out.neCm3 = ne
      out.densityAssumed = !useSii
      return out
    }
    const done = Math.abs(next - t) < TEMPERATURE_ITERATION_TOL_K
    t = next
    if (done || !useSii) break
  }
  out.temperatureK = t
  out.neCm3 = ne
  out.densityAssumed = !useSii
  return out
}
