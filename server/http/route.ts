import type { Request, Response, Router } from 'express'
import type { z } from 'zod'
import { parseRequest } from './parse-request.ts'

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
  bodyExample?: unknown
  headers?: Array<{ name: string; description: string; required?: boolean }>
  responses: Record<number, ResponseSpec>
}

export interface Parsed<P, Q, B> { params: P; query: Q; body: B }

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
  router[spec.method](spec.path, guard(spec as AnySpec), async (req: Request, res: Response) => {
    const input = {
      params: (spec.params ? parseRequest(spec.params, req.params) : req.params) as z.output<P>,
      query: (spec.query ? parseRequest(spec.query, req.query) : {}) as z.output<Q>,
      body: (spec.body ? parseRequest(spec.body, req.body) : undefined) as z.output<B>,
    }
    await handler(req, res, input)
  })
}
