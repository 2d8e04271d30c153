/**
 * First-order (linear) propagation of independent Gaussian flux errors (shared/science/README.md §9).
 * Source: first-order Taylor expansion of the output in the inputs, e.g. Bevington & Robinson 2003,
 * Data Reduction and Error Analysis, 3rd ed., eq. 3.14 (equation number from memory, shared/science/README.md §12).
 */

export const LN10 = Math.LN10

/**
 * Relative error of a ratio or product of two independent quantities: √((σ₁/F₁)² + (σ₂/F₂)²).
 *
 * @param relative1  σ₁/F₁, dimensionless
 * @param relative2  σ₂/F₂, dimensionless
 * @returns σ_R/R, dimensionless
 * @example relativeErrorOfRatio(0.03, 0.04) // 0.05
 */
export function relativeErrorOfRatio(relative1: number, relative2: number): number {
  return Math.sqrt(relative1 * relative1 + relative2 * relative2)
}

/**
 * Error in dex of log10 of a quantity with relative error σ/F: σ_log = (σ/F)/ln 10.
 *
 * @param relativeError  σ/F, dimensionless
 * @returns σ of log10, dex
 * @example log10Error(0.1) // ≈ 0.04343
 */
export function log10Error(relativeError: number): number {
  return relativeError / LN10
}

/**
 * Error of a sum of two independent fluxes: √(σ₁² + σ₂²) (e.g. [S II] 6717 + 6731).
 *
 * @param error1  σ₁ (flux unit)
 * @param error2  σ₂ (flux unit)
 * @returns σ of the sum (flux unit)
 * @example errorOfSum(3, 4) // 5
 */
export function errorOfSum(error1: number, error2: number): number {
  return Math.sqrt(error1 * error1 + error2 * error2)
}

/**
 * Relative error of the sum of two independent fluxes, √((F₁ σ₁/F₁)² + (F₂ σ₂/F₂)²)/(F₁ + F₂), from
 * each flux and its relative error (e.g. [S II] 6717 + 6731, [O III] 4959 + 5007).
 *
 * @param flux1      F₁ (flux unit)
 * @param relative1  σ₁/F₁, dimensionless
 * @param flux2      F₂ (same unit)
 * @param relative2  σ₂/F₂, dimensionless
 * @returns σ_sum/F_sum, dimensionless
 * @example relativeErrorOfSum(3, 0.1, 1, 0.2) // ≈ 0.0901388
 */
export function relativeErrorOfSum(flux1: number, relative1: number, flux2: number, relative2: number): number {
  const a = flux1 * relative1
  const b = flux2 * relative2
  return Math.sqrt(a * a + b * b) / (flux1 + flux2)
}

/**
 * k(λ) of a summed pseudo-line: the flux-weighted mean (F₁k₁ + F₂k₂)/(F₁ + F₂), the first-order
 * dependence of ln(F₁ + F₂) on E(B−V) (for `linearisedLogVariance`; derivation, common practice).
 *
 * @param flux1  F₁ (flux unit)
 * @param k1     k(λ₁), mag/mag
 * @param flux2  F₂ (same unit)
 * @param k2     k(λ₂), mag/mag
 * @returns k of the sum, mag/mag
 * @example fluxWeightedK(3, 2.6, 1, 2.5) // ≈ 2.575
 */
export function fluxWeightedK(flux1: number, k1: number, flux2: number, k2: number): number {
  return (flux1 * k1 + flux2 * k2) / (flux1 + flux2)
}

/** Role of a term in a dust-corrected combination: an ordinary line, or one of the two Balmer lines that set E(B−V). */
export const ROLE_OTHER = 0
export const ROLE_DUST_NUMERATOR = 1
export const ROLE_DUST_DENOMINATOR = 2

