/**
 * Instrumental broadening from a spectrum's `resolution` (a Gaussian line-spread function):
 * σ_inst = FWHM_inst / 2√(2 ln 2), with FWHM_inst in Å given directly, as λ·v/c for a FWHM in km/s,
 * or as λ/R for a resolving power R (shared/science/README.md §13.8; common practice).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { FWHM_PER_SIGMA } from './profiles.ts'
import type { Resolution } from './types.ts'

/**
 * Instrumental σ in observed Å at an observed wavelength; 0 without a resolution.
 *
 * @param resolution  one of fwhmAngstrom, fwhmKmPerS, resolvingPower (or undefined)
 * @param observedAngstrom  λ (Å)
 * @example instrumentalSigmaAngstrom({ resolvingPower: 2000 }, 6562.8) // ≈ 1.39348 (6562.8/2000/2.354820)
 */
export function instrumentalSigmaAngstrom(resolution: Resolution | undefined, observedAngstrom: number): number {
  if (!resolution) return 0
  if (resolution.fwhmAngstrom !== undefined) return resolution.fwhmAngstrom / FWHM_PER_SIGMA
  if (resolution.fwhmKmPerS !== undefined) return (observedAngstrom * resolution.fwhmKmPerS) / SPEED_OF_LIGHT_KM_PER_S / FWHM_PER_SIGMA
  if (resolution.resolvingPower !== undefined) return observedAngstrom / resolution.resolvingPower / FWHM_PER_SIGMA
  return 0
}

/** True when the resolution gives an instrumental width. */
export function hasResolution(resolution: Resolution | undefined): boolean {
  return !!resolution && (resolution.fwhmAngstrom !== undefined || resolution.fwhmKmPerS !== undefined || resolution.resolvingPower !== undefined)
}
