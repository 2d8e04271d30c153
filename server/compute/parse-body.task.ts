// Reading a bulk JSON body on a compute thread (server/compute/worker.mjs loads this file): for
// 10,000 galaxies JSON.parse, the zod validation and the request hash cost the event loop
// 0.3–0.9 s, during which nothing else is answered. Pure: the same function runs in-process.
import { createHash } from 'node:crypto'
import { serialize } from 'node:v8'
import type { z } from 'zod'
import { BatchRequestSchema, DiagnosticsRequestSchema, MAX_GALAXIES_PER_REQUEST } from '../../shared/schemas/galaxy.schema.ts'
import { fieldErrors } from '../http/parse-request.ts'
import type { FieldError } from '../http/problem.ts'

/** The bodies read this way, by name (a schema cannot be sent to a thread). */
export const BULK_SCHEMAS = { diagnostics: DiagnosticsRequestSchema, batch: BatchRequestSchema } as const satisfies Record<string, z.ZodType>
export type BulkSchemaName = keyof typeof BULK_SCHEMAS

/** Galaxies per chunk handed back: the event loop parses one chunk (≈ 3–6 ms) between other work. */
export const GALAXIES_PER_CHUNK = 500

export interface ParseBodyTask {
  kind: 'parse-body'
  schema: BulkSchemaName
  /** the body as sent (after Content-Encoding), UTF-8 */
  bytes: Uint8Array
  /**
   * Named wraps of the request hash: sha256(before + JSON.stringify(body) + after), as
   * `requestHash` in server/services/galaxy-ingest.service.ts computes it on the event loop.
   */
  hashes?: Record<string, readonly [string, string]>
}

export type ParseBodyOutput =
  | { failed: 'syntax' }
  | { failed: 'count'; count: number }
  | { failed: 'invalid'; errors: FieldError[] }
  | {
    failed?: undefined
    /** the validated body without its galaxies */
    rest: Record<string, unknown>
    /** the validated galaxies, in order: JSON text, or V8's serialisation where JSON would lose a −0 */
    chunks: Array<string | Uint8Array>
    hashes: Record<string, string>
  }

/** Decodes as body-parser does for charset utf-8 (iconv-lite: Node's UTF-8 decoder, a leading BOM dropped). */
export function decodeUtf8(bytes: Uint8Array): string {
  const text = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8')
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text
}

/** express.json with `strict: false`: an empty body is `{}`. */
export function parseJsonText(text: string): unknown {
  return text.length === 0 ? {} : JSON.parse(text)
}

/** The galaxy count that earns a 413 before validation (see galaxyCountLimit), or null. */
export function tooManyGalaxies(body: unknown): number | null {
  const g = (body as { galaxies?: unknown } | null)?.galaxies
  return Array.isArray(g) && g.length > MAX_GALAXIES_PER_REQUEST ? g.length : null
}

function hasNegativeZero(v: unknown): boolean {
  if (typeof v === 'number') return Object.is(v, -0)
  if (v !== null && typeof v === 'object') for (const k in v) if (hasNegativeZero((v as Record<string, unknown>)[k])) return true
  return false
}

export function parseBodyTask(task: ParseBodyTask): ParseBodyOutput {
  let body: unknown
  try {
    body = parseJsonText(decodeUtf8(task.bytes))
  } catch {
    return { failed: 'syntax' }
  }
  const count = tooManyGalaxies(body)
  if (count !== null) return { failed: 'count', count }
  const result = BULK_SCHEMAS[task.schema].safeParse(body)
  if (!result.success) return { failed: 'invalid', errors: fieldErrors(result.error.issues) }
  const { galaxies, ...rest } = result.data as { galaxies: unknown[] } & Record<string, unknown>
  const chunks: Array<string | Uint8Array> = []
  for (let i = 0; i < galaxies.length; i += GALAXIES_PER_CHUNK) {
    const part = galaxies.slice(i, i + GALAXIES_PER_CHUNK)
    chunks.push(hasNegativeZero(part) ? new Uint8Array(serialize(part)) : JSON.stringify(part))
  }
  return { rest, chunks, hashes: wrappedHashes(body, task.hashes ?? {}) }
}

/** One pass over the body's text per distinct prefix; the suffixes continue copies of that state. */
function wrappedHashes(body: unknown, wraps: Record<string, readonly [string, string]>): Record<string, string> {
  const out: Record<string, string> = {}
  const entries = Object.entries(wraps)
  if (entries.length === 0) return out
  const text = JSON.stringify(body)
  const byPrefix = new Map<string, ReturnType<typeof createHash>>()
  for (const [name, [before, after]] of entries) {
    let h = byPrefix.get(before)
    if (!h) byPrefix.set(before, h = createHash('sha256').update(before).update(text))
    out[name] = h.copy().update(after).digest('hex')
  }
  return out
}
