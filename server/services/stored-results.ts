// Reading results back: the typed columns of a `results` row made into the document the science
// chain would have built (shared/results/stored-row.ts), and the layouts that name their elements.
import { createHash } from 'node:crypto'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { prepareSettings, type PreparedSettings } from '../../shared/diagnostics/kernel.ts'
import { buildResult } from '../../shared/diagnostics/pipeline.ts'
import { CURRENT_LAYOUT, asReal, classFractionsOf, codesOf, decodeStored, fitsReal, layoutReader, measuresOf, percentilesOf, type DecodedRow, type LayoutReader, type StoredLayout } from '../../shared/results/stored-row.ts'
import { rowFromDocument } from '../../shared/results/document-map.ts'
import type { GalaxyResult } from '../../shared/science.ts'
import { revisionSettings } from './projects.service.ts'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx

/** The current layout's fingerprint (its element names). */
export const LAYOUT_FINGERPRINT = createHash('sha256').update(JSON.stringify(CURRENT_LAYOUT)).digest('hex').slice(0, 32)

/** Records the current layout (at start-up, after the migrations: outside any long transaction). */
export async function registerLayout(db: Executor): Promise<number> {
  await db.execute(sql`insert into result_layouts (fingerprint, spec) values (${LAYOUT_FINGERPRINT}, ${JSON.stringify(CURRENT_LAYOUT)}::jsonb) on conflict (fingerprint) do nothing`)
  return currentLayoutId(db)
}

/** Id of the current layout in this database (registered by `registerLayout`). */
export async function currentLayoutId(db: Executor): Promise<number> {
  const { rows } = await db.execute<{ id: number }>(sql`select id from result_layouts where fingerprint = ${LAYOUT_FINGERPRINT}`)
  if (rows[0]) return rows[0].id
  return registerLayout(db)
}

/** The columns a reader needs of `results r` (the select list, then the row shape). */
export const STORED_SELECT = sql.raw('r.revision, r.layout, r.measures, r.measures_exact, r.codes, r.mc_percentiles, r.mc_classes, r.result')
export interface StoredColumns {
  revision: number
  layout: number | null
  measures: Array<number | null> | null
  measures_exact: Array<number | null> | null
  codes: Uint8Array | null
  mc_percentiles: Array<number | null> | null
  mc_classes: Array<number | null> | null
  result: unknown
}

/** Turns stored rows of one project into documents (prepared for the revisions it will be given). */
export interface DocumentReader {
  document(key: string, row: StoredColumns): GalaxyResult | null
  /** the prepared settings of one of its revisions */
  prepared(revision: number): PreparedSettings | undefined
}

/**
 * A reader for rows of the given revisions of a project: loads the layouts and each revision's
 * settings once, then builds documents synchronously (exports stream millions through it).
 */
export async function documentReader(db: Executor, projectId: string, revisions: Iterable<number>): Promise<DocumentReader> {
  const layouts = new Map<number, LayoutReader>()
  for (const r of (await db.execute<{ id: number; spec: StoredLayout }>(sql`select id, spec from result_layouts`)).rows) layouts.set(r.id, layoutReader(r.spec))
  const preps = new Map<number, PreparedSettings>()
  for (const revision of new Set(revisions)) preps.set(revision, prepareSettings((await revisionSettings(db, projectId, revision)).settings))
  let scratch: DecodedRow | undefined
  return {
    prepared: (revision) => preps.get(revision),
    document(key, row) {
      if (row.measures === null || row.codes === null || row.layout === null) return (row.result ?? null) as GalaxyResult | null
      const reader = layouts.get(row.layout)
      const prep = preps.get(row.revision)
      if (!reader || !prep) throw new Error(`result of revision ${row.revision} read without its layout or settings`)
      scratch = decodeStored(key, { measures: row.measures, measuresExact: row.measures_exact, codes: row.codes, mcPercentiles: row.mc_percentiles, mcClasses: row.mc_classes }, reader, prep.settings.monteCarlo.draws, scratch)
      return buildResult(scratch.input, scratch.out, 0, prep, scratch.mc)
    },
  }
}

// ── documents stored before the typed columns ────────────────────────────────────────────────────

/** Relative agreement of a rebuilt document with the stored one: float4 keeps 24 bits (≈ 6·10⁻⁸). */
const SAME_WITHIN = 1e-6

/** Whether two documents agree: the same keys and values, numbers within float4 precision. */
export function sameDocument(a: unknown, b: unknown): boolean {
  if (typeof a === 'number' && typeof b === 'number') {
    const fa = Math.fround(a) // a value beyond float4's range saturates in storage
    return a === b || Math.abs(a - b) <= SAME_WITHIN * Math.max(Math.abs(a), Math.abs(b)) || (!Number.isFinite(fa) && Math.abs(b) >= 3.4e38)
  }
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return a === b
  if (Array.isArray(a) !== Array.isArray(b)) return false
  const ka = Object.keys(a).filter((k) => (a as Record<string, unknown>)[k] !== undefined)
  const kb = Object.keys(b).filter((k) => (b as Record<string, unknown>)[k] !== undefined)
  if (ka.length !== kb.length) return false
  return ka.every((k) => k in b && sameDocument((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]))
}

