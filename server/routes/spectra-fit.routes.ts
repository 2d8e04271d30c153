import type { NextFunction, Request, Response } from 'express'
import type { RouteDeps } from '../app.ts'
import { route, type Routes } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { SpectraFitRequestSchema, SpectraFitResponseSchema, spectraOverLimit, SPECTRA_FIT_BODY_LIMIT, SPECTRA_MAX_PER_REQUEST, SPECTRUM_MAX_PIXELS } from '../../shared/schemas/spectra.schema.ts'
import { METHOD_VERSION } from '../../shared/science.ts'
import { SPECTRUM_FIT_METHOD_VERSION } from '../../shared/spectra/fit.ts'
import { inProcessCompute } from '../compute/pool.ts'
import { DEFAULT_ANON_COMPUTE_BUDGET, DEFAULT_COMPUTE_BUDGET, SPECTRUM_FIT_COST, spectraOverBudget } from '../compute/budget.ts'
import { spectraFitService } from '../services/spectra-stateless.service.ts'
import { anonymousComputeLimiter } from './diagnostics.routes.ts'

/** 413 before validation when a body breaks a size limit (spectra a request, pixels a spectrum). */
export function spectraSizeLimit(req: Request, _res: Response, next: NextFunction) {
  const over = req.bulkBody ? (req.bulkBody.failed === 'too-large' ? req.bulkBody : null) : spectraOverLimit(req.body)
  if (over) return next(new HttpProblem(413, 'Content Too Large', over.message, [{ path: over.path, message: over.message }]))
  next()
}

export function spectraFitRoutes(r: Routes, deps: RouteDeps) {
  const anonymousLimiter = anonymousComputeLimiter(deps.config)
  const service = spectraFitService(deps.compute ?? inProcessCompute())
  const { computeBudget, anonymousComputeBudget } = deps.config
  route(r, {
    method: 'post', path: '/spectra/fit', operationId: 'fitSpectra', tag: 'Diagnostics', access: 'optional',
    summary: `Measure the lines of up to ${SPECTRA_MAX_PER_REQUEST.toLocaleString('en-US')} 1-D spectra and diagnose them; nothing is stored`,
    description: 'Each spectrum is fitted (continuum and line profiles per line complex, tied kinematics, fixed doublet ratios, '
      + 'one or two narrow components and an optional broad Hα chosen by BIC; Na I D absorption), and its `measurements` '
      + 'are diagnosed exactly as `POST /diagnostics` would. '
      + `Limits, checked before the content (413): ${SPECTRA_FIT_BODY_LIMIT} a body, ${SPECTRA_MAX_PER_REQUEST.toLocaleString('en-US')} spectra, ${SPECTRUM_MAX_PIXELS.toLocaleString('en-US')} pixels a spectrum. `
      + `A fit costs ${SPECTRUM_FIT_COST.toLocaleString('en-US')} compute units (×2.5 with components "auto", × (fit Monte Carlo draws + 1)); `
      + `a request may spend ${DEFAULT_COMPUTE_BUDGET.toLocaleString('en-US')} with credentials and ${DEFAULT_ANON_COMPUTE_BUDGET.toLocaleString('en-US')} without (COMPUTE_BUDGET, COMPUTE_ANON_BUDGET): more is a 422.`,
    body: SpectraFitRequestSchema, bodyParsing: { worker: 'spectraFit' }, rateLimit: anonymousLimiter, before: [spectraSizeLimit],
    bodyExample: {
      fit: { profile: 'gaussian', components: 1, broadHalpha: 'auto' },
      spectra: [{
        id: 'LNS-0000001', redshift: 0.0312, fluxUnit: 1e-17, wavelengthMedium: 'air', resolution: { fwhmAngstrom: 2.5 },
        // twelve pixels to show the shape; a real spectrum has thousands
        wavelength: Array.from({ length: 12 }, (_, i) => 6760 + i), flux: [12.1, 11.8, 12.4, 14.9, 31.2, 58.7, 40.3, 18.2, 12.9, 12.0, 11.7, 12.2], error: Array.from({ length: 12 }, () => 0.9),
      }],
    },
    responses: {
      200: { description: 'one result per spectrum, in order', schema: SpectraFitResponseSchema },
      413: { description: `a body over ${SPECTRA_FIT_BODY_LIMIT}, more than ${SPECTRA_MAX_PER_REQUEST} spectra, or a spectrum over ${SPECTRUM_MAX_PIXELS} pixels` },
      422: { description: 'invalid values with their JSON Pointer (wavelengths not increasing, arrays of unequal length, no error or ivar, …), or over the compute budget' },
      503: { description: 'the compute queue is full, or a fit ran past the time budget (COMPUTE_TIMEOUT_S); with Retry-After' },
    },
  }, async (req, res, { body }) => {
    const anonymous = !req.auth
    const over = spectraOverBudget(body.spectra.length, body.fit, body.settings.monteCarlo.draws, anonymous ? anonymousComputeBudget : computeBudget,
      { anonymous, authenticatedBudget: computeBudget })
    if (over) throw new HttpProblem(422, 'Unprocessable Content', over.message, [over])
    // a client that goes away stops the fits not yet started
    const gone = new AbortController()
    res.on('close', () => { if (!res.writableEnded) gone.abort() })
    const results = await service.fit(body, gone.signal)
    res.json({ methodVersion: `${METHOD_VERSION}+${SPECTRUM_FIT_METHOD_VERSION}`, fit: body.fit, settings: body.settings, results })
  })
}
