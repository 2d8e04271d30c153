import { z } from 'zod'
import { FluxUnitSchema } from './galaxy.schema.ts'
import { FitOptionsSchema } from './fit-options.schema.ts'
import { ResolutionSchema, SPECTRA_MAX_PER_REQUEST, SPECTRUM_MAX_PIXELS, SPECTRUM_MIN_PIXELS } from './spectra.schema.ts'
import { positiveInt4, textBlock, textLine } from './text.ts'

/**
 * Spectra stored in a project: the upload form, the per-file report, the fit-quality table, one
 * galaxy's spectrum with its fit and model, and the trial refit. The spectrum itself and the fit
 * result are the science library's; these are the project's views of them.
 */

/** Limits of one upload, checked before the content is read (413): the science library's (spectra.schema.ts). */
export const SPECTRA_PER_UPLOAD_MAX = SPECTRA_MAX_PER_REQUEST
export const SPECTRUM_PIXELS_MAX = SPECTRUM_MAX_PIXELS
export const SPECTRUM_PIXELS_MIN = SPECTRUM_MIN_PIXELS
/** Files a spectrum can come in; a `.zip` may hold any of them. */
export const SPECTRUM_FILE_EXTENSIONS = ['.fits', '.fit', '.fts', '.json', '.csv', '.txt', '.dat', '.tsv', '.ascii'] as const

export const WavelengthMediumSchema = z.enum(['air', 'vacuum'])

/** Defaults for what a file does not say (its header wins). */
export const UploadDefaultsSchema = z.object({
  redshift: z.number().min(0).max(20).optional().meta({ description: 'used when the file has none; else the galaxy\'s redshift in the project' }),
  fluxUnit: FluxUnitSchema.optional().meta({ description: 'erg s⁻¹ cm⁻² Å⁻¹ per flux unit when the file does not say (default 1)' }),
  wavelengthMedium: WavelengthMediumSchema.optional().meta({ description: 'when the file does not say (default air)' }),
  resolution: ResolutionSchema.optional(),
}).strict().meta({ id: 'SpectrumUploadDefaults' })
export type UploadDefaults = z.infer<typeof UploadDefaultsSchema>

/** A form field holding JSON (multipart forms carry text only). */
const jsonField = <T extends z.ZodType>(schema: T) => textBlock().max(10_000).transform((text, ctx) => {
  try { return JSON.parse(text) as unknown } catch {
    ctx.addIssue({ code: 'custom', message: 'must be JSON text' })
    return z.NEVER
  }
}).pipe(schema)
const booleanField = z.enum(['true', 'false', '1', '0']).transform((v) => v === 'true' || v === '1')

export const SpectraOnExistingSchema = z.enum(['skip', 'replace'])
  .meta({ description: 'a galaxy that already has a spectrum: keep it (`skip`) or store the new one in its place (`replace`)' })

/** The text fields of the upload form (beside the `files`). */
export const SpectraUploadFormSchema = z.object({
  files: z.array(z.file()).optional().meta({ description: `1…n spectrum files (${SPECTRUM_FILE_EXTENSIONS.join(' ')}) or .zip archives of them; at most ${SPECTRA_PER_UPLOAD_MAX} spectra in all` }),
  defaults: jsonField(UploadDefaultsSchema).optional().meta({ description: 'JSON: `{ redshift?, fluxUnit?, wavelengthMedium?, resolution? }`' }),
  onExisting: SpectraOnExistingSchema.default('skip'),
  skipInvalid: booleanField.default(false).meta({ description: '`true`: store the good files and report the bad ones; `false` (default): any bad file refuses the upload (422)' }),
}).strict()

export const StoredAsSchema = z.enum(['created', 'replaced', 'skipped'])
  .meta({ description: 'created: the galaxy\'s first spectrum; replaced: it took the place of the galaxy\'s earlier one; skipped: the galaxy had one (onExisting=skip)' })
export const UploadFileSchema = z.object({
  name: z.string().meta({ description: 'the file\'s name; an entry of a zip is `archive.zip/path/in/archive`' }),
  size: z.number().int(),
  spectra: z.array(z.object({
    galaxyId: z.string(), pixels: z.number().int(), source: z.string(),
    spectrumId: z.number().int().nullable().meta({ description: 'null when skipped' }), stored: StoredAsSchema,
    fluxUnitAssumed: z.literal(true).optional().meta({ description: 'neither the file nor `defaults` gave a flux unit: 1 erg s⁻¹ cm⁻² Å⁻¹ was assumed (its fits carry the flux-unit-assumed caution)' }),
  })).optional(),
  error: z.object({ message: z.string(), line: z.number().int().optional() }).optional().meta({ description: 'why the file was refused (only with skipInvalid)' }),
}).meta({ id: 'SpectrumUploadFile' })
export const SpectrumUploadSchema = z.object({
  id: z.uuid(), createdAt: z.string(), fileCount: z.number().int(), spectrumCount: z.number().int(),
  intakeId: z.uuid().nullable().meta({ description: 'the intake under which the fit writes the galaxies\' lines' }),
  files: z.array(UploadFileSchema),
}).meta({ id: 'SpectrumUpload' })

