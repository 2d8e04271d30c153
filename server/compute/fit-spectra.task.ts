// Fitting stored spectra on a compute thread (server/compute/worker.mjs loads this file): one task
// per spectrum, so a batch spreads over every thread. Pure: the same function runs in-process.
import { fitSpectrum, SPECTRUM_FIT_METHOD_VERSION } from '../../shared/spectra/fit.ts'
import { modelOf as redraw } from '../../shared/spectra/redraw.ts'
import { flagName } from '../../shared/vocabulary/flags.ts'
import type { Resolution, SpectrumFitResult, SpectrumInput } from '../../shared/spectra/types.ts'
import type { FitOptionsDto } from '../../shared/schemas/fit-options.schema.ts'

/** A stored spectrum in its stored form (see server/db/schema.ts `spectra`). */
export interface StoredSpectrumArrays {
  galaxyId: string
  redshift: number
  fluxUnit: number
  /** no flux unit was given: the fit carries flux-unit-assumed */
  fluxUnitAssumed?: boolean
  wavelengthMedium: 'air' | 'vacuum'
  resolution: Resolution | null
  wavelength: Float64Array
  flux: Float32Array
  noiseKind: 'error' | 'ivar'
  noise: Float32Array
}

/** The fit settings of an assumptions revision: the `fit` options and the detection threshold. */
export type FitSettings = FitOptionsDto & { minSnr: number }

/** A stored spectrum, or one as a request sent it (POST /spectra/fit). */
export interface FitSpectrumTask { kind: 'fit-spectrum'; spectrum: StoredSpectrumArrays | SpectrumInput; settings: FitSettings }
export type FitSpectrumOutput = { ok: true; result: SpectrumFitResult } | { ok: false; error: string }

/** Version of the fit method stored beside each fit (a new version refits on the next recompute). */
export const FIT_METHOD_VERSION = SPECTRUM_FIT_METHOD_VERSION

/** The science library's input: errors with null for bad pixels, or the inverse variance. */
export function spectrumInput(s: StoredSpectrumArrays): SpectrumInput {
  const base = {
    id: s.galaxyId, redshift: s.redshift, fluxUnit: s.fluxUnit, wavelengthMedium: s.wavelengthMedium,
    wavelength: s.wavelength, flux: s.flux, ...(s.resolution ? { resolution: s.resolution } : {}),
  }
  if (s.noiseKind === 'ivar') return { ...base, ivar: s.noise }
  return { ...base, error: Array.from(s.noise, (e) => (Number.isNaN(e) ? null : e)) }
}

export function fitSpectrumTask(task: FitSpectrumTask): FitSpectrumOutput {
  const { minSnr, ...options } = task.settings
  try {
    const stored = 'noiseKind' in task.spectrum ? task.spectrum : null
    const result = fitSpectrum(stored ? spectrumInput(stored) : task.spectrum as SpectrumInput, options, { minSnr })
    // a stored spectrum's fluxes rest on the unit it was stored with (a request's spectrum says its own)
    if (stored?.fluxUnitAssumed) result.flags.push(flagName('flux-unit-assumed'))
    return { ok: true, result }
  } catch (err) {
    // a spectrum the fit cannot take (the upload's checks should have refused it): reported, not thrown,
    // so one spectrum does not stop a batch
    return { ok: false, error: err instanceof Error ? err.message : String(err) }
  }
}

/** The model of a fit on the spectrum's pixels: continuum, total and each component, for drawing and model.csv. */
export function modelOf(a: StoredSpectrumArrays, result: unknown) {
  return redraw(spectrumInput(a), (result ?? {}) as Pick<SpectrumFitResult, 'model'>)
}
