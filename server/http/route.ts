import type { Request, RequestHandler, Response, Router } from 'express'
import type { z } from 'zod'
import { parseRequest } from './parse-request.ts'
import { BULK_SCHEMAS, type BulkSchemaName } from '../compute/parse-body.task.ts'
import { bulkRoute, bulkValue, type BulkRoute } from './bulk-body.ts'
import type { Tag } from './openapi.ts'

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete'
export type Access = 'public' | 'optional' | 'user' | 'admin' | 'viewer' | 'analyst' | 'owner'

export interface ResponseSpec {
  description: string
  /** The body's zod schema (its output side is documented); JSON unless `contentType` says otherwise. */
  schema?: z.ZodType
  /** Another media type; without `schema` the body is documented as text (`text/*`, `+xml`) or binary. */
  contentType?: string
  example?: unknown
  /** other representations of the same answer, chosen by the Accept header (documented as binary) */
  alternatives?: Array<{ contentType: string; description: string }>
}

export interface RouteSpec<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType> {
  method: Method
  /** Express path relative to /api/v1, e.g. /projects/:projectId */
  path: string
  /** camelCase and unique, verb first: what client generators name the call (`listGalaxies`) */
  operationId: string
  summary: string
  description?: string
  tag: Tag
  access: Access
  /** Whether a read-only API key may call it (GETs) or a write key is needed. */
  write?: boolean
  params?: P
  query?: Q
  body?: B
  bodyContentType?: string
  /**
   * Bulk bodies: above a small size they are parsed, validated (the schema BULK_SCHEMAS names, which
   * must be `body`) and hashed on a compute thread instead of the event loop (server/http/bulk-body.ts).
   * `hashes` are the request hashes the handler may need, as sha256(before + JSON of the body + after).
   */
  bodyParsing?: { worker: BulkSchemaName; hashes?: Record<string, readonly [string, string]> }
  bodyExample?: unknown
  headers?: Array<{ name: string; description: string; required?: boolean }>
  /** A rate limiter, run before the access guard so that refused attempts count too. */
  rateLimit?: RequestHandler
  /** Middleware run after the access guard and before the input is parsed (upload readers, size checks). */
  before?: RequestHandler[]
  responses: Record<number, ResponseSpec>
}

export interface Parsed<P, Q, B> {
  params: P; query: Q; body: B
  /** the hashes `bodyParsing.hashes` asked for, when the body was read on a compute thread */
  bodyHashes?: Record<string, string>
}

export type AnySpec = RouteSpec<z.ZodType, z.ZodType, z.ZodType>

/** One app's routes as registered, in order: its OpenAPI document and its bulk-body reader come from here. */
export interface RouteRegistry {
  readonly specs: AnySpec[]
  /** routes whose large bodies are read on a compute thread (`bodyParsing`) */
  readonly bulk: BulkRoute[]
}

export const routeRegistry = (): RouteRegistry => ({ specs: [], bulk: [] })

/** Where route modules mount their routes: one app's router, its access guard and its registry. */
export interface Routes {
  router: Router
  guard: (spec: AnySpec) => RequestHandler
  registry: RouteRegistry
}

/**
 * Mounts a handler and records its schemas for the OpenAPI document, so the two cannot drift.
 * The chain is: `rateLimit`, the access guard, `before`, then parsing of path, query and body;
 * handlers receive typed values.
 */
export function route<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType>(
  r: Routes,
  spec: RouteSpec<P, Q, B>,
  handler: (req: Request, res: Response, input: Parsed<z.output<P>, z.output<Q>, z.output<B>>) => Promise<unknown> | unknown,
) {
  const any = spec as unknown as AnySpec
  if (r.registry.specs.some((s) => s.method === spec.method && s.path === spec.path)) throw new Error(`${spec.method} ${spec.path} is registered twice`)
  r.registry.specs.push(any)
  if (spec.bodyParsing) {
    if (BULK_SCHEMAS[spec.bodyParsing.worker] !== (spec.body as z.ZodType | undefined)) throw new Error(`${spec.method} ${spec.path}: bodyParsing names another schema than body`)
    r.registry.bulk.push(bulkRoute({ method: spec.method, path: spec.path, schema: spec.bodyParsing.worker, hashes: spec.bodyParsing.hashes }))
  }
  const chain = [...(spec.rateLimit ? [spec.rateLimit] : []), r.guard(any), ...(spec.before ?? [])]
  r.router[spec.method](spec.path, ...chain, async (req: Request, res: Response) => {
    const params = (spec.params ? parseRequest(spec.params, req.params) : req.params) as z.output<P>
    const query = (spec.query ? parseRequest(spec.query, req.query) : {}) as z.output<Q>
    const bulk = spec.body ? req.bulkBody : undefined
    const body = (bulk ? await bulkValue(bulk) : spec.body ? parseRequest(spec.body, req.body) : undefined) as z.output<B>
    const input: Parsed<z.output<P>, z.output<Q>, z.output<B>> = { params, query, body }
    if (bulk && bulk.failed === undefined) input.bodyHashes = bulk.hashes
    await handler(req, res, input)
  })
}
