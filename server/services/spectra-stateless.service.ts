import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import type { SpectraFitRequest } from '../../shared/schemas/spectra.schema.ts'
import type { GalaxyResult } from '../../shared/diagnostics/types.ts'
import type { SpectrumFitResult } from '../../shared/spectra/types.ts'
import { flagName } from '../../shared/vocabulary/flags.ts'
import { diagnose, gone, type ComputePool } from '../compute/pool.ts'
import type { FitSettings, FitSpectrumOutput } from '../compute/fit-spectra.task.ts'
import { galaxyFromMeasurements } from './spectra-fit.service.ts'

/** One answer of POST /spectra/fit: the fit (without its internal model parameters) and the diagnosis of its measurements. */
export type StatelessFitResult = Omit<SpectrumFitResult, 'model'> & { diagnostics: GalaxyResult | null }

/**
 * Every spectrum fitted, at most one per compute thread in flight for this request: a request of a
 * thousand spectra neither fills the queue others are admitted by (its own fits would be refused
 * 503) nor keeps other requests waiting behind all of its fits. Stops taking spectra once the
 * client has gone (`signal`); the fits in flight finish, since aborting a running task costs its thread.
 */
async function fitAll(compute: ComputePool, spectra: SpectraFitRequest['spectra'], settings: FitSettings, signal?: AbortSignal): Promise<FitSpectrumOutput[]> {
  const outs: FitSpectrumOutput[] = new Array(spectra.length)
  let next = 0
  const lane = async () => {
    while (next < spectra.length) {
      if (signal?.aborted) throw gone()
      const i = next++
      outs[i] = await compute.fitSpectrum({ spectrum: spectra[i]!, settings }, { interactive: true })
    }
  }
  await Promise.all(Array.from({ length: Math.min(Math.max(1, compute.threads), spectra.length) }, lane))
  return outs
}

/**
 * The stateless spectra fit: every spectrum fitted on the compute threads (one task each, so a
 * request spreads over every thread), then the measurements diagnosed together, as `POST
 * /diagnostics` would diagnose them under the request's settings.
 */
export function spectraFitService(compute: ComputePool) {
  return {
    async fit(body: SpectraFitRequest, signal?: AbortSignal): Promise<StatelessFitResult[]> {
      const settings = { ...body.fit, minSnr: body.settings.minSnr }
      const outs = await fitAll(compute, body.spectra, settings, signal)
      const records: (GalaxyInputDto | null)[] = outs.map((o, i) => {
        if (!o.ok) return null
        const s = body.spectra[i]!
        return galaxyFromMeasurements({ id: s.id, redshift: s.redshift, ...(s.fluxUnit !== undefined ? { fluxUnit: s.fluxUnit } : {}) }, o.result.measurements)
      })
      const diagnosable = records.filter((g): g is GalaxyInputDto => g !== null)
      const diagnosed = diagnosable.length ? await diagnose(compute, diagnosable, body.settings, { interactive: true, prefix: '/spectra', ...(signal ? { signal } : {}) }) : []
      let next = 0
      return outs.map((o, i) => {
        if (!o.ok) {
          // a spectrum the schema let through but the fit could not take: said in its own result, the others still answered
          return { id: body.spectra[i]!.id, lines: {}, absorption: {}, fit: { chi2: 0, dof: 0, components: 0, broadHalpha: false }, measurements: { lines: {}, ew: {}, fwhm: {} }, diagnostics: null, flags: [flagName('fit-failed')] }
        }
        const { model: _model, ...result } = o.result as SpectrumFitResult & { model?: unknown }
        return { ...result, diagnostics: records[i] ? diagnosed[next++]! : null }
      })
    },
  }
}
