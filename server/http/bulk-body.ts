import express, { type Request, type RequestHandler } from 'express'
import { deserialize } from 'node:v8'
import type { ComputePool } from '../compute/pool.ts'
import { decodeUtf8, parseJsonText, type BulkSchemaName, type ParseBodyOutput } from '../compute/parse-body.task.ts'
import { HttpProblem } from './problem.ts'
import { invalidValues } from './parse-request.ts'

declare module 'express-serve-static-core' {
  /** A bulk body read on a compute thread (see bulkJsonBodies); `req.body` is then undefined. */
  interface Request { bulkBody?: ParseBodyOutput }
}

/** Bodies smaller than this are parsed on the event loop as before (≈ 100 galaxies, a few ms): a thread hop costs more. */
export const BULK_INLINE_BYTES = 64 * 1024

export interface BulkRoute {
  method: string
  /** the Express path, relative to /api/v1 */
  path: string
  pattern: RegExp
  schema: BulkSchemaName
  hashes?: Record<string, readonly [string, string]>
}

/** A bulk route with the pattern that finds it by request path; route() adds it to the app's registry. */
export function bulkRoute(r: Omit<BulkRoute, 'pattern'>): BulkRoute {
  // a path parameter is one segment; Express's own matching still decides which route answers
  const pattern = new RegExp('^' + r.path.split('/').map((s) => (s.startsWith(':') ? '[^/]+' : s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'))).join('/') + '/?$', 'i')
  return { ...r, pattern }
}

export const notJson = () => new HttpProblem(400, 'Bad Request', 'the body is not valid JSON')

/**
 * A JSON media type whose charset is UTF-8 (said or implied): then express.json would decode the
 * bytes as UTF-8, and so can a compute thread. Anything else goes through express.json itself.
 */
function plainUtf8Json(req: Request, types: string[]) {
  if (!req.is(types)) return false
  const params = String(req.headers['content-type']).split(';').slice(1).map((p) => p.trim()).filter((p) => p !== '')
  return params.length === 0 || (params.length === 1 && /^charset="?utf-8"?$/i.test(params[0]))
}

/**
 * The JSON body parser of /api/v1 for every route, with the same limit, media types, encodings and
 * 4xx answers as express.json; the bodies of `bulkRoutes` above BULK_INLINE_BYTES are read as bytes
 * and handed to a compute thread, which parses, counts, validates and hashes them (the event loop
 * then only waits). Runs where express.json ran, before authentication, so a body that is not
 * JSON is still a 400 whoever sends it.
 */
export function jsonBodies(compute: ComputePool, bulkRoutes: readonly BulkRoute[], opts: { limit: string; type: string[] }): RequestHandler {
  const json = express.json({ limit: opts.limit, strict: false, type: opts.type })
  const raw = express.raw({ limit: opts.limit, type: opts.type })
  return (req, res, next) => {
    const bulk = req.method === 'POST' ? bulkRoutes.find((b) => b.method === 'post' && b.pattern.test(req.path)) : undefined
    if (!bulk || !plainUtf8Json(req, opts.type)) { json(req, res, next); return }
    raw(req, res, (err?: unknown) => {
      if (err) { next(err); return }
      const bytes: unknown = req.body
      if (!Buffer.isBuffer(bytes)) { next(); return }
      req.body = undefined
      if (bytes.byteLength < BULK_INLINE_BYTES || compute.closed) {
        try { req.body = parseJsonText(decodeUtf8(bytes)) } catch { next(notJson()); return }
        next()
        return
      }
      const client = new AbortController()
      const onClose = () => { if (!res.writableEnded) client.abort() }
      res.on('close', onClose)
      compute.parseBody({ schema: bulk.schema, bytes, hashes: bulk.hashes }, client.signal).then((out) => {
        res.off('close', onClose)
        if (out.failed === 'syntax') { next(notJson()); return }
        req.bulkBody = out
        next()
      }, (e: unknown) => {
        res.off('close', onClose)
        next(e)
      })
    })
  }
}

/**
 * The validated body of a bulk request read on a compute thread: the 422 of its field errors, or
 * the value with its galaxies parsed back one chunk per turn of the event loop.
 */
export async function bulkValue(out: ParseBodyOutput): Promise<unknown> {
  if (out.failed === 'invalid') throw invalidValues(out.errors)
  if (out.failed !== undefined) throw new Error(`bulk body not handled before validation: ${out.failed}`)
  const items: unknown[] = []
  for (const chunk of out.chunks) {
    await new Promise((ok) => setImmediate(ok))
    const part = (typeof chunk === 'string' ? JSON.parse(chunk) : deserialize(chunk)) as unknown[]
    for (const g of part) items.push(g)
  }
  return { ...out.rest, [out.items]: items }
}
