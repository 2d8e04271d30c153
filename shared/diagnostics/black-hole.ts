/** Greene & Ho 2005, ApJ 630, 122, eq. 6: M = 2.0×10⁶ (L/10⁴² erg s⁻¹)^0.55 (FWHM/10³ km s⁻¹)^2.06 M☉ (eq. no. from memory, shared/science/README.md §12). */
export const GREENE_HO05 = { normalisationSolar: 2.0e6, luminosityExponent: 0.55, fwhmExponent: 2.06 } as const

/**
 * Virial black-hole mass from the broad Hα luminosity and width.
 * Source: Greene & Ho 2005, ApJ 630, 122 (eq. 6, from memory, shared/science/README.md §12); shared/science/README.md §7.
 * Systematic scatter of such masses ≈ 0.3–0.5 dex (common practice) is not included in errors.
 *
 * @param luminosityBroadHalpha  L(Hα broad), erg s⁻¹, > 0
 * @param fwhmKmPerS             FWHM of broad Hα, km s⁻¹, > 0
 * @returns M_BH in solar masses
 * @example blackHoleMassGreeneHo05(1e43, 3000) // ≈ 6.822e7 (shared/science/README.md §7)
 */
export function blackHoleMassGreeneHo05(luminosityBroadHalpha: number, fwhmKmPerS: number): number {
  return GREENE_HO05.normalisationSolar *
    Math.pow(luminosityBroadHalpha / 1e42, GREENE_HO05.luminosityExponent) *
    Math.pow(fwhmKmPerS / 1e3, GREENE_HO05.fwhmExponent)
}

/**
 * First-order error of log10 M_BH from the broad-line flux alone: 0.55 (σ_F/F)/ln 10 dex (the FWHM
 * and the calibration's scatter are not included; shared/science/README.md §7, §9).
 *
 * @param relativeFluxError  σ/F of the broad Hα flux, dimensionless
 * @returns σ of log10 M_BH, dex
 * @example blackHoleLog10MassError(0.1) // ≈ 0.0238862 (shared/science/README.md §7)
 */
export function blackHoleLog10MassError(relativeFluxError: number): number {
  return (GREENE_HO05.luminosityExponent * relativeFluxError) / Math.LN10
}
