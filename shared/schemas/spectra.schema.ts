import { z } from 'zod'
import { textLine } from './text.ts'
import { ERROR_MIN, FLUX_MAX, FluxUnitSchema, SettingsSchema } from './galaxy.schema.ts'
import { FitOptionsSchema as FitOptionsSchemaRef } from './fit-options.schema.ts'
import { GalaxyResultSchema } from './diagnostics-result.schema.ts'

/**
 * A 1-D spectrum and the `fit` options of `POST /spectra/fit` (shared/science/README.md §13, §14).
 * The size limits are exported so the route can check them before the content (413 wins over 422).
 */

/** Most pixels in one spectrum. */
export const SPECTRUM_MAX_PIXELS = 50_000
/** Most spectra in one request. */
export const SPECTRA_MAX_PER_REQUEST = 1_000
/** Fewest pixels a spectrum may have (a line window needs more than this anyway). */
export const SPECTRUM_MIN_PIXELS = 10
/** Wavelength bounds (Å): beyond any optical/near-infrared spectrum but finite in every product. */
export const WAVELENGTH_MIN = 100
export const WAVELENGTH_MAX = 1e6
/** Inverse variance bound: 1/ERROR_MIN². */
export const IVAR_MAX = 1 / (ERROR_MIN * ERROR_MIN)

export const ResolutionSchema = z.object({
  fwhmAngstrom: z.number().gt(0).max(1000).optional().meta({ description: 'instrumental FWHM in observed Å' }),
  fwhmKmPerS: z.number().gt(0).max(1e5).optional().meta({ description: 'instrumental FWHM in km/s' }),
  resolvingPower: z.number().min(1).max(1e7).optional().meta({ description: 'R = λ/FWHM' }),
}).strict().superRefine((r, ctx) => {
  const given = [r.fwhmAngstrom, r.fwhmKmPerS, r.resolvingPower].filter((x) => x !== undefined).length
  if (given !== 1) ctx.addIssue({ code: 'custom', path: [], message: 'give exactly one of fwhmAngstrom, fwhmKmPerS and resolvingPower' })
}).meta({ id: 'SpectrumResolution', description: 'instrumental line-spread function (Gaussian); absent → widths uncorrected, flag no-instrumental-correction' })

const pixels = <T extends z.ZodType>(item: T) => z.array(item).min(SPECTRUM_MIN_PIXELS).max(SPECTRUM_MAX_PIXELS)

export const SpectrumSchema = z.object({
  id: textLine().min(1).max(120).meta({ description: 'the galaxy ID the measurements belong to' }),
  redshift: z.number().min(-0.01).max(20).meta({ description: 'systemic redshift; lines are placed at (1 + z) λ_rest' }),
  fluxUnit: FluxUnitSchema.optional(),
  wavelengthMedium: z.enum(['air', 'vacuum']).default('air'),
  wavelength: pixels(z.number().min(WAVELENGTH_MIN).max(WAVELENGTH_MAX)).meta({ description: 'observed-frame wavelengths in Å, strictly increasing' }),
  flux: pixels(z.number().min(-FLUX_MAX).max(FLUX_MAX)).meta({ description: 'flux density in fluxUnit erg s⁻¹ cm⁻² Å⁻¹' }),
  error: pixels(z.number().min(ERROR_MIN).max(FLUX_MAX).nullable()).optional().meta({ description: '1σ per pixel (> 0), null for a bad pixel; or give ivar' }),
  ivar: pixels(z.number().min(0).max(IVAR_MAX)).optional().meta({ description: 'inverse variance per pixel, 0 for a bad pixel; or give error' }),
  resolution: ResolutionSchema.optional(),
}).strict().superRefine((s, ctx) => {
  if ((s.error === undefined) === (s.ivar === undefined)) ctx.addIssue({ code: 'custom', path: [], message: 'give exactly one of error and ivar' })
  const w = s.wavelength
  for (let i = 1; i < w.length; i++) {
    if (!(w[i] > w[i - 1])) {
      ctx.addIssue({ code: 'custom', path: ['wavelength'], message: `wavelengths must increase strictly (element ${i} is not above element ${i - 1})` })
      break
    }
  }
  const lengths: [string, number][] = [['wavelength', w.length], ['flux', s.flux.length]]
  if (s.error) lengths.push(['error', s.error.length])
  if (s.ivar) lengths.push(['ivar', s.ivar.length])
  const longest = Math.max(...lengths.map(([, n]) => n))
  for (const [name, n] of lengths) {
    if (n < longest) ctx.addIssue({ code: 'custom', path: [name], message: `${name} has ${n} values, fewer than the ${longest} of the longest array` })
  }
}).meta({ id: 'Spectrum' })
export type SpectrumDto = z.infer<typeof SpectrumSchema>

// in a module of their own: the assumptions (galaxy.schema.ts) hold them as `settings.fit`, and this module imports galaxy.schema.ts
export { FitOptionsSchema, SPECTRUM_MAX_MONTE_CARLO_DRAWS, type FitOptionsDto } from './fit-options.schema.ts'

/** Largest body of `POST /spectra/fit` (bytes after Content-Encoding); larger → 413. */
export const SPECTRA_FIT_BODY_LIMIT = '64mb'

export const SpectraFitRequestSchema = z.object({
  fit: FitOptionsSchemaRef.prefault({}),
  settings: SettingsSchema.prefault({}),
  spectra: z.array(SpectrumSchema).min(1).max(SPECTRA_MAX_PER_REQUEST),
}).strict().meta({ id: 'SpectraFitRequest' })
export type SpectraFitRequest = z.output<typeof SpectraFitRequestSchema>

