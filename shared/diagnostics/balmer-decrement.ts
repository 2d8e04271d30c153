import type { Flagged } from '../flags.ts'
import { relativeErrorOfRatio } from '../stats/error-propagation.ts'

// ln 10 as a module-local constant: an imported binding costs an initialisation check per read in hot code
const LN10 = Math.LN10

/**
 * Intrinsic Hα/Hβ for Case B recombination at T_e = 10⁴ K, n_e = 10² cm⁻³.
 * Source: Osterbrock & Ferland 2006, Astrophysics of Gaseous Nebulae and AGN, 2nd ed., Table 4.4
 * (also Storey & Hummer 1995, MNRAS 272, 41), via shared/science/README.md §1.1. Dimensionless.
 */
export const INTRINSIC_HALPHA_HBETA_CASE_B = 2.86

/**
 * Customary intrinsic Hα/Hβ of AGN narrow-line regions ("Case B′"): 3.1. A documented choice for
 * `intrinsicBalmer`, never switched on automatically.
 * Source: Halpern & Steiner 1983, ApJL 269, L37; Gaskell & Ferland 1984, PASP 96, 393, via
 * shared/science/README.md §1.1. Dimensionless.
 */
export const INTRINSIC_HALPHA_HBETA_AGN = 3.1

/**
 * Intrinsic Hγ/Hβ for Case B at 10⁴ K, 10² cm⁻³: 0.468 (used by the Hγ fallback).
 * Source: Osterbrock & Ferland 2006, Table 4.4, via shared/science/README.md §1.1. Dimensionless.
 */
export const INTRINSIC_HGAMMA_HBETA_CASE_B = 0.468

/**
 * The factor 2.5/(k_blue − k_red) that turns log10 of (observed/intrinsic) decrement into E(B−V).
 * Source: foreground-screen dust, A_λ = k(λ)E(B−V) (shared/science/README.md §1.2, common practice).
 *
 * @param kBlue  k at the bluer line (Hβ for Hα/Hβ; Hγ for Hγ/Hβ), mag/mag
 * @param kRed   k at the redder line (Hα; Hβ), mag/mag
 * @returns the coefficient in mag per dex
 * @example balmerCoefficient(3.609, 2.535) // ≈ 2.328 (CCM89, R_V = 3.1; shared/science/README.md §1.2)
 */
export function balmerCoefficient(kBlue: number, kRed: number): number {
  return 2.5 / (kBlue - kRed)
}

/**
 * Unclipped colour excess from the Hα/Hβ decrement, for one foreground screen of dust:
 *   E(B−V) = 2.5/(k(Hβ) − k(Hα)) · log10(D_obs/D_int)   (negative when D_obs < D_int).
 * Source: shared/science/README.md §1.2 (standard foreground screen; common practice, e.g. Osterbrock &
 * Ferland 2006, dust chapter).
 *
 * @param decrement  observed F(Hα)/F(Hβ), dimensionless, > 0
 * @param intrinsic  intrinsic F(Hα)/F(Hβ), dimensionless, > 0 (2.86 Case B; 3.1 AGN)
 * @param kHbeta     k(Hβ), mag/mag
 * @param kHalpha    k(Hα), mag/mag
 * @returns E(B−V) in mag (may be negative)
 * @example colourExcessFromBalmerRaw(4, 2.86, 3.609, 2.535) // ≈ 0.339 (shared/science/README.md §1.2 check: 0.3392)
 */
export function colourExcessFromBalmerRaw(decrement: number, intrinsic: number, kHbeta: number, kHalpha: number): number {
  return balmerCoefficient(kHbeta, kHalpha) * Math.log10(decrement / intrinsic)
}

