import { SFR_CALIBRATIONS } from '../vocabulary/calibrations.ts'
import { defaultRvFor, EXTINCTION_LAWS } from '../vocabulary/extinction-laws.ts'
import { INTRINSIC_HALPHA_HBETA_CASE_B } from './balmer-decrement.ts'
import type { DiagnosticSettings } from './types.ts'

/**
 * Version of the method (formulas, coefficients, conventions). Bump it whenever any formula or
 * convention changes, so stored results say which method produced them.
 */
export const METHOD_VERSION = '2026.12.0'

/**
 * Default assumptions (public API `settings`, openapi/openapi.json; shared/science/README.md §10): CCM89 with R_V = 3.1 (Cardelli et al. 1989),
 * Case B Hα/Hβ = 2.86 (Osterbrock & Ferland 2006, Table 4.4), T_e = 10⁴ K, S/N ≥ 3, negative fluxes
 * refused, Kennicutt 1998 SFR, H₀ = 70 km s⁻¹ Mpc⁻¹, Ω_m = 0.3, no Monte Carlo, seed 1.
 */
export const DEFAULT_SETTINGS: DiagnosticSettings = Object.freeze({
  extinctionLaw: 'ccm89',
  rv: defaultRvFor('ccm89'),
  intrinsicBalmer: INTRINSIC_HALPHA_HBETA_CASE_B,
  electronTemperature: 10000,
  minSnr: 3,
  allowNegative: false,
  sfrCalibration: 'kennicutt98',
  cosmology: Object.freeze({ h0: 70, omegaM: 0.3 }),
  monteCarlo: Object.freeze({ draws: 0, seed: 1 }),
}) as DiagnosticSettings

/** Largest Monte Carlo draw count accepted per galaxy. */
export const MAX_MONTE_CARLO_DRAWS = 100000

/**
 * An impossible setting. A RangeError (the server maps RangeErrors to a 422 on `/settings`) that also
 * carries the JSON Pointer of the field, e.g. `/settings/rv`.
 */
export class ScienceSettingsError extends RangeError {
  readonly path: string
  constructor(path: string, message: string) {
    super(message)
    this.name = 'ScienceSettingsError'
    this.path = path
  }
}

function positive(path: string, v: unknown): void {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
    throw new ScienceSettingsError(path, `${path} must be a finite number greater than 0, got ${String(v)}`)
  }
}

/**
 * Check a complete settings object; throws `ScienceSettingsError` naming the first bad field.
 * @param settings  the assumptions
 */
export function validateSettings(settings: DiagnosticSettings): void {
  if (!settings || typeof settings !== 'object') throw new ScienceSettingsError('/settings', 'settings must be an object')
  if (!EXTINCTION_LAWS.includes(settings.extinctionLaw)) {
    throw new ScienceSettingsError('/settings/extinctionLaw', `extinctionLaw must be one of ${EXTINCTION_LAWS.join(', ')}, got ${String(settings.extinctionLaw)}`)
  }
  positive('/settings/rv', settings.rv)
  positive('/settings/intrinsicBalmer', settings.intrinsicBalmer)
  positive('/settings/electronTemperature', settings.electronTemperature)
  positive('/settings/minSnr', settings.minSnr)
  if (typeof settings.allowNegative !== 'boolean') throw new ScienceSettingsError('/settings/allowNegative', 'allowNegative must be a boolean')
  if (!SFR_CALIBRATIONS.includes(settings.sfrCalibration)) {
    throw new ScienceSettingsError('/settings/sfrCalibration', `sfrCalibration must be one of ${SFR_CALIBRATIONS.join(', ')}, got ${String(settings.sfrCalibration)}`)
  }
  positive('/settings/cosmology/h0', settings.cosmology?.h0)
  const om = settings.cosmology.omegaM
  if (typeof om !== 'number' || !(om >= 0 && om <= 1)) {
    throw new ScienceSettingsError('/settings/cosmology/omegaM', `omegaM must be between 0 and 1, got ${String(om)}`)
  }
  const draws = settings.monteCarlo?.draws
  if (typeof draws !== 'number' || !Number.isInteger(draws) || draws < 0 || draws > MAX_MONTE_CARLO_DRAWS) {
    throw new ScienceSettingsError('/settings/monteCarlo/draws', `draws must be an integer from 0 to ${MAX_MONTE_CARLO_DRAWS}, got ${String(draws)}`)
  }
  const seed = settings.monteCarlo.seed
  if (typeof seed !== 'number' || !Number.isInteger(seed)) {
    throw new ScienceSettingsError('/settings/monteCarlo/seed', `seed must be an integer, got ${String(seed)}`)
  }
}
