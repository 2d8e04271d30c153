import type { Router } from 'express'
import { rateLimit } from 'express-rate-limit'
import { z } from 'zod'
import type { AppDeps } from '../app.ts'
import { route } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { DiagnosticsRequestSchema } from '../../shared/schemas/galaxy.schema.ts'
import { GalaxyResultSchema } from '../../shared/schemas/diagnostics-result.schema.ts'
import { METHOD_VERSION } from '../../shared/science.ts'
import { checkBatchRules, computeAll } from '../services/galaxies.service.ts'
import { galaxyCountLimit } from './galaxies.routes.ts'
import type { Guard } from './index.ts'

/** Draws × galaxies above this would keep one request busy for too long. */
const MAX_MONTE_CARLO_WORK = 2_000_000

export function diagnosticsRoutes(r: Router, deps: AppDeps, guard: Guard) {
  const anonymousLimiter = rateLimit({
    windowMs: 60_000, limit: deps.config.anonymousDiagnosticsRateLimit, standardHeaders: 'draft-8', legacyHeaders: false,
    skip: (req) => !!req.auth,
    handler: (_req, _res, next) => next(new HttpProblem(429, 'Too Many Requests', 'rate limit for anonymous use reached; send an API key', undefined, { 'Retry-After': '60' })),
  })
  route(r, {
    method: 'post', path: '/diagnostics', tag: 'Diagnostics', access: 'optional',
    summary: 'Stateless diagnostics for up to 10,000 galaxies',
    description: 'Nothing is stored. Anonymous use is allowed at a lower rate; send an API key or session for more. Every number in the answer is finite or null.',
    body: DiagnosticsRequestSchema,
    bodyExample: { settings: { extinctionLaw: 'ccm89', rv: 3.1, intrinsicBalmer: 2.86, minSnr: 3 }, galaxies: [{ id: 'LNS-0000001', redshift: 0.05, fluxUnit: 1e-17, lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, oiii_5007: { upperLimit: 9 } }, ew: { halpha: 24.5 } }] },
    responses: {
      200: { description: 'results', schema: z.object({ methodVersion: z.string(), settings: z.record(z.string(), z.unknown()), results: z.array(GalaxyResultSchema) }) },
      413: { description: 'more than 10,000 galaxies' }, 422: { description: 'invalid values, with field paths' },
    },
  }, (spec) => { const g = guard(spec); return (req, res, next) => anonymousLimiter(req, res, (e?: unknown) => (e ? next(e) : g(req, res, (e2?: unknown) => (e2 ? next(e2) : galaxyCountLimit(req, res, next))))) },
  async (_req, res, { body }) => {
    const { settings, galaxies } = body
    if (settings.monteCarlo.draws * galaxies.length > MAX_MONTE_CARLO_WORK) {
      throw new HttpProblem(422, 'Unprocessable Content', `draws × galaxies may be at most ${MAX_MONTE_CARLO_WORK}`, [{ path: '/settings/monteCarlo/draws', message: `at most ${Math.floor(MAX_MONTE_CARLO_WORK / galaxies.length)} draws for ${galaxies.length} galaxies` }])
    }
    const errors = checkBatchRules(galaxies, settings)
    if (errors.length) throw new HttpProblem(422, 'Unprocessable Content', `${errors.length} problem(s) in the request`, errors)
    res.json({ methodVersion: METHOD_VERSION, settings, results: computeAll(galaxies, settings) })
  })
}
