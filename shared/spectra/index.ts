/**
 * Measuring lines in 1-D spectra (shared/science/README.md §13, §14): the public face of
 * shared/spectra/. `fitSpectrum` is the entry point.
 */
export { BALMER_LINES, BIC_THRESHOLD, DEFAULT_FIT_OPTIONS, fitSpectrum, NAD_NOTE, prefersRicher, resolveFitOptions, SPECTRUM_FIT_METHOD_VERSION } from './fit.ts'
export type { FitOutcome } from './fit.ts'
export type * from './types.ts'
export { erf, erfc, erfcx, faddeeva, voigtK, WEIDEMAN_TERMS } from './faddeeva.ts'
export {
  FWHM_PER_SIGMA, gaussianFwhm, gaussianMass, gaussianPixels, gaussianProfile, lorentzianFwhm, lorentzianPixels, lorentzianProfile, pixelBounds,
  voigtFwhm, voigtPixels, voigtProfile,
} from './profiles.ts'
export { AIR_VACUUM_MIN_ANGSTROM, airToVacuum, refractiveIndexAir, vacuumToAir } from './air-vacuum.ts'
export {
  BROAD_COVERAGE_KM_PER_S, COVERAGE_KM_PER_S, FIT_LINE_AIR_ANGSTROM, HEI_5876_AIR_ANGSTROM, LINE_COMPLEXES, NAD, TIED_LINES, WINDOW_KM_PER_S,
  type FitLineId, type LineComplex,
} from './lines.ts'
export { isCovered, sidebandContinuum } from './windows.ts'
export { chiSquare, levenbergMarquardt, type LeastSquaresProblem, type LeastSquaresResult } from './levenberg-marquardt.ts'
export { createSpectrumModel, KINEMATIC_BOUNDS, windowPixels, withoutAbsorption, type ModelConfig, type ProfileKind, type SpectrumModel } from './model.ts'
export { prepareSpectrum, setupFit } from './prepare.ts'
export { instrumentalSigmaAngstrom } from './resolution.ts'
export {
  centralOpticalDepth, curveOfGrowthIntegral, doubletRatioAt, equivalentWidth, LINEAR_COG_CONSTANT, linearColumnDensity, linearDoubletRatio,
  solveDoublet, TAU0_CONSTANT, type Doublet, type DoubletSolution,
} from './curve-of-growth.ts'
export { broadLineExample, sodiumExample, syntheticSpectrum, twoComponentExample, type SyntheticLine, type SyntheticOptions, type SyntheticSpectrum } from './synthetic.ts'
