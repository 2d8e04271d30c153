import type { Response } from 'express'
import { rateLimit } from 'express-rate-limit'
import { z } from 'zod'
import type { AppDeps } from '../app.ts'
import { route, type Routes } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { DiagnosticsRequestSchema, SettingsSchema } from '../../shared/schemas/galaxy.schema.ts'
import { GalaxyResultSchema } from '../../shared/schemas/diagnostics-result.schema.ts'
import { METHOD_VERSION } from '../../shared/science.ts'
import { checkBatchRules } from '../services/galaxy-ingest.service.ts'
import { diagnoseJson, inProcessCompute } from '../compute/pool.ts'
import { DEFAULT_ANON_COMPUTE_BUDGET, DEFAULT_COMPUTE_BUDGET, GALAXY_COST, overBudget } from '../compute/budget.ts'
import { galaxyCountLimit } from './galaxies.routes.ts'

/** The per-address limit of anonymous calls to a stateless compute route (each route counts its own). */
export function anonymousComputeLimiter(config: Pick<AppDeps['config'], 'anonymousDiagnosticsRateLimit'>) {
  return rateLimit({
    windowMs: 60_000, limit: config.anonymousDiagnosticsRateLimit, standardHeaders: 'draft-8', legacyHeaders: false,
    skip: (req) => !!req.auth,
    handler: (_req, _res, next) => next(new HttpProblem(429, 'Too Many Requests', 'rate limit for anonymous use reached; send an API key', undefined, { 'Retry-After': '60' })),
  })
}

export function diagnosticsRoutes(r: Routes, deps: AppDeps) {
  const anonymousLimiter = anonymousComputeLimiter(deps.config)
  const compute = deps.compute ?? inProcessCompute()
  const { computeBudget, anonymousComputeBudget } = deps.config
  route(r, {
    method: 'post', path: '/diagnostics', operationId: 'runDiagnostics', tag: 'Diagnostics', access: 'optional',
    summary: 'Stateless diagnostics for up to 10,000 galaxies',
    description: 'Nothing is stored. Anonymous use is allowed at a lower rate and a smaller compute budget; send an API key or session for more. '
      + `A request costs galaxies × (monteCarlo.draws + ${GALAXY_COST}) compute units: by default at most ${DEFAULT_COMPUTE_BUDGET.toLocaleString('en-US')} with credentials `
      + `and ${DEFAULT_ANON_COMPUTE_BUDGET.toLocaleString('en-US')} without (COMPUTE_BUDGET, COMPUTE_ANON_BUDGET); more is a 422 at /settings/monteCarlo/draws. `
      + 'Every number in the answer is finite or null.',
    body: DiagnosticsRequestSchema, bodyParsing: { worker: 'diagnostics' }, rateLimit: anonymousLimiter, before: [galaxyCountLimit],
    bodyExample: { settings: { extinctionLaw: 'ccm89', rv: 3.1, intrinsicBalmer: 2.86, minSnr: 3 }, galaxies: [{ id: 'LNS-0000001', redshift: 0.05, fluxUnit: 1e-17, lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, oiii_5007: { upperLimit: 9 } }, ew: { halpha: 24.5 } }] },
    responses: {
      200: { description: 'results', schema: z.object({ methodVersion: z.string(), settings: SettingsSchema, results: z.array(GalaxyResultSchema) }) },
      413: { description: 'more than 10,000 galaxies' },
      422: { description: 'invalid values, with field paths; also galaxies × (draws + 10) over the caller\'s compute budget (path /settings/monteCarlo/draws, or /galaxies without Monte Carlo)' },
      503: { description: 'the compute queue is full, or the computation ran past the time budget (COMPUTE_TIMEOUT_S); with Retry-After' },
    },
  }, async (req, res, { body }) => {
    const { settings, galaxies } = body
    const anonymous = !req.auth
    const draws = settings.monteCarlo.draws
    const over = overBudget(galaxies.length, draws, anonymous ? anonymousComputeBudget : computeBudget,
      { anonymous, authenticatedBudget: computeBudget, path: draws > 0 ? '/settings/monteCarlo/draws' : '/galaxies' })
    if (over) throw new HttpProblem(422, 'Unprocessable Content', over.message, [over])
    const errors = checkBatchRules(galaxies, settings)
    if (errors.length) throw new HttpProblem(422, 'Unprocessable Content', `${errors.length} problem(s) in the request`, errors)
    const gone = new AbortController()
    res.on('close', () => { if (!res.writableEnded) gone.abort() })
    const results = await diagnoseJson(compute, galaxies, settings, { interactive: true, signal: gone.signal })
    sendJsonWithResults(res, { methodVersion: METHOD_VERSION, settings }, results)
  })
}

/**
 * Sends `{...head, results: [...]}` where the results arrive as JSON fragments from the compute
 * threads: the event loop writes the bytes without parsing or serialising them again.
 */
function sendJsonWithResults(res: Response, head: object, fragments: Uint8Array[]) {
  const open = Buffer.from(JSON.stringify(head).slice(0, -1) + ',"results":[')
  const comma = Buffer.from(','), close = Buffer.from(']}')
  const parts: Uint8Array[] = [open]
  fragments.forEach((f, i) => { if (i > 0) parts.push(comma); parts.push(f) })
  parts.push(close)
  res.status(200).setHeader('Content-Type', 'application/json; charset=utf-8')
  res.setHeader('Content-Length', String(parts.reduce((n, p) => n + p.byteLength, 0)))
  for (const p of parts) res.write(p)
  res.end()
}
