// Reading a bulk JSON body on a compute thread (server/compute/worker.mjs loads this file): for
// 10,000 galaxies JSON.parse, the zod validation and the request hash cost the event loop
// 0.3–0.9 s, during which nothing else is answered. Pure: the same function runs in-process.
import { createHash } from 'node:crypto'
import { serialize } from 'node:v8'
import type { z } from 'zod'
import { BatchRequestSchema, DiagnosticsRequestSchema, MAX_GALAXIES_PER_REQUEST } from '../../shared/schemas/galaxy.schema.ts'
import { SpectraFitRequestSchema, spectraOverLimit } from '../../shared/schemas/spectra.schema.ts'
import { fieldErrors } from '../http/parse-request.ts'
import type { FieldError } from '../http/problem.ts'

/** The bodies read this way, by name (a schema cannot be sent to a thread). */
export const BULK_SCHEMAS = { diagnostics: DiagnosticsRequestSchema, batch: BatchRequestSchema, spectraFit: SpectraFitRequestSchema } as const satisfies Record<string, z.ZodType>
export type BulkSchemaName = keyof typeof BULK_SCHEMAS

/** The array of each bulk body that is handed back in chunks, and how many of its items make a chunk. */
const BULK_ITEMS: Record<BulkSchemaName, { key: 'galaxies' | 'spectra'; perChunk: number }> = {
  diagnostics: { key: 'galaxies', perChunk: 500 }, batch: { key: 'galaxies', perChunk: 500 },
  // a spectrum of 50,000 pixels is ≈ 1.5 MB of JSON: one a chunk keeps each parse to a few ms
  spectraFit: { key: 'spectra', perChunk: 1 },
}

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
  /** a size limit other than the galaxy count (spectra, pixels): 413 before validation */
  | { failed: 'too-large'; path: string; message: string }
  | { failed: 'invalid'; errors: FieldError[] }
  | {
    failed?: undefined
    /** the validated body without its items */
    rest: Record<string, unknown>
    /** the member the items go back into */
    items: 'galaxies' | 'spectra'
    /** the validated items, in order: JSON text, or V8's serialisation where JSON would lose a −0 */
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
  const { key, perChunk } = BULK_ITEMS[task.schema]
  if (key === 'galaxies') {
    const count = tooManyGalaxies(body)
    if (count !== null) return { failed: 'count', count }
  } else {
    const over = spectraOverLimit(body)
    if (over) return { failed: 'too-large', ...over }
  }
  const result = BULK_SCHEMAS[task.schema].safeParse(body)
  if (!result.success) return { failed: 'invalid', errors: fieldErrors(result.error.issues) }
  const { [key]: items, ...rest } = result.data as Record<string, unknown[]>
  const chunks: Array<string | Uint8Array> = []
  for (let i = 0; i < items!.length; i += perChunk) {
    const part = items!.slice(i, i + perChunk)
    chunks.push(hasNegativeZero(part) ? new Uint8Array(serialize(part)) : JSON.stringify(part))
  }
  return { rest, items: key, chunks, hashes: wrappedHashes(body, task.hashes ?? {}) }
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
