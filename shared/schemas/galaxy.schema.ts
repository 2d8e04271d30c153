import { z } from 'zod'
import { textLine } from './text.ts'
import { FitOptionsSchema } from './fit-options.schema.ts'
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { SFR_CALIBRATIONS } from '../vocabulary/calibrations.ts'
import { defaultRvFor, EXTINCTION_LAWS } from '../vocabulary/extinction-laws.ts'
import { LINE_IDS, type LineId } from '../vocabulary/lines.ts'

/**
 * Bounds of the numbers a galaxy may carry. They are wide enough for any survey's units and keep
 * every product and ratio the chain forms (flux × unit × 4πd², flux / error, squares of errors)
 * finite in double precision.
 */
export const FLUX_MAX = 1e30
/** Errors and limits below this are not measurements in any unit (and 1/σ² would overflow). */
export const ERROR_MIN = 1e-30
export const FLUX_UNIT_MIN = 1e-30
export const FLUX_UNIT_MAX = 1e10
/** Å; the largest emission-line equivalent widths observed are a few thousand Å. */
export const EW_MAX = 1e5
/** km/s; no line is narrower than this (thermal widths alone are ~10 km/s) or as broad as light travels. */
export const FWHM_MIN = 1

/** erg s⁻¹ cm⁻² per flux unit of a galaxy or a file. */
export const FluxUnitSchema = z.number().min(FLUX_UNIT_MIN).max(FLUX_UNIT_MAX)
  .meta({ description: `erg s⁻¹ cm⁻² per flux unit (default 1), ${FLUX_UNIT_MIN}–${FLUX_UNIT_MAX}; matters only for luminosities` })

/**
 * One line: `{flux, error}` or `{upperLimit}`. Checked field by field (not a bare union) so that an
 * error names the leaf, e.g. /galaxies/3/lines/hbeta/error.
 */
export const LineValueSchema = z.object({
  flux: z.number().min(-FLUX_MAX).max(FLUX_MAX).optional().meta({ description: 'measured flux in the galaxy\'s fluxUnit' }),
  error: z.number().min(ERROR_MIN).max(FLUX_MAX).optional().meta({ description: `1σ error of the flux, ${ERROR_MIN}–${FLUX_MAX}` }),
  upperLimit: z.number().min(ERROR_MIN).max(FLUX_MAX).optional().meta({ description: 'a non-detection: the flux is below this value' }),
}).strict().superRefine((v, ctx) => {
  if (v.upperLimit !== undefined) {
    if (v.flux !== undefined) ctx.addIssue({ code: 'custom', path: ['flux'], message: 'give either upperLimit or flux and error, not both' })
    if (v.error !== undefined) ctx.addIssue({ code: 'custom', path: ['error'], message: 'give either upperLimit or flux and error, not both' })
    return
  }
  if (v.flux === undefined) ctx.addIssue({ code: 'custom', path: ['flux'], message: 'flux is required unless upperLimit is given' })
  if (v.error === undefined) ctx.addIssue({ code: 'custom', path: ['error'], message: 'error is required with flux' })
}).meta({ id: 'LineValue', description: '`{flux, error}` (error > 0) or `{upperLimit}` (> 0)' })

const perLine = <T extends z.ZodType>(value: T) =>
  z.object(Object.fromEntries(LINE_IDS.map((id) => [id, value.optional()])) as Record<LineId, z.ZodOptional<T>>).strict()

export const GalaxyInputSchema = z.object({
  id: textLine().min(1).max(120).meta({ description: 'the pipeline\'s own galaxy ID' }),
  redshift: z.number().min(0).max(20).optional(),
  fluxUnit: FluxUnitSchema.optional(),
  ra: z.number().min(0).lt(360).optional().meta({ description: 'right ascension, degrees (ICRS)' }),
  dec: z.number().min(-90).max(90).optional().meta({ description: 'declination, degrees (ICRS)' }),
  lines: perLine(LineValueSchema),
  ew: perLine(z.number().min(-EW_MAX).max(EW_MAX)).optional().meta({ description: 'equivalent widths in Å, emission positive' }),
  fwhm: perLine(z.number().min(FWHM_MIN).lt(SPEED_OF_LIGHT_KM_PER_S)).optional().meta({ description: 'line FWHM in km/s (halpha_broad for black-hole masses)' }),
}).strict().meta({ id: 'GalaxyInput' })
export type GalaxyInputDto = z.infer<typeof GalaxyInputSchema>

/** Analysis settings (assumptions). Every field optional; defaults in shared/diagnostics/settings.ts (shared/science/README.md §10). */
export const SettingsInputSchema = z.object({
  extinctionLaw: z.enum(EXTINCTION_LAWS).default('ccm89'),
  rv: z.number().min(1).max(8).optional().meta({ description: 'R_V; default 3.1, or 4.05 (R′_V) for calzetti00' }),
  intrinsicBalmer: z.number().min(2).max(5).default(2.86).meta({ description: 'intrinsic Hα/Hβ: 2.86 Case B (10⁴ K, 10² cm⁻³); 3.1 is the customary AGN narrow-line value' }),
  electronTemperature: z.number().min(5000).max(30000).default(10000).meta({ description: 'K, used for the density diagnostics' }),
  minSnr: z.number().min(0).max(100).default(3),
  allowNegative: z.boolean().default(false),
  sfrCalibration: z.enum(SFR_CALIBRATIONS).default('kennicutt98'),
  cosmology: z.object({
    h0: z.number().min(20).max(150).default(70),
    omegaM: z.number().min(0).max(1).default(0.3),
  }).strict().prefault({}),
  monteCarlo: z.object({
    draws: z.number().int().min(0).max(5000).default(0),
    seed: z.number().int().min(0).max(2 ** 32 - 1).default(1),
  }).strict().prefault({}),
  fit: FitOptionsSchema.prefault({}).meta({ description: 'how galaxies\' spectra are fitted (their lines are measured under these settings)' }),
}).strict()

/** Settings as the science uses them and answers show them: every default applied, R_V resolved. */
const ResolvedSettingsSchema = SettingsInputSchema.required()
type ResolvedSettings = z.output<typeof ResolvedSettingsSchema>

// the pipe gives the answer side a JSON Schema of its own (a transform alone has none); its defaults never apply there
export const SettingsSchema = SettingsInputSchema.transform((s) => ({
  ...s,
  rv: s.rv ?? defaultRvFor(s.extinctionLaw),
})).pipe(ResolvedSettingsSchema as unknown as z.ZodType<ResolvedSettings, ResolvedSettings>).meta({ id: 'Settings' })
export type Settings = z.output<typeof SettingsSchema>

export const MAX_GALAXIES_PER_REQUEST = 10_000

export const DiagnosticsRequestSchema = z.object({
  settings: SettingsSchema.prefault({}),
  galaxies: z.array(GalaxyInputSchema).min(1),
}).strict().meta({ id: 'DiagnosticsRequest' })

export const BatchRequestSchema = z.object({
  galaxies: z.array(GalaxyInputSchema).min(1),
}).strict().meta({ id: 'GalaxyBatch' })
