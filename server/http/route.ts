import type { Request, Response, Router } from 'express'
import type { z } from 'zod'
import { parseRequest } from './parse-request.ts'
import { BULK_SCHEMAS, type BulkSchemaName } from '../compute/parse-body.task.ts'
import { bulkValue, registerBulkRoute } from './bulk-body.ts'

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete'
export type Access = 'public' | 'optional' | 'user' | 'admin' | 'viewer' | 'analyst' | 'owner'

export interface ResponseSpec {
  description: string; schema?: z.ZodType; contentType?: string; example?: unknown
  /** other representations of the same answer, chosen by the Accept header */
  alternatives?: Array<{ contentType: string; description: string }>
}

export interface RouteSpec<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType> {
  method: Method
  /** Express path relative to /api/v1, e.g. /projects/:projectId */
  path: string
  summary: string
  description?: string
  tag: string
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
  responses: Record<number, ResponseSpec>
}

export interface Parsed<P, Q, B> {
  params: P; query: Q; body: B
  /** the hashes `bodyParsing.hashes` asked for, when the body was read on a compute thread */
  bodyHashes?: Record<string, string>
}

export type AnySpec = RouteSpec<z.ZodType, z.ZodType, z.ZodType>

/** Everything registered, in order: the OpenAPI document is built from this list. */
export const ROUTES: AnySpec[] = []

/**
 * Mounts a handler and records its schemas for the OpenAPI document, so the two cannot drift.
 * Parsing of path, query and body happens here; handlers receive typed values.
 */
export function route<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType>(
  router: Router,
  spec: RouteSpec<P, Q, B>,
  guard: (spec: AnySpec) => (req: Request, res: Response, next: (err?: unknown) => void) => void,
  handler: (req: Request, res: Response, input: Parsed<z.output<P>, z.output<Q>, z.output<B>>) => Promise<unknown> | unknown,
) {
  if (!ROUTES.some((r) => r.method === spec.method && r.path === spec.path)) ROUTES.push(spec as never)
  if (spec.bodyParsing) {
    if (BULK_SCHEMAS[spec.bodyParsing.worker] !== (spec.body as z.ZodType | undefined)) throw new Error(`${spec.method} ${spec.path}: bodyParsing names another schema than body`)
    registerBulkRoute({ method: spec.method, path: spec.path, schema: spec.bodyParsing.worker, hashes: spec.bodyParsing.hashes })
  }
  router[spec.method](spec.path, guard(spec as AnySpec), async (req: Request, res: Response) => {
    const params = (spec.params ? parseRequest(spec.params, req.params) : req.params) as z.output<P>
    const query = (spec.query ? parseRequest(spec.query, req.query) : {}) as z.output<Q>
    const bulk = spec.body ? req.bulkBody : undefined
    const body = (bulk ? await bulkValue(bulk) : spec.body ? parseRequest(spec.body, req.body) : undefined) as z.output<B>
    const input: Parsed<z.output<P>, z.output<Q>, z.output<B>> = { params, query, body }
    if (bulk && bulk.failed === undefined) input.bodyHashes = bulk.hashes
    await handler(req, res, input)
  })
}
