import type { NextFunction, Request, Response } from 'express'
import { z } from 'zod'
import type { RouteDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { galaxiesService } from '../services/galaxy-queries.service.ts'
import { ingestBatch, requestHash } from '../services/galaxy-ingest.service.ts'
import { diagramDocument, writingGalaxies } from '../services/diagrams.service.ts'
import { binaryDiagram, gzippedDiagram } from '../services/diagram-cache.ts'
import { BatchRequestSchema, MAX_GALAXIES_PER_REQUEST } from '../../shared/schemas/galaxy.schema.ts'
import { GalaxyListQuerySchema, DiagramQuerySchema } from '../../shared/schemas/query.schema.ts'
import { BatchResponseSchema, GalaxyPathSchema, GalaxyRevisionPathSchema, ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import { GalaxyDetailSchema, GalaxyPageSchema, GalaxyRevisionResultsSchema } from '../../shared/results/responses.ts'
import { OnExistingSchema } from '../../shared/schemas/intake.schema.ts'
import { DIAGRAM_COLUMNS_TYPE } from '../../shared/diagram-columns.ts'
import { DiagramColumnsSchema } from '../../shared/schemas/diagram.schema.ts'
import { isCleanText } from '../../shared/schemas/text.ts'
import { tooManyGalaxies } from '../compute/parse-body.task.ts'

/**
 * The request hash of each onExisting, as `requestHash` below makes it: the body alone for replace,
 * else `{"body":…,"onExisting":…}` (JSON.stringify writes exactly these bytes around the body).
 */
export const BATCH_HASHES = Object.fromEntries(OnExistingSchema.options.map((o) =>
  [o, o === 'replace' ? ['', ''] as const : ['{"body":', `,"onExisting":${JSON.stringify(o)}}`] as const]))

const BatchQuerySchema = z.object({
  onExisting: OnExistingSchema.default('replace').meta({ description: 'IDs the project has: replace (the default upsert), skip, or merge (keep stored lines, overlay the new ones); replaced records stay retrievable' }),
})

/** 413 before validation when a request carries more galaxies than one request may. */
export function galaxyCountLimit(req: Request, _res: Response, next: NextFunction) {
  const n = req.bulkBody ? (req.bulkBody.failed === 'count' ? req.bulkBody.count : null) : tooManyGalaxies(req.body)
  if (n !== null) {
    return next(new HttpProblem(413, 'Content Too Large', `at most ${MAX_GALAXIES_PER_REQUEST} galaxies per request, got ${n}`,
      [{ path: '/galaxies', message: `at most ${MAX_GALAXIES_PER_REQUEST} items` }]))
  }
  next()
}

export function galaxiesRoutes(r: Routes, deps: RouteDeps) {
  const galaxies = galaxiesService(deps.db)
  const tag = 'Galaxies'

  route(r, {
    method: 'post', path: '/projects/:projectId/galaxies/batch', operationId: 'ingestGalaxyBatch', tag, access: 'analyst', write: true,
    summary: 'Ingest up to 10,000 galaxies: upsert by ID, all or nothing, idempotent',
    description: 'Each request is one intake. With an `Idempotency-Key` header, a resend of the same body returns the first answer; the same key with another body answers 409. On any invalid row nothing is stored and the 422 lists every problem with a JSON Pointer.',
    params: ProjectPathSchema, body: BatchRequestSchema, query: BatchQuerySchema, bodyParsing: { worker: 'batch', hashes: BATCH_HASHES }, before: [galaxyCountLimit],
    headers: [{ name: 'Idempotency-Key', description: 'any string up to 200 characters; makes a resend safe' }],
    bodyExample: { galaxies: [{ id: 'LNS-0000001', redshift: 0.05, lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, nii_6584: { flux: 90, error: 4 }, oiii_5007: { upperLimit: 9 } }, ew: { halpha: 24.5 } }] },
    responses: { 200: { description: 'stored', schema: BatchResponseSchema }, 409: { description: 'idempotency conflict' }, 413: { description: 'more than 10,000 galaxies' }, 422: { description: 'invalid rows; nothing stored' } },
  }, async (req, res, { params, body, query, bodyHashes }) => {
    const key = req.get('idempotency-key')
    if (key !== undefined && (key.length === 0 || key.length > 200 || !isCleanText(key))) throw new HttpProblem(422, 'Unprocessable Content', 'Idempotency-Key must be 1–200 characters without control characters', [{ path: '/headers/Idempotency-Key', message: '1–200 characters without control characters' }])
    // another onExisting is another request: a resend with the same key and body but, say, merge must not replay a replace
    const hash = bodyHashes ? bodyHashes[query.onExisting]
      : requestHash(query.onExisting === 'replace' ? req.body : { body: req.body, onExisting: query.onExisting })
    const out = await writingGalaxies(deps.galaxy, params.projectId, () => ingestBatch(deps.galaxy, requireAuth(req), params.projectId, body.galaxies, key, hash, query.onExisting))
    if (out.replay) res.setHeader('Idempotent-Replayed', 'true')
    res.json(out.body)
  })

  route(r, {
    method: 'get', path: '/projects/:projectId/galaxies', operationId: 'listGalaxies', tag, access: 'viewer', summary: 'A page of galaxies with results (filters, sort, cursor)',
    params: ProjectPathSchema, query: GalaxyListQuerySchema, responses: { 200: { description: 'a page; pass nextCursor as cursor for the next', schema: GalaxyPageSchema } },
  }, async (_req, res, { params, query }) => { res.json(await galaxies.list(params.projectId, query)) })

  route(r, {
    method: 'get', path: '/projects/:projectId/galaxies/:galaxyId', operationId: 'getGalaxy', tag, access: 'viewer', summary: 'One galaxy: inputs, results, flags, intake history, revisions',
    params: GalaxyPathSchema, responses: { 200: { description: 'the galaxy', schema: GalaxyDetailSchema } },
  }, async (_req, res, { params }) => { res.json(await galaxies.getOne(params.projectId, params.galaxyId)) })

  route(r, {
    method: 'get', path: '/projects/:projectId/galaxies/:galaxyId/results/:revision', operationId: 'getGalaxyResults', tag, access: 'viewer', summary: 'A galaxy\'s results under one assumptions revision',
    params: GalaxyRevisionPathSchema, responses: { 200: { description: 'results of that revision', schema: GalaxyRevisionResultsSchema } },
  }, async (_req, res, { params }) => {
    const g = await galaxies.getOne(params.projectId, params.galaxyId, params.revision)
    res.json({ revision: g.revision, methodVersion: g.methodVersion, computedAt: g.computedAt, results: g.results })
  })

  route(r, {
    method: 'get', path: '/projects/:projectId/diagram', operationId: 'getDiagram', tag: 'Diagrams', access: 'viewer',
    summary: 'Columnar diagram data (IDs, x per diagram, y, classes as codes, errors, limit markers)',
    description: 'Arrays are aligned by index. `class.*` are integer codes into `classNames.*`. `xLimit.*`/`yLimit`: 0 measured, 1 upper limit, −1 lower limit.',
    params: ProjectPathSchema, query: DiagramQuerySchema,
    responses: { 200: { description: 'columnar arrays', schema: DiagramColumnsSchema, alternatives: [{ contentType: DIAGRAM_COLUMNS_TYPE, description: 'the same columns in binary: "RGD1", a u32 header length, a JSON header (revision, count, ids, classNames, column table) and little-endian Float32 / Int8 columns at 4-byte boundaries (shared/diagram-columns.ts); ask with Accept' }] } },
  }, async (req, res, { params, query }) => {
    const doc = await diagramDocument(deps.galaxy, params.projectId, query)
    const binary = req.accepts(['application/json', DIAGRAM_COLUMNS_TYPE]) === DIAGRAM_COLUMNS_TYPE
    // each representation has its own validator, so a cache never answers one with the other
    res.setHeader('ETag', binary ? doc.etag.replace(/^"d/, '"b') : doc.etag)
    res.setHeader('Cache-Control', 'private, no-cache') // revalidate: the answer is 304 while nothing changed
    res.setHeader('Vary', 'Accept, Accept-Encoding')
    if (req.fresh) { res.status(304).end(); return }
    const gzip = req.acceptsEncodings('gzip', 'identity') === 'gzip'
    if (gzip) res.setHeader('Content-Encoding', 'gzip')
    if (binary) { res.type(DIAGRAM_COLUMNS_TYPE); res.send(binaryDiagram(doc, gzip)); return }
    res.type('application/json')
    res.send(gzip ? gzippedDiagram(doc) : doc.body)
  })
}