/**
 * Variance of Q = Σᵢ aᵢ ln F_corr,i, a linear combination of natural logs of dereddened fluxes, with
 * independent Gaussian errors of the observed fluxes, including the covariance through E(B−V).
 *
 * With E(B−V) = (C/ln 10)·(ln F_D1 − ln F_D2) + const (C = 2.5/(k_D2 − k_D1); D1, D2 = Hα, Hβ, or
 * Hβ, Hγ for the fallback) and ln F_corr,i = ln F_i + 0.4 ln10 · k_i · E(B−V), the partial derivative
 * of Q is aᵢ with respect to ln F_i and ±η = ±Σᵢ aᵢ · 0.4 · kᵢ · C with respect to ln F_D1 / ln F_D2
 * (merged with aᵢ when term i is itself D1 or D2). Var(Q) = Σ (∂Q/∂ln F)² (σ/F)².
 * Source: shared/science/README.md §9 ("linearise the whole chain"; the Hα/Hβ covariance formula there is the
 * one-term case); derivation, common practice.
 *
 * @param n            number of terms used (≤ the array lengths)
 * @param coefficient  aᵢ, dimensionless
 * @param relative     σᵢ/Fᵢ of each term's own measurement (for a summed pseudo-line, σ_sum/F_sum)
 * @param role         ROLE_OTHER, ROLE_DUST_NUMERATOR or ROLE_DUST_DENOMINATOR for each term
 * @param k            k(λ) of each term (mag/mag; a summed pseudo-line uses its flux-weighted k)
 * @param dustC        C = 2.5/(k_D2 − k_D1), or 0 when no extinction correction depends on the fluxes
 * @param relativeD1   σ/F of the dust numerator line (ignored when dustC = 0)
 * @param relativeD2   σ/F of the dust denominator line (ignored when dustC = 0)
 * @returns Var(Q) in (natural-log units)²
 * @example linearisedLogVariance(1, [1], [0.05], [ROLE_OTHER], [3.47], 0, 0, 0) // ≈ 0.05 ** 2 (= 0.0025)
 */
export function linearisedLogVariance(
  n: number,
  coefficient: ArrayLike<number>,
  relative: ArrayLike<number>,
  role: ArrayLike<number>,
  k: ArrayLike<number>,
  dustC: number,
  relativeD1: number,
  relativeD2: number,
): number {
  let eta = 0
  let cD1 = 0
  let cD2 = 0
  let variance = 0
  for (let i = 0; i < n; i++) {
    const a = coefficient[i]
    eta += a * 0.4 * k[i] * dustC
    const r = role[i]
    if (dustC !== 0 && r === ROLE_DUST_NUMERATOR) cD1 += a
    else if (dustC !== 0 && r === ROLE_DUST_DENOMINATOR) cD2 += a
    else variance += a * a * relative[i] * relative[i]
  }
  if (dustC !== 0) {
    cD1 += eta
    cD2 -= eta
    variance += cD1 * cD1 * relativeD1 * relativeD1 + cD2 * cD2 * relativeD2 * relativeD2
  }
  return variance
}

/**
 * `linearisedLogVariance` for a single term with coefficient 1 (the dereddened flux of one line),
 * written out: Var(ln F_corr) = (1 + η·[D1] …)²… with η = 0.4·k·C; identical to the general function
 * with n = 1 (tested), but without the loop, for the kernel's 16 lines per galaxy.
 *
 * @param relative    σ/F of the line
 * @param role        ROLE_OTHER, ROLE_DUST_NUMERATOR or ROLE_DUST_DENOMINATOR
 * @param k           k(λ) of the line, mag/mag
 * @param dustC       C = 2.5/(k_D2 − k_D1), or 0
 * @param relativeD1  σ/F of the dust numerator line
 * @param relativeD2  σ/F of the dust denominator line
 * @returns Var(ln F_corr)
 * @example linearisedLogVarianceOfLine(0.05, ROLE_OTHER, 3.47, 0, 0, 0) // ≈ 0.05 ** 2 (= 0.0025)
 */
export function linearisedLogVarianceOfLine(
  relative: number, role: number, k: number, dustC: number, relativeD1: number, relativeD2: number,
): number {
  if (dustC === 0) return relative * relative
  const eta = 0.4 * k * dustC
  const c1 = role === ROLE_DUST_NUMERATOR ? 1 + eta : eta
  const c2 = role === ROLE_DUST_DENOMINATOR ? 1 - eta : -eta
  const own = role === ROLE_OTHER ? relative * relative : 0
  return own + c1 * c1 * relativeD1 * relativeD1 + c2 * c2 * relativeD2 * relativeD2
}
