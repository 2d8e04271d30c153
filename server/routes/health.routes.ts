import { Router } from 'express'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { APP_VERSION } from '../lib/version.ts'

export function healthRoutes(db: Db): Router {
  const router = Router()
  router.get('/health', async (_req, res) => {
    try {
      await db.execute(sql`select 1`)
      res.json({ status: 'ok', db: 'ok', version: APP_VERSION })
    } catch {
      res.status(503).setHeader('Retry-After', '5')
      res.json({ status: 'degraded', db: 'unavailable', version: APP_VERSION })
    }
  })
  return router
}