/**
 * Colour excess from the Hα/Hβ decrement, clipped at 0: below the intrinsic ratio the result is 0
 * with the flag `balmer-below-intrinsic` (public API, openapi/openapi.json; shared/science/README.md §1.2, common practice).
 *
 * @param decrement  observed F(Hα)/F(Hβ), dimensionless, > 0
 * @param intrinsic  intrinsic F(Hα)/F(Hβ), dimensionless, > 0
 * @param kHbeta     k(Hβ), mag/mag
 * @param kHalpha    k(Hα), mag/mag
 * @returns E(B−V) in mag, ≥ 0, with flags
 * @example colourExcessFromBalmer(2.5, 2.86, 3.609, 2.535) // { value: 0, flags: ['balmer-below-intrinsic'] }
 */
export function colourExcessFromBalmer(decrement: number, intrinsic: number, kHbeta: number, kHalpha: number): Flagged<number> {
  const ebv = colourExcessFromBalmerRaw(decrement, intrinsic, kHbeta, kHalpha)
  return ebv >= 0 ? { value: ebv, flags: [] } : { value: 0, flags: ['balmer-below-intrinsic'] }
}

/**
 * Unclipped colour excess from Hγ/Hβ, the fallback when Hα is missing:
 *   E(B−V) = 2.5/(k(Hγ) − k(Hβ)) · log10[(Hγ/Hβ)_int / (Hγ/Hβ)_obs].
 * Source: shared/science/README.md §1.2 (project convention; same physics as the Hα/Hβ form).
 *
 * @param ratio      observed F(Hγ)/F(Hβ), dimensionless, > 0
 * @param intrinsic  intrinsic F(Hγ)/F(Hβ), dimensionless (0.468 Case B)
 * @param kHgamma    k(Hγ), mag/mag
 * @param kHbeta     k(Hβ), mag/mag
 * @returns E(B−V) in mag (may be negative)
 * @example colourExcessFromHgammaRaw(0.468, 0.468, 4.174, 3.609) // 0
 */
export function colourExcessFromHgammaRaw(ratio: number, intrinsic: number, kHgamma: number, kHbeta: number): number {
  return balmerCoefficient(kHgamma, kHbeta) * Math.log10(intrinsic / ratio)
}

/**
 * First-order 1σ error of a colour excess from a Balmer ratio (either form above, unclipped):
 *   σ_E = 2.5/(k_blue − k_red)/ln 10 · √((σ₁/F₁)² + (σ₂/F₂)²).
 * Source: shared/science/README.md §9 (first-order propagation; Bevington & Robinson 2003, ch. 3).
 *
 * @param kBlue          k at the bluer line (Hβ for Hα/Hβ; Hγ for Hγ/Hβ), mag/mag
 * @param kRed           k at the redder line (Hα; Hβ), mag/mag
 * @param relativeBlue   σ/F of the bluer line, dimensionless
 * @param relativeRed    σ/F of the redder line, dimensionless
 * @returns σ of E(B−V) in mag
 * @example colourExcessError(3.609, 2.535, 0.02, 0.01) // ≈ 0.022605 (CCM89 R_V = 3.1 k values, shared/science/README.md §1.4, §9)
 */
export function colourExcessError(kBlue: number, kRed: number, relativeBlue: number, relativeRed: number): number {
  return (balmerCoefficient(kBlue, kRed) / LN10) * relativeErrorOfRatio(relativeRed, relativeBlue)
}

/**
 * Factor by which dereddening multiplies a flux: F_corr/F_obs = 10^(0.4·k(λ)·E(B−V)), evaluated as
 * exp(0.4·ln 10·k·E) (Math.exp is several times faster than Math.pow in V8; the kernel calls this 16
 * times per galaxy).
 * Source: shared/science/README.md §1.2 (foreground screen; common practice).
 *
 * @param k    k(λ), mag/mag
 * @param ebv  E(B−V), mag
 * @returns the factor, dimensionless, ≥ 1 for ebv ≥ 0
 * @example dereddeningFactor(2.535, 0) // 1
 */
export function dereddeningFactor(k: number, ebv: number): number {
  return Math.exp(0.4 * LN10 * k * ebv)
}
