import type { ErrorRequestHandler } from 'express'
import { STATUS_CODES } from 'node:http'
import { HttpProblem, unavailable } from './problem.ts'
import { logger } from '../lib/logger.ts'

const DB_DOWN_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', '57P01', '57P02', '57P03', '08000', '08001', '08003', '08006', '53300'])

/** True for errors that mean "the database is not reachable right now" rather than a bug. */
export function isDatabaseUnavailable(err: unknown): boolean {
  if (!err || typeof err !== 'object') return false
  const e = err as { code?: string; message?: string; cause?: unknown }
  if (e.code && DB_DOWN_CODES.has(e.code)) return true
  const m = e.message ?? ''
  if (/Connection terminated|Cannot use a pool after calling end|not queryable|Client was closed|server closed the connection|connection timeout|timeout exceeded when trying to connect|the database system is (starting up|shutting down)|terminating connection/i.test(m)) return true
  return e.cause ? isDatabaseUnavailable(e.cause) : false
}

interface HttpError { type?: string; status?: number; statusCode?: number; expose?: boolean; message?: string }

function fromBodyParser(err: HttpError, contentEncoding: string | undefined): HttpProblem | null {
  if (err.type === 'entity.parse.failed') return new HttpProblem(400, 'Bad Request', 'the body is not valid JSON')
  if (err.type === 'entity.too.large') return new HttpProblem(413, 'Content Too Large', 'the body is larger than the limit')
  if (err.type === 'encoding.unsupported' || err.type === 'charset.unsupported') return new HttpProblem(415, 'Unsupported Media Type', 'unsupported body encoding')
  if (err.type === 'request.aborted') return new HttpProblem(400, 'Bad Request', 'the request was aborted')
  // body-parser types every failure of its own; a 400 without a type is its decompression stream's
  // error (zlib, brotli), which only a body sent with a Content-Encoding can meet
  const encoded = contentEncoding !== undefined && contentEncoding.toLowerCase() !== 'identity'
  if (encoded && err.type === undefined && (err.status ?? err.statusCode) === 400 && !(err instanceof URIError)) {
    return new HttpProblem(400, 'Bad Request', `the body is not valid ${contentEncoding} data, as its Content-Encoding header says`)
  }
  return null
}

/**
 * Errors raised below our code with an HTTP status of their own (body parsing, the router's
 * percent-decoding of path parameters): the client's fault, so a 4xx problem, never a 500.
 */
function fromHttpError(err: HttpError): HttpProblem | null {
  const status = err.status ?? err.statusCode
  if (typeof status !== 'number' || status < 400 || status > 499) return null
  if (err instanceof URIError) return new HttpProblem(400, 'Bad Request', 'the URL path is not valid percent-encoded UTF-8')
  return new HttpProblem(status, STATUS_CODES[status] ?? 'Bad Request', err.expose !== false && err.message ? err.message : undefined)
}

export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const e = (err ?? {}) as HttpError
  let known = err instanceof HttpProblem ? err : fromBodyParser(e, req.headers['content-encoding']) ?? fromHttpError(e)
  if (!known && isDatabaseUnavailable(err)) known = unavailable()
  if (!known) logger.error({ err, method: req.method, url: req.path }, 'unhandled error')
  const p = known ?? new HttpProblem(500, 'Internal Server Error', 'an unexpected error; it has been logged')
  if (res.headersSent) { res.destroy(); return }
  for (const [k, v] of Object.entries(p.headers)) res.setHeader(k, v)
  res.status(p.status).type('application/problem+json')
    .send(JSON.stringify({ type: p.type, title: p.title, status: p.status, detail: p.detail ?? p.title, errors: p.errors ?? [] }))
}