/**
 * The size limit a spectra-fit body breaks, checked before its content (so a 413 wins over a 422):
 * more than SPECTRA_MAX_PER_REQUEST spectra, or a spectrum with an array longer than
 * SPECTRUM_MAX_PIXELS. Null when within the limits (or not even shaped like a request).
 * @example spectraOverLimit({ spectra: [] }) // null
 */
export function spectraOverLimit(body: unknown): { path: string; message: string } | null {
  const spectra = (body as { spectra?: unknown } | null)?.spectra
  if (!Array.isArray(spectra)) return null
  if (spectra.length > SPECTRA_MAX_PER_REQUEST) return { path: '/spectra', message: `at most ${SPECTRA_MAX_PER_REQUEST} spectra per request, got ${spectra.length}` }
  for (let i = 0; i < spectra.length; i++) {
    const s = spectra[i] as Record<string, unknown> | null
    if (s === null || typeof s !== 'object') continue
    for (const key of ['wavelength', 'flux', 'error', 'ivar']) {
      const a = s[key]
      if (Array.isArray(a) && a.length > SPECTRUM_MAX_PIXELS) return { path: `/spectra/${i}/${key}`, message: `at most ${SPECTRUM_MAX_PIXELS} pixels per spectrum, got ${a.length}` }
    }
  }
  return null
}

// ── the answer of POST /spectra/fit (shared/spectra/types.ts is the same shape in TypeScript) ──────

const kms = (description: string) => z.number().meta({ description: `${description}, km/s` })

const LineComponentSchema = z.object({
  flux: z.number(), error: z.number(), velocity: kms('velocity offset from the systemic redshift'), velocityError: z.number(),
  sigma: kms('observed Gaussian-equivalent σ'), sigmaError: z.number(), sigmaIntrinsic: kms('σ with the instrument removed'),
  gammaIntrinsic: kms('Lorentzian HWHM (Voigt fits)').optional(),
}).meta({ id: 'FittedLineComponent' })

const DetectedLineSchema = z.object({
  detected: z.literal(true),
  flux: z.number().meta({ description: 'integrated flux, fluxUnit erg s⁻¹ cm⁻² (narrow components summed)' }), error: z.number(),
  snr: z.number(), ew: z.number().optional().meta({ description: 'rest-frame equivalent width, Å, emission positive' }), ewError: z.number().optional(),
  velocity: kms('flux-weighted velocity offset from the systemic redshift'), velocityError: z.number(),
  sigma: kms('observed Gaussian-equivalent σ (FWHM / 2.3548)'), sigmaError: z.number(),
  sigmaInstrumental: kms('instrumental σ at the line').optional(), sigmaIntrinsic: kms('√(σ² − σ_inst²); 0 with the flag unresolved'),
  gammaIntrinsic: kms('Lorentzian HWHM (Voigt fits)').optional(), gammaIntrinsicError: z.number().optional(),
  components: z.array(LineComponentSchema).optional().meta({ description: 'each narrow component, narrower first (two-component fits)' }),
}).meta({ id: 'FittedLine' })

const UndetectedLineSchema = z.object({
  detected: z.literal(false),
  upperLimit: z.number().meta({ description: 'minSnr × the flux error of a line of the fitted width at the expected place' }),
}).meta({ id: 'UndetectedLine' })

const NadSchema = z.union([
  z.object({
    detected: z.literal(true),
    ew: z.number().meta({ description: 'D2 + D1 rest-frame equivalent width, Å, absorption positive' }), ewError: z.number(),
    ewD2: z.number(), ewD2Error: z.number(), ewD1: z.number(), ewD1Error: z.number(),
    doubletRatio: z.number().optional(), doubletRatioError: z.number().optional(),
    logN: z.number().optional().meta({ description: 'log10 Na I column density, cm⁻² (curve of growth, Gaussian velocity distribution)' }), logNError: z.number().optional(),
    b: kms('Doppler parameter').optional(), bError: z.number().optional(), velocity: kms('velocity offset'), velocityError: z.number(),
    flags: z.array(z.string()), note: z.string(),
  }),
  z.object({ detected: z.literal(false), ewUpperLimit: z.number(), flags: z.array(z.string()), note: z.string() }),
]).meta({ id: 'SodiumAbsorption' })

const MeasuredLineSchema = z.union([z.object({ flux: z.number(), error: z.number() }), z.object({ upperLimit: z.number() })])

export const SpectrumFitResultSchema = z.object({
  id: z.string(),
  lines: z.record(z.string(), z.union([DetectedLineSchema, UndetectedLineSchema])).meta({ description: 'by line id; narrow components only, `halpha_broad` on its own; a line outside the spectrum is absent (flag not-covered:<id>)' }),
  absorption: z.object({ nad: NadSchema.optional() }),
  fit: z.object({ chi2: z.number(), dof: z.number().int(), components: z.number().int(), broadHalpha: z.boolean() }),
  measurements: z.object({
    lines: z.record(z.string(), MeasuredLineSchema), ew: z.record(z.string(), z.number()), fwhm: z.record(z.string(), z.number()),
  }).meta({ description: 'the galaxy record the fit gives: post it as `lines`/`ew`/`fwhm` to /diagnostics or a project\'s galaxies/batch' }),
  diagnostics: GalaxyResultSchema.nullable().meta({ description: 'the /diagnostics result of `measurements` (null when the fit measured nothing)' }),
  flags: z.array(z.string()),
}).meta({ id: 'SpectrumFitResult' })

export const SpectraFitResponseSchema = z.object({
  methodVersion: z.string(),
  fit: FitOptionsSchemaRef,
  settings: SettingsSchema,
  results: z.array(SpectrumFitResultSchema),
}).meta({ id: 'SpectraFitResponse' })
