import { Router } from 'express'
import { buildOpenApi } from '../http/openapi.ts'
import type { RouteRegistry } from '../http/route.ts'

/** GET /api/openapi.json: the document of this app's routes, built on first demand (every route is mounted by then). */
export function openapiRoutes(registry: RouteRegistry): Router {
  const router = Router()
  let cached: string | undefined
  router.get('/openapi.json', (_req, res) => { res.type('application/json').send(cached ??= JSON.stringify(buildOpenApi(registry.specs))) })
  return router
}
