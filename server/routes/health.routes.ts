import { Router } from 'express'
import { sql } from 'drizzle-orm'
import { z } from 'zod'
import type { Db } from '../db/client.ts'
import { APP_VERSION } from '../lib/version.ts'

export const HealthSchema = z.object({
  status: z.enum(['ok', 'degraded']), db: z.enum(['ok', 'unavailable']), version: z.string(),
}).meta({ id: 'Health' })

export function healthRoutes(db: Db): Router {
  const router = Router()
  router.get('/health', async (_req, res) => {
    try {
      await db.execute(sql`select 1`)
      res.json({ status: 'ok', db: 'ok', version: APP_VERSION } satisfies z.output<typeof HealthSchema>)
    } catch {
      res.status(503).setHeader('Retry-After', '5')
      res.json({ status: 'degraded', db: 'unavailable', version: APP_VERSION } satisfies z.output<typeof HealthSchema>)
    }
  })
  return router
}