const MIGRATION_LOCK = 0x52475452 // "RGTR": one process converts at a time
const MIGRATION_CHUNK = 2000

/**
 * Turns results stored as documents into typed columns: each document becomes the kernel row it was
 * built from (shared/results/document-map.ts) and is converted only when that row rebuilds to the
 * same document (numbers within float4 precision); the others (another method version's documents)
 * stay as they are and are read as before. Resumable and safe beside other processes (an advisory
 * lock, one chunk per transaction). Returns how many rows were converted and kept.
 */
export async function convertStoredDocuments(db: Db, log?: (m: string) => void, signal?: AbortSignal): Promise<{ converted: number; kept: number }> {
  const client = await db.$client.connect()
  let converted = 0, kept = 0
  try {
    const { rows: [lock] } = await client.query<{ ok: boolean }>('select pg_try_advisory_lock($1) as ok', [MIGRATION_LOCK])
    if (!lock.ok) return { converted, kept }
    try {
      const { rows: [{ n }] } = await client.query<{ n: number }>('select count(*)::int as n from results where measures is null and result is not null')
      if (n === 0) return { converted, kept }
      log?.(`converting ${n} stored result documents to typed columns`)
      const layoutId = await currentLayoutId(db)
      const readers = new Map<string, DocumentReader>()
      let after: [number, number] = [0, 0]
      while (!signal?.aborted) {
        const { rows } = await client.query<{ galaxy_id: number; revision: number; project_id: string; key: string; result: GalaxyResult }>(
          `select r.galaxy_id, r.revision, r.project_id, g.key, r.result from results r join galaxies g on g.id = r.galaxy_id
           where r.measures is null and r.result is not null and (r.galaxy_id, r.revision) > ($1, $2) order by r.galaxy_id, r.revision limit ${MIGRATION_CHUNK}`, after)
        if (!rows.length) break
        after = [rows[rows.length - 1].galaxy_id, rows[rows.length - 1].revision]
        const updates: Array<{ galaxy_id: number; revision: number; measures: Array<number | null>; measures_exact: Array<number | null> | null; codes: string; mc_percentiles: Array<number | null> | null; mc_classes: Array<number | null> | null }> = []
        for (const row of rows) {
          const at = `${row.project_id}/${row.revision}`
          if (!readers.has(at)) readers.set(at, await documentReader(db, row.project_id, [row.revision]))
          const reader = readers.get(at)!
          const stored = storedOfDocument(row.result, reader.prepared(row.revision)!)
          const rebuilt = stored && reader.document(row.key, { revision: row.revision, layout: layoutId, ...stored.columns, result: null })
          if (!stored || !sameDocument(rebuilt, row.result)) { kept++; continue }
          updates.push({ galaxy_id: row.galaxy_id, revision: row.revision, ...stored.json })
        }
        if (updates.length) {
          await client.query(`update results r set layout = $1, measures = t.measures, measures_exact = t.measures_exact, codes = decode(t.codes, 'hex'), mc_percentiles = t.mc_percentiles, mc_classes = t.mc_classes, result = null
            from json_to_recordset($2::json) as t(galaxy_id bigint, revision int, measures real[], measures_exact float8[], codes text, mc_percentiles real[], mc_classes real[])
            where r.galaxy_id = t.galaxy_id and r.revision = t.revision and r.measures is null`, [layoutId, JSON.stringify(updates)])
          converted += updates.length
        }
      }
      log?.(`converted ${converted} result documents to typed columns${kept ? `; ${kept} stay documents (they do not rebuild to the same document: another method version)` : ''}`)
    } finally {
      await client.query('select pg_advisory_unlock($1)', [MIGRATION_LOCK])
    }
  } finally {
    client.release()
  }
  return { converted, kept }
}

/** The typed columns of a stored document (as the reader takes them, and as JSON for the update). */
function storedOfDocument(doc: GalaxyResult, prep: PreparedSettings) {
  const row = rowFromDocument(doc, prep.settings.sfrCalibration, prep.settings.monteCarlo.draws)
  if (!row) return null
  const toList = (a: Float64Array) => Array.from(a, asReal)
  const m = measuresOf(row.out, 0, row.input.fwhmBroad)
  const measures = toList(m)
  const exact = fitsReal(m) ? null : Array.from(m, (v) => (Number.isFinite(v) ? v : null))
  const codes = codesOf(row.out, 0, row.input.kind)
  const pct = row.mc ? toList(percentilesOf(row.mc)) : null
  const cls = row.mc ? toList(classFractionsOf(row.mc)) : null
  return {
    columns: { measures, measures_exact: exact, codes, mc_percentiles: pct, mc_classes: cls },
    json: { measures, measures_exact: exact, codes: Buffer.from(codes).toString('hex'), mc_percentiles: pct, mc_classes: cls },
  }
}
