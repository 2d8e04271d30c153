/**
 * Public barrel of the science library, grouped by topic. The server and the browser Calculator
 * import from here only.
 */

// entry points, types, settings
export { diagnoseColumns, diagnoseGalaxy, diagnoseMany } from './diagnostics/pipeline.ts'
export { DEFAULT_SETTINGS, MAX_MONTE_CARLO_DRAWS, METHOD_VERSION, ScienceSettingsError, validateSettings } from './diagnostics/settings.ts'
export type * from './diagnostics/types.ts'
export { ScienceInputError, type Flagged } from './flags.ts'
export { assertAllFinite, findNonFinite } from './stats/finite.ts'

// names: lines, ratios, laws, classes, calibrations, flags (shared/vocabulary/)
export {
  AIR_WAVELENGTH_ANGSTROM, CLASS_KEYS, className, DIAGRAM_CLASSES, defaultRvFor, EXTINCTION_LAWS, isLineId, LINE_IDS, LINES,
  METALLICITY_KEYS, RATIO_KEYS, ROW_FLAGS, type LineInfo,
} from './vocabulary/index.ts'

// dust
export { calzetti00K, ccm89K, EXTINCTION_RANGE_ANGSTROM, extinctionK, fitzpatrick99K, odonnell94K } from './extinction/index.ts'
export {
  balmerCoefficient, colourExcessFromBalmer, colourExcessFromBalmerRaw, colourExcessFromHgammaRaw, dereddeningFactor,
  INTRINSIC_HALPHA_HBETA_AGN, INTRINSIC_HALPHA_HBETA_CASE_B, INTRINSIC_HGAMMA_HBETA_CASE_B,
} from './diagnostics/balmer-decrement.ts'
export { ExtinctionRangeError } from './diagnostics/kernel.ts'

// diagrams
export {
  kauffmann2003Line, kewley2001NiiLine, kewley2001OiLine, kewley2001SiiLine, signedDistanceToHyperbola, signedDistanceToLine,
  KA03, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, S07_NII,
} from './diagnostics/demarcation.ts'
export { demarcationCurves, oiiRatioCurve, reddeningVector, siiRatioCurve, whanLines } from './diagnostics/plotting.ts'
export type { DemarcationCurve, ReddeningVectors, WhanLine } from './diagnostics/plotting.ts'

// physical conditions
export { electronDensityFromOiiRatio, electronDensityFromSiiRatio, SANDERS16_OII, SANDERS16_SII } from './diagnostics/density.ts'
export { NII_TEMPERATURE_MODEL, OIII_TEMPERATURE_MODEL, temperatureFromRatio, temperatureRatio } from './diagnostics/temperature.ts'
export { METALLICITY_CALIBRATIONS } from './diagnostics/metallicity.ts'
export { lineLuminosity, luminosityDistanceMpc, sfrKennicutt98, sfrKennicuttEvans12 } from './diagnostics/luminosity.ts'
export { blackHoleMassGreeneHo05 } from './diagnostics/black-hole.ts'

// columnar kernel (batch and benchmark)
export { createKernelInput, createKernelOutput, prepareSettings } from './diagnostics/kernel.ts'
export { FLOAT, FLOAT_COLUMNS, INT, INT_COLUMNS } from './diagnostics/kernel-layout.ts'
export type { KernelInput, KernelOutput, PreparedSettings } from './diagnostics/kernel.ts'
