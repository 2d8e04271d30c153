import express, { Router } from 'express'
import helmet from 'helmet'
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT, type Config } from './config.ts'
import type { Db } from './db/client.ts'
import { errorHandler } from './http/error-handler.ts'
import { HttpProblem } from './http/problem.ts'
import { healthRoutes } from './routes/health.routes.ts'
import { logger } from './lib/logger.ts'
import { buildRoutes } from './routes/index.ts'
import type { Mailer } from './lib/mailer.ts'
import type { JobQueue } from './services/jobs.service.ts'
import type { ComputePool } from './compute/pool.ts'
import { routeRegistry } from './http/route.ts'
import { DiagramCache } from './services/diagram-cache.ts'
import { galaxyContext, type GalaxyContext } from './services/galaxy-context.ts'

export interface AppDeps {
  db: Db
  config: Config
  mailer: Mailer
  /** Background queue (pg-boss); without it recomputes run in this process. */
  jobs?: JobQueue
  /** Worker threads for the science (server/compute/); without it the science runs on the event loop. */
  compute?: ComputePool
  /**
   * This app's diagram documents and warm-up timers (server/services/diagram-cache.ts): state of one
   * app, never of the module. Give the one a recompute worker beside the app shares; made here when absent.
   */
  diagrams?: DiagramCache
  /** Serve the built client from dist/ (off in API tests). */
  serveClient?: boolean
}

/** What the routes receive: the deps with the per-app parts made and bundled for the galaxy services. */
export interface RouteDeps extends AppDeps {
  diagrams: DiagramCache
  galaxy: GalaxyContext
}

/** The deps with a diagram cache of this app's own when none was given, and their galaxy context. */
export function routeDeps(deps: AppDeps): RouteDeps {
  const diagrams = deps.diagrams ?? new DiagramCache(deps.config.diagramWarmupMs)
  return { ...deps, diagrams, galaxy: galaxyContext({ ...deps, diagrams }) }
}

/** The Express app; `routeRegistry` holds what its routes registered (the OpenAPI document is built from it). */
export function createApp(appDeps: AppDeps) {
  const deps = routeDeps(appDeps)
  const app = express()
  app.disable('x-powered-by')
  // only a configured proxy may say who the client is (X-Forwarded-For) and that it used TLS
  app.set('trust proxy', deps.config.trustProxy)
  app.use(helmet({
    contentSecurityPolicy: {
      directives: {
        // plotly injects style elements; scripts stay same-origin only (no inline scripts).
        'script-src': ["'self'"],
        'style-src': ["'self'", "'unsafe-inline'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        'worker-src': ["'self'", 'blob:'],
        'upgrade-insecure-requests': deps.config.secureCookies ? [] : null,
      },
    },
    strictTransportSecurity: false, // below, per request
  }))
  app.use((req, res, next) => {
    // HSTS whenever the request came over TLS (directly, or through a trusted proxy that says so)
    if (deps.config.secureCookies || req.secure) res.setHeader('Strict-Transport-Security', 'max-age=31536000; includeSubDomains')
    next()
  })
  app.use((req, res, next) => {
    const start = process.hrtime.bigint()
    res.on('finish', () => {
      if (req.path.startsWith('/api/')) {
        logger.debug({ method: req.method, path: req.path, status: res.statusCode, ms: Number(process.hrtime.bigint() - start) / 1e6 }, 'request')
      }
    })
    next()
  })

  app.use('/api', healthRoutes(deps.db))
  const registry = routeRegistry()
  app.use('/api', buildRoutes(deps, registry))
  app.use('/api', (_req, _res, next) => next(new HttpProblem(404, 'Not Found', 'no such route')))

  const dist = join(PROJECT_ROOT, 'dist')
  if (deps.serveClient && existsSync(dist)) {
    app.use(express.static(dist, { index: false, maxAge: '1h' }))
    const spa = Router()
    spa.get('/{*splat}', (_req, res) => res.sendFile(join(dist, 'index.html')))
    app.use(spa)
  }
  app.use(errorHandler)
  return Object.assign(app, { routeRegistry: registry })
}
