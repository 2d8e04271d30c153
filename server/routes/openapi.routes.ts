import { Router } from 'express'
import { buildOpenApi } from '../http/openapi.ts'

export function openapiRoutes(): Router {
  const router = Router()
  let cached: string | undefined
  router.get('/openapi.json', (_req, res) => { res.type('application/json').send(cached ??= JSON.stringify(buildOpenApi())) })
  return router
}
