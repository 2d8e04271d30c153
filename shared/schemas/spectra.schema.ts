import { z } from 'zod'
import { textLine } from './text.ts'
import { ERROR_MIN, FLUX_MAX, FluxUnitSchema } from './galaxy.schema.ts'

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
