import { z } from 'zod'

/**
 * The `fit` options of a spectrum fit (shared/science/README.md §13): those of `POST /spectra/fit`
 * (re-exported by spectra.schema.ts) and of the assumptions (`settings.fit`), so a revision with
 * other fit settings refits its galaxies' spectra. Every field optional; defaults as below.
 */

/** Most Monte Carlo refits per spectrum (each is a full fit). */
export const SPECTRUM_MAX_MONTE_CARLO_DRAWS = 1000

export const FitOptionsSchema = z.object({
  profile: z.enum(['gaussian', 'lorentzian', 'voigt']).default('gaussian'),
  components: z.union([z.literal(1), z.literal(2), z.literal('auto')]).default(1)
    .meta({ description: 'narrow kinematic components; auto keeps the second when BIC falls by > 10 and it is detected' }),
  broadHalpha: z.enum(['off', 'on', 'auto']).default('auto'),
  absorption: z.array(z.enum(['nad'])).max(1).default(['nad']),
  monteCarlo: z.object({
    draws: z.number().int().min(0).max(SPECTRUM_MAX_MONTE_CARLO_DRAWS).default(0),
    seed: z.number().int().min(0).max(2 ** 32 - 1).default(1),
  }).strict().prefault({}),
  balmerAbsorptionEw: z.number().min(0).max(20).default(0)
    .meta({ description: 'fixed rest-frame stellar absorption EW (Å) added back to the narrow Balmer lines; 0 = none' }),
}).strict().meta({ id: 'SpectrumFitOptions' })
export type FitOptionsDto = z.output<typeof FitOptionsSchema>