export const SPECTRA_SORTS = ['chi2dof', '-chi2dof', 'galaxyId', '-galaxyId', 'detections', '-detections'] as const
export const SpectraListQuerySchema = z.object({
  sort: z.enum(SPECTRA_SORTS).default('galaxyId'),
  flag: textLine().max(200).optional().meta({ description: 'only fits carrying this flag (`not-covered:oii_3726`) or a flag of this family (`not-covered`)' }),
  q: textLine().max(200).optional().meta({ description: 'galaxy IDs containing this text' }),
  page: positiveInt4().default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
}).strict()
export const SpectraListItemSchema = z.object({
  galaxyId: z.string(), spectrumId: z.number().int(), pixels: z.number().int(),
  wavelengthMin: z.number().meta({ description: 'observed Å' }), wavelengthMax: z.number(),
  revision: z.number().int().nullable().meta({ description: 'the assumptions revision of the fit shown (null: not fitted yet)' }),
  chi2: z.number().nullable(), dof: z.number().int().nullable(), chi2dof: z.number().nullable().meta({ description: 'reduced χ²' }),
  components: z.number().int().nullable(), broadHalpha: z.boolean().nullable(), detections: z.number().int().nullable(), flags: z.array(z.string()),
}).meta({ id: 'SpectrumFitSummary' })
export const SpectraListSchema = z.object({ items: z.array(SpectraListItemSchema), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })

/** The stored spectrum, arrays as numbers (error: null for a bad pixel). */
export const StoredSpectrumSchema = z.object({
  id: z.number().int(), galaxyId: z.string(), redshift: z.number(), wavelengthMedium: WavelengthMediumSchema,
  fluxUnit: z.number().meta({ description: 'erg s⁻¹ cm⁻² Å⁻¹ per flux unit' }), resolution: ResolutionSchema.nullable(),
  fileName: z.string(), source: z.string(), createdAt: z.string(),
  wavelength: z.array(z.number()).meta({ description: 'observed Å' }), flux: z.array(z.number()),
  error: z.array(z.number().nullable()).meta({ description: '1σ per pixel; null for a bad pixel' }),
}).meta({ id: 'StoredSpectrum' })

export const MODEL_COMPONENT_KINDS = ['narrow', 'narrow2', 'broad', 'absorption'] as const
export const SpectrumModelSchema = z.object({
  continuum: z.array(z.number().nullable()).meta({ description: 'per pixel; null outside the fitted windows' }),
  total: z.array(z.number().nullable()),
  components: z.array(z.object({ line: z.string(), kind: z.enum(MODEL_COMPONENT_KINDS), values: z.array(z.number().nullable()) })),
  windows: z.array(z.object({ name: z.string(), from: z.number(), to: z.number() })).meta({ description: 'the fitted wavelength windows, observed Å' }),
}).meta({ id: 'SpectrumModel' })

export const LineFitSchema = z.object({
  revision: z.number().int().nullable().meta({ description: 'the assumptions revision; null for a trial refit (not stored)' }),
  settings: FitOptionsSchema.extend({ minSnr: z.number() }).meta({ description: 'the fit settings, resolved, and the detection threshold' }),
  methodVersion: z.string(),
  result: z.record(z.string(), z.unknown()).meta({ description: 'lines, absorption, fit statistics, measurements and flags as the fit returned them' }),
  model: SpectrumModelSchema,
}).meta({ id: 'LineFit' })
export const GalaxySpectrumSchema = z.object({ spectrum: StoredSpectrumSchema, fit: LineFitSchema.nullable() }).meta({ id: 'GalaxySpectrum' })

export const TrialFitSchema = z.object({ fit: FitOptionsSchema.prefault({}) }).strict().meta({ id: 'TrialFit' })
export const GalaxySpectrumQuerySchema = z.object({
  revision: positiveInt4().optional().meta({ description: 'the fit under this assumptions revision (default: the revision the project shows, else the newest fit)' }),
}).strict()
