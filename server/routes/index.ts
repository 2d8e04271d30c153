import express, { Router } from 'express'
import { ipKeyGenerator, rateLimit } from 'express-rate-limit'
import type { RouteDeps } from '../app.ts'
import { authenticate, guardFor } from '../http/auth.ts'
import { HttpProblem } from '../http/problem.ts'
import { jsonBodies } from '../http/bulk-body.ts'
import type { RouteRegistry, Routes } from '../http/route.ts'
import { inProcessCompute } from '../compute/pool.ts'
import { accountsRoutes } from './accounts.routes.ts'
import { projectsRoutes } from './projects.routes.ts'
import { galaxiesRoutes } from './galaxies.routes.ts'
import { diagnosticsRoutes } from './diagnostics.routes.ts'
import { openapiRoutes } from './openapi.routes.ts'
import { assumptionsRoutes } from './assumptions.routes.ts'
import { intakeRoutes } from './intake.routes.ts'
import { exportRoutes } from './exports.routes.ts'
import { adminRoutes } from './admin.routes.ts'
import { spectraFitRoutes } from './spectra-fit.routes.ts'
import { SPECTRA_FIT_BODY_LIMIT } from '../../shared/schemas/spectra.schema.ts'
import { spectraRoutes } from './spectra.routes.ts'

export const JSON_LIMIT = '32mb'
/** Sign-in, sign-up, reset, verification and invitations need little; anyone can call them. */
export const AUTH_JSON_LIMIT = '16kb'

/** Every /api route of one app; `registry` receives their specs (OpenAPI, bulk bodies). */
export function buildRoutes(deps: RouteDeps, registry: RouteRegistry): Router {
  const router = Router()
  const v1: Routes = { router: Router(), guard: guardFor(deps.db), registry }
  router.use(openapiRoutes(registry))
  const jsonTypes = ['application/json', 'application/*+json']
  // the small limit first: a body read here is not read again by the general parser (413 beyond it)
  router.use(['/v1/auth', '/v1/invitations'], express.json({ limit: AUTH_JSON_LIMIT, strict: false, type: jsonTypes }))
  // spectra to fit may be larger than other bodies; read like the other bulk bodies, on a compute thread
  const compute = deps.compute ?? inProcessCompute()
  const spectraBodies = jsonBodies(compute, registry.bulk, { limit: SPECTRA_FIT_BODY_LIMIT, type: jsonTypes })
  router.use('/v1', (req, res, next) => (req.method === 'POST' && /^\/spectra\/fit\/?$/i.test(req.path) ? spectraBodies(req, res, next) : next()))
  // express.json, except that large bulk bodies (diagnostics, batch) are read on a compute thread;
  // a body read above is not read again (body-parser skips a finished request)
  router.use('/v1', jsonBodies(compute, registry.bulk, { limit: JSON_LIMIT, type: jsonTypes }))
  router.use('/v1', authenticate(deps.db, deps.config))
  // per key (or signed-in user) and per address
  router.use('/v1', rateLimit({
    windowMs: 60_000, limit: deps.config.apiRateLimit, standardHeaders: 'draft-8', legacyHeaders: false,
    keyGenerator: (req) => req.auth?.key ? `key:${req.auth.key.id}` : req.auth ? `user:${req.auth.user.id}` : `ip:${ipKeyGenerator(req.ip ?? '')}`,
    handler: (_req, _res, next, options) => next(new HttpProblem(429, 'Too Many Requests', 'rate limit reached; slow down', undefined, { 'Retry-After': String(Math.ceil(options.windowMs / 1000)) })),
  }))
  accountsRoutes(v1, deps)
  projectsRoutes(v1, deps)
  galaxiesRoutes(v1, deps)
  diagnosticsRoutes(v1, deps)
  spectraFitRoutes(v1, deps)
  assumptionsRoutes(v1, deps)
  intakeRoutes(v1, deps)
  exportRoutes(v1, deps)
  spectraRoutes(v1, deps)
  adminRoutes(v1, deps)
  router.use('/v1', v1.router)
  return router
}
