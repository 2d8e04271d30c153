import { createHash } from 'node:crypto'
import { gzip, gzipSync } from 'node:zlib'
import { promisify } from 'node:util'
import { and, eq, sql, type SQL } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { galaxies, galaxyIntakes, intakes, projects, results, users } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { HttpProblem, conflict, notFound, type FieldError } from '../http/problem.ts'
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'
import type { IntakeCounts, OnExisting } from '../../shared/schemas/intake.schema.ts'
import { mergeGalaxy, type StoredGalaxy } from '../../shared/galaxy-merge.ts'
import { DIAGRAM_CLASSES as CLASS_NAMES, classCode, type ClassDiagram } from '../../shared/vocabulary/classes.ts'
import { METHOD_VERSION, type GalaxyResult } from '../../shared/science.ts'
import { diagnose, diagnoseRows, inProcessCompute, type ComputeOptions, type ComputePool } from '../compute/pool.ts'
import { overBudget, type Budgets } from '../compute/budget.ts'
import { RESULT_COLUMN_SQL, resultRow, LIMIT_BITS } from './result-columns.ts'
import { intakeDto, revisionSettings } from './projects.service.ts'
import type { GalaxyFilter } from '../../shared/schemas/query.schema.ts'
import { encodeDiagramColumns, typedColumns, type DiagramColumnsJson } from '../../shared/diagram-columns.ts'
import { isWellFormed } from '../../shared/schemas/text.ts'
import { z } from 'zod'

const gzipAsync = promisify(gzip)

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx

/** Repeated galaxy IDs within one request (each later one is an error naming the first). */
export function duplicateIdErrors(gals: GalaxyInputDto[], prefix = '/galaxies'): FieldError[] {
  const errors: FieldError[] = []
  const seen = new Map<string, number>()
  gals.forEach((g, i) => {
    const first = seen.get(g.id)
    if (first !== undefined) errors.push({ path: `${prefix}/${i}/id`, message: `duplicate galaxy id "${g.id}" (also at ${prefix}/${first}/id)` })
    else seen.set(g.id, i)
  })
  return errors
}

/** Negative fluxes, unless the assumptions allow them. */
export function negativeFluxErrors(gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies'): FieldError[] {
  const errors: FieldError[] = []
  if (settings.allowNegative) return errors
  gals.forEach((g, i) => {
    for (const [line, v] of Object.entries(g.lines)) {
      if (v && v.flux !== undefined && v.flux < 0) errors.push({ path: `${prefix}/${i}/lines/${line}/flux`, message: 'negative flux (set allowNegative in the assumptions to accept it)' })
    }
  })
  return errors
}

/** Checks the project's own rules that a schema alone cannot: unique IDs, negative fluxes. */
export function checkBatchRules(gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies'): FieldError[] {
  return [...duplicateIdErrors(gals, prefix), ...negativeFluxErrors(gals, settings, prefix)]
    .sort((a, b) => Number(a.path.split('/')[prefix.split('/').length]) - Number(b.path.split('/')[prefix.split('/').length]))
}

// The compute threads and per-request budgets, installed by createApp (as the diagram warm-up is);
// scripts without an app (seed, openapi) compute on their own thread.
let computePool: ComputePool = inProcessCompute()
let batchBudget = Number.POSITIVE_INFINITY
const fallbackPool = computePool
/** Installs the app's compute pool and the per-request budget of authenticated ingestion. */
export function configureCompute(pool: ComputePool | undefined, budgets?: Budgets) {
  computePool = pool ?? fallbackPool
  batchBudget = budgets?.authenticated ?? Number.POSITIVE_INFINITY
}
const activePool = () => (computePool.closed ? fallbackPool : computePool)

/**
 * Runs the science chain on the compute threads (chunked, results in order), turning impossible
 * inputs into a 422 that names the field. Without options it is background work: it waits its turn
 * in the queue and never gets a 503 for a full queue.
 */
export async function computeAll(gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies', opts: ComputeOptions = {}): Promise<GalaxyResult[]> {
  return diagnose(activePool(), gals, settings, { prefix, ...opts })
}

/** Result rows serialised by the compute threads (stored columns and result, without galaxy_id). */
export class PreparedResults {
  constructor(readonly rows: string[]) {}
  get length() { return this.rows.length }
  /** The recordset for `upsertResultsJson`: rows from `start`, one per id. */
  json(ids: ReadonlyArray<number | undefined>, start: number): string {
    const parts: string[] = []
    for (let j = 0; j < ids.length; j++) if (ids[j] !== undefined) parts.push(`{"galaxy_id":${ids[j]},${this.rows[start + j].slice(1)}`)
    return '[' + parts.join(',') + ']'
  }
}

/** `computeAll` for storage: the threads also build and serialise the stored rows, so the event loop only joins strings. */
export async function computeRows(gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies', opts: ComputeOptions = {}): Promise<PreparedResults> {
  return new PreparedResults(await diagnoseRows(activePool(), gals, settings, { prefix, ...opts }))
}

const storedInput = (g: GalaxyInputDto) => ({ lines: g.lines, ...(g.ew ? { ew: g.ew } : {}), ...(g.fwhm ? { fwhm: g.fwhm } : {}) })

/** A revision that new data are computed under, with its settings. */
export interface RevisionPlan { revision: number; settings: Settings }

/**
 * The revisions new data are computed under: the newest (`currentRevision`) and, while a recompute
 * to it is still running, also the one the project shows, so the new galaxies appear there too.
 */
export async function revisionsToCompute(db: Pick<Db, 'select'>, projectId: string): Promise<RevisionPlan[]> {
  const current = await revisionSettings(db, projectId)
  const [p] = await db.select({ shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
  const out = [current]
  if (p.shown !== current.revision) out.push(await revisionSettings(db, projectId, p.shown))
  return out
}

/**
 * `column = any(…)` over a JSON array of strings (keys are user text: always a parameter). An array
 * rather than `in (subquery)`, so PostgreSQL looks each key up in the index instead of hashing the
 * whole project's galaxies for every chunk.
 */
export const anyKey = (keys: string[]) => sql`any(array(select json_array_elements_text(${JSON.stringify(keys)}::json)))`
const idArray = (ids: number[]) => sql`${'{' + ids.join(',') + '}'}::bigint[]`

export interface WriteOptions {
  /** What to do with IDs the project has: `replace`/`merge` overwrite them (keeping the earlier record), `skip` leaves them. */
  onExisting?: OnExisting
  /** Bump the project's data version (the diagram cache key); a long intake bumps it once, at its end. */
  bumpVersion?: boolean
}

/**
 * Writes galaxies and their results for the given revisions inside the caller's transaction. Each
 * existing record that is overwritten is first copied to `galaxy_versions` with the intake that
 * supersedes it, so it stays retrievable and the intake can be undone; `galaxy_intakes.change` says
 * what the intake did to each galaxy. With `skip`, IDs the project has (also ones a concurrent
 * request has just created) are left alone; with `replace`/`merge` a galaxy created by a concurrent
 * request between the two statements answers 409 rather than being overwritten without a copy.
 */
export async function writeGalaxies(tx: Executor, projectId: string, intakeId: string, gals: GalaxyInputDto[],
  computed: Array<{ revision: number; results: unknown[] | PreparedResults }>, opts: WriteOptions = {}) {
  const onExisting = opts.onExisting ?? 'replace'
  let inserted = 0, updated = 0, skipped = 0
  const CHUNK = 5000
  for (let start = 0; start < gals.length; start += CHUNK) {
    const part = gals.slice(start, start + CHUNK)
    const keys = part.map((g) => g.id)
    let locked: number[] = []
    if (onExisting !== 'skip') {
      const kept = await tx.execute<{ id: number }>(sql`
        with old as (
          select id, last_intake_id, redshift, ra, dec, flux_unit, input, updated_at from galaxies
          where project_id = ${projectId}::uuid and key = ${anyKey(keys)} for update),
        saved as (
          insert into galaxy_versions (galaxy_id, intake_id, previous_intake_id, redshift, ra, dec, flux_unit, input, written_at)
          select id, ${intakeId}::uuid, last_intake_id, redshift, ra, dec, flux_unit, input, updated_at from old)
        select id from old`)
      locked = kept.rows.map((r) => r.id)
    }
    const rows = part.map((g) => ({ key: g.id, redshift: g.redshift ?? null, ra: g.ra ?? null, dec: g.dec ?? null, flux_unit: g.fluxUnit ?? 1, input: storedInput(g) }))
    const onConflict = onExisting === 'skip' ? sql`do nothing` : sql`do update set redshift = excluded.redshift, ra = excluded.ra, dec = excluded.dec,
        flux_unit = excluded.flux_unit, input = excluded.input, last_intake_id = excluded.last_intake_id, updated_at = now()
        where galaxies.id = any(${idArray(locked)})`
    const ids = await tx.execute<{ id: number; key: string; inserted: boolean }>(sql`
      insert into galaxies (project_id, key, redshift, ra, dec, flux_unit, input, last_intake_id)
      select ${projectId}::uuid, t.key, t.redshift, t.ra, t.dec, t.flux_unit, t.input, ${intakeId}::uuid
      from json_to_recordset(${JSON.stringify(rows)}::json) as t(key text, redshift float8, ra float8, dec float8, flux_unit float8, input json)
      on conflict (project_id, key) ${onConflict}
      returning id, key, (xmax = 0) as inserted`)
    const idByKey = new Map<string, number>()
    const links: Array<{ id: number; change: string }> = []
    const change = onExisting === 'merge' ? 'merged' : 'replaced'
    for (const r of ids.rows) {
      idByKey.set(r.key, r.id)
      if (r.inserted) inserted++; else updated++
      links.push({ id: r.id, change: r.inserted ? 'created' : change })
    }
    if (idByKey.size < part.length) {
      if (onExisting === 'skip') skipped += part.length - idByKey.size
      else {
        const lost = part.find((g) => !idByKey.has(g.id))!
        throw conflict(`galaxy "${lost.id}" was created by another request while this one was being stored; nothing was stored, send it again`)
      }
    }
    await tx.execute(sql`insert into galaxy_intakes (galaxy_id, intake_id, change)
      select t.id, ${intakeId}::uuid, t.change from json_to_recordset(${JSON.stringify(links)}::json) as t(id bigint, change text)
      on conflict do nothing`)
    for (const c of computed) {
      const res = c.results
      if (res instanceof PreparedResults) {
        // skipped IDs have no row here: json() leaves them out
        const json = res.json(part.map((g) => idByKey.get(g.id)), start)
        if (json !== '[]') await upsertResultsJson(tx, projectId, c.revision, json, opts.bumpVersion ?? true)
      } else {
        const resultRows: Array<Record<string, unknown>> = []
        part.forEach((g, j) => { const id = idByKey.get(g.id); if (id !== undefined) resultRows.push(resultRow(id, g, res[start + j])) })
        if (resultRows.length) await upsertResults(tx, projectId, c.revision, resultRows, opts.bumpVersion ?? true)
      }
    }
  }
  return { inserted, updated, skipped }
}

/** Stored records of the given IDs (locked for the transaction), for `merge` and to know which exist. */
async function storedGalaxies(tx: Executor, projectId: string, keys: string[], withInput: boolean) {
  const rows = await tx.execute<{ id: number; key: string; redshift: number | null; ra: number | null; dec: number | null; flux_unit: number; input: StoredGalaxy['input'] | null }>(sql`
    select id, key, redshift, ra, dec, flux_unit, ${withInput ? sql`input` : sql`null::json as input`} from galaxies
    where project_id = ${projectId}::uuid and key = ${anyKey(keys)} for update`)
  return new Map(rows.rows.map((r) => [r.key, { id: r.id, key: r.key, redshift: r.redshift, ra: r.ra, dec: r.dec, fluxUnit: r.flux_unit, input: r.input ?? { lines: {} } }]))
}

export interface IntakeChunkContext {
  projectId: string
  intakeId: string
  onExisting: OnExisting
  revisions: RevisionPlan[]
  /** JSON Pointer of the i-th galaxy of the chunk in the request (e.g. `/galaxies/3`, `/rows/17`). */
  where: (i: number) => string
  bumpVersion?: boolean
  /** a request waiting for its answer: a full compute queue or the time budget answers 503 */
  interactive?: boolean
}

/**
 * One chunk of an intake inside its transaction: decides for each ID the project has (skip, replace
 * or merge), computes the results of what is written under the given revisions, and writes.
 */
export async function writeIntakeChunk(tx: Executor, ctx: IntakeChunkContext, gals: GalaxyInputDto[]): Promise<IntakeCounts> {
  // replace needs no look-up here: writeGalaxies locks and copies the records it overwrites
  const stored = ctx.onExisting === 'replace' ? new Map<string, StoredGalaxy & { id: number }>() : await storedGalaxies(tx, ctx.projectId, gals.map((g) => g.id), ctx.onExisting === 'merge')
  const write: GalaxyInputDto[] = [], at: number[] = []
  let skipped = 0
  gals.forEach((g, i) => {
    const old = stored.get(g.id)
    if (old && ctx.onExisting === 'skip') { skipped++; return }
    write.push(old && ctx.onExisting === 'merge' ? mergeGalaxy(old, g) : g)
    at.push(i)
  })
  const computed: Array<{ revision: number; results: PreparedResults }> = []
  for (const r of ctx.revisions) computed.push({ revision: r.revision, results: await computeAt(write, r.settings, (i) => ctx.where(at[i]), ctx.interactive) })
  const counts = await writeGalaxies(tx, ctx.projectId, ctx.intakeId, write, computed, { onExisting: ctx.onExisting, bumpVersion: ctx.bumpVersion })
  return {
    inserted: counts.inserted, updated: counts.updated, skipped: skipped + counts.skipped,
    replaced: ctx.onExisting === 'replace' ? counts.updated : 0, merged: ctx.onExisting === 'merge' ? counts.updated : 0,
  }
}

/** `computeRows` whose 422 names the galaxy where the caller's request has it. */
async function computeAt(gals: GalaxyInputDto[], settings: Settings, where: (i: number) => string, interactive = false) {
  try {
    return await computeRows(gals, settings, '', { interactive })
  } catch (err) {
    if (err instanceof HttpProblem && err.errors) {
      err.errors = err.errors.map((e) => {
        const m = /^\/(\d+)(.*)$/.exec(e.path)
        return m ? { ...e, path: where(Number(m[1])) + m[2] } : e
      })
    }
    throw err
  }
}

const RESULT_COLS = RESULT_COLUMN_SQL.map(([, c]) => c)
const RESULT_RECORD = sql.raw(RESULT_COLUMN_SQL.map(([, c, t]) => `${c} ${t}`).join(', '))
const RESULT_LIST = sql.raw(RESULT_COLS.join(', '))
const RESULT_T_LIST = sql.raw(RESULT_COLS.map((c) => `t.${c}`).join(', '))
const RESULT_UPDATE = sql.raw(RESULT_COLS.map((c) => `${c} = excluded.${c}`).join(', '))

export async function upsertResults(tx: Executor, projectId: string, revision: number, rows: Array<Record<string, unknown>>, bumpVersion = true) {
  await upsertResultsJson(tx, projectId, revision, JSON.stringify(rows), bumpVersion)
}

/** `upsertResults` for rows already serialised as a JSON array (see `PreparedResults`). */
export async function upsertResultsJson(tx: Executor, projectId: string, revision: number, rowsJson: string, bumpVersion = true) {
  await tx.execute(sql`
    insert into results (galaxy_id, project_id, revision, method_version, computed_at, ${RESULT_LIST}, result)
    select t.galaxy_id, ${projectId}::uuid, ${revision}, ${METHOD_VERSION}, now(), ${RESULT_T_LIST}, t.result
    from json_to_recordset(${rowsJson}::json) as t(galaxy_id bigint, ${RESULT_RECORD}, result json)
    on conflict (galaxy_id, revision) do update set method_version = excluded.method_version, computed_at = now(),
      ${RESULT_UPDATE}, result = excluded.result`)
  if (bumpVersion) await bumpDataVersion(tx, projectId)
}

/** Every write of results bumps it: the diagram cache key (also across processes). */
export async function bumpDataVersion(tx: Executor, projectId: string) {
  await tx.execute(sql`update projects set data_version = data_version + 1 where id = ${projectId}::uuid`)
}

export const requestHash = (body: unknown) => createHash('sha256').update(JSON.stringify(body)).digest('hex')

// ---- queries ---------------------------------------------------------------------------------

export const SORT_FIELDS = {
  id: sql`g.key`, redshift: sql`g.redshift`, ebv: sql`r.ebv`, av: sql`r.av`, neSii: sql`r.ne_sii`, teOiii: sql`r.te_oiii`,
  n2Pp04: sql`r.n2_pp04`, o3n2Pp04: sql`r.o3n2_pp04`, sfrHalpha: sql`r.sfr_halpha`, niiHa: sql`r.x_nii`, oiiiHb: sql`r.y_oiii`,
  siiHa: sql`r.x_sii`, oiHa: sql`r.x_oi`, flagCount: sql`r.flag_count`, classOverall: sql`r.class_overall`,
} as const

export const RANGE_FIELDS: Record<string, SQL> = {
  redshift: sql`g.redshift`, ebv: sql`r.ebv`, av: sql`r.av`, neSii: sql`r.ne_sii`, neOii: sql`r.ne_oii`, teOiii: sql`r.te_oiii`,
  n2Pp04: sql`r.n2_pp04`, o3n2Pp04: sql`r.o3n2_pp04`, sfrHalpha: sql`r.sfr_halpha`, niiHa: sql`r.x_nii`, oiiiHb: sql`r.y_oiii`,
  siiHa: sql`r.x_sii`, oiHa: sql`r.x_oi`, ewHalpha: sql`r.ew_halpha`, snrMin: sql`r.snr_min`,
}

const CLASS_COLUMNS: Record<ClassDiagram, SQL> = {
  overall: sql`r.class_overall`, nii: sql`r.class_nii`, sii: sql`r.class_sii`, oi: sql`r.class_oi`, whan: sql`r.class_whan`,
}

/** WHERE clause of the shared galaxy filters (galaxies `g` joined with results `r`). */
export function filterSql(projectId: string, revision: number, f: GalaxyFilter): SQL {
  const parts: SQL[] = [sql`g.project_id = ${projectId}::uuid`, sql`r.revision = ${revision}`]
  const classFilters: Array<[ClassDiagram, string[] | undefined]> = [
    ['overall', f.class], ['nii', f.classNii], ['sii', f.classSii], ['oi', f.classOi], ['whan', f.classWhan]]
  for (const [d, names] of classFilters) {
    if (names?.length) parts.push(sql`${CLASS_COLUMNS[d]} in (${sql.join(names.map((n) => sql`${classCode(d, n)}`), sql`, `)})`)
  }
  if (f.q) parts.push(sql`g.key ilike ${'%' + f.q.replace(/[\\%_]/g, (c) => '\\' + c) + '%'}`)
  // bounds are doubles: typed so, a bound beyond float4 (1e300) filters instead of failing to convert to `real`
  if (f.zMin !== undefined) parts.push(sql`g.redshift >= ${f.zMin}::float8`)
  if (f.zMax !== undefined) parts.push(sql`g.redshift <= ${f.zMax}::float8`)
  if (f.minSnr !== undefined) parts.push(sql`r.snr_min >= ${f.minSnr}::float8`)
  for (const r of f.range ?? []) {
    const col = RANGE_FIELDS[r.field]
    if (r.min !== null) parts.push(sql`${col} >= ${r.min}::float8`)
    if (r.max !== null) parts.push(sql`${col} <= ${r.max}::float8`)
  }
  return sql.join(parts, sql` and `)
}

export async function projectRevisionForQueries(db: Db, projectId: string, revision?: number) {
  const [p] = await db.select({ current: projects.currentRevision, shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
  if (!p) throw notFound('project')
  return revision ?? p.shown
}

const encodeCursor = (v: [string | number | null, number]) => Buffer.from(JSON.stringify(v)).toString('base64url')
/**
 * [sort value of the last row, its internal id]: text for the id sort, a number (or null) for the
 * others. The text is a stored ID (which may predate today's text rules), so only what PostgreSQL
 * cannot take is refused: NUL and unpaired surrogates.
 */
const CursorSchema = z.tuple([z.union([z.string().max(200).refine((s) => !s.includes('\u0000') && isWellFormed(s)), z.number(), z.null()]), z.number().int().min(1)])
function decodeCursor(c: string, textSort: boolean): [string | number | null, number] {
  let decoded: unknown
  try { decoded = JSON.parse(Buffer.from(c, 'base64url').toString('utf8')) } catch { decoded = undefined }
  const parsed = CursorSchema.safeParse(decoded)
  if (parsed.success && (typeof parsed.data[0] === 'string') === textSort) return parsed.data
  throw new HttpProblem(422, 'Unprocessable Content', 'invalid cursor', [{ path: '/cursor', message: parsed.success
    ? 'this cursor belongs to another sort; pass the sort it was made with, or start without a cursor'
    : 'not a cursor from this API (pass nextCursor unchanged)' }])
}

export function summary(row: Record<string, unknown>) {
  const r = row.result as Record<string, any>
  return {
    id: row.key as string, redshift: row.redshift as number | null,
    classes: { nii: r.classes?.nii, sii: r.classes?.sii, oi: r.classes?.oi, whan: r.classes?.whan, overall: r.classes?.overall },
    ebv: r.extinction?.ebv ?? null, ebvError: r.extinction?.ebvError ?? null, av: r.extinction?.av ?? null,
    neSii: r.density?.sii?.ne ?? null, teOiii: r.temperature?.oiii?.te ?? null,
    n2Pp04: r.metallicity?.n2Pp04 ?? null, o3n2Pp04: r.metallicity?.o3n2Pp04 ?? null, sfrHalpha: r.sfr?.sfrHalpha ?? null,
    ratios: { niiHa: r.ratios?.niiHa ?? null, oiiiHb: r.ratios?.oiiiHb ?? null, siiHa: r.ratios?.siiHa ?? null, oiHa: r.ratios?.oiHa ?? null },
    flagCount: Array.isArray(r.flags) ? r.flags.length : 0,
  }
}

/** Least-recently-used cache of diagram documents (each up to a few tens of MB for 10⁶ galaxies). */
const DIAGRAM_CACHE_ENTRIES = 8
export interface DiagramDocument { body: Buffer; etag: string; gzipped?: Buffer; binary?: Buffer; binaryGzipped?: Buffer }

/** The gzip form of a cached document, made once on first demand (about a quarter of the size). */
export function gzippedDiagram(doc: DiagramDocument): Buffer {
  return (doc.gzipped ??= gzipSync(doc.body, { level: 6 }))
}

/** The binary form (shared/diagram-columns.ts) of a cached document, made once on first demand. */
export function binaryDiagram(doc: DiagramDocument, gzip: boolean): Buffer {
  doc.binary ??= Buffer.from(encodeDiagramColumns(typedColumns(JSON.parse(doc.body.toString('utf8')) as DiagramColumnsJson)))
  return gzip ? (doc.binaryGzipped ??= gzipSync(doc.binary, { level: 6 })) : doc.binary
}
const diagramCache = new Map<string, DiagramDocument>()
const diagramInflight = new Map<string, Promise<DiagramDocument>>()

let warmupDelayMs = 0
const warmTimers = new Map<string, NodeJS.Timeout>()
const writesInFlight = new Map<string, number>()
/** How long writes must pause before the unfiltered diagram document is rebuilt in the background; 0 = never. */
export function configureDiagramWarmup(delayMs: number) { warmupDelayMs = delayMs }

/**
 * After writes to a project settle, build its unfiltered diagram document so the next visitor of
 * the Diagrams screen finds it cached instead of waiting for the query (seconds at 10⁵ galaxies).
 * Re-armed by every write, so a bulk ingestion of many batches builds it once, at the end.
 */
export function warmDiagramSoon(db: Db, projectId: string) {
  if (warmupDelayMs <= 0) return
  clearTimeout(warmTimers.get(projectId))
  // a write still running will arm it again when it ends
  if (writesInFlight.get(projectId)) return
  const timer = setTimeout(() => {
    warmTimers.delete(projectId)
    // the dashboard asks for the binary form, gzipped: make that too. A failed warm-up only means
    // the next reader builds the document itself
    galaxiesService(db).diagram(projectId, {}).then((doc) => { binaryDiagram(doc, true) }).catch(() => {})
  }, warmupDelayMs)
  timer.unref()
  warmTimers.set(projectId, timer)
}

/**
 * Runs a write to a project's galaxies; once no write to it is left running, the diagram
 * document is rebuilt in the background. A pipeline keeping two batches in flight thus gets one
 * rebuild at the end, not one in every pause between batches (each costs seconds of CPU).
 */
export async function writingGalaxies<T>(db: Db, projectId: string, write: () => Promise<T>): Promise<T> {
  writesInFlight.set(projectId, (writesInFlight.get(projectId) ?? 0) + 1)
  clearTimeout(warmTimers.get(projectId))
  try {
    return await write()
  } finally {
    const left = (writesInFlight.get(projectId) ?? 1) - 1
    if (left > 0) writesInFlight.set(projectId, left)
    else writesInFlight.delete(projectId)
    warmDiagramSoon(db, projectId)
  }
}

export function galaxiesService(db: Db) {
  return {
    /** One page of galaxies by keyset pagination on (sort value, internal id). */
    async list(projectId: string, f: GalaxyFilter & { limit: number; cursor?: string; sort: string }) {
      const revision = await projectRevisionForQueries(db, projectId, f.revision)
      const desc = f.sort.startsWith('-')
      const field = (desc ? f.sort.slice(1) : f.sort) as keyof typeof SORT_FIELDS
      const isText = field === 'id'
      const col = SORT_FIELDS[field]
      // nulls sort last either way: replace them by the far end of the order
      const key = isText ? col : sql`coalesce(${col}::float8, ${desc ? sql`'-Infinity'::float8` : sql`'Infinity'::float8`})`
      const where = filterSql(projectId, revision, f)
      let page = where
      if (f.cursor) {
        const [v, id] = decodeCursor(f.cursor, isText)
        const val = isText ? sql`${v}` : sql`${v === null ? (desc ? -Infinity : Infinity) : v}::float8`
        page = sql`${where} and (${key}, g.id) ${desc ? sql`<` : sql`>`} (${val}, ${id})`
      }
      const rows = await db.execute<Record<string, unknown>>(sql`
        select g.id, g.key, g.redshift, r.result, ${key} as sort_value from galaxies g join results r on r.galaxy_id = g.id
        where ${page} order by ${key} ${desc ? sql`desc` : sql`asc`}, g.id ${desc ? sql`desc` : sql`asc`} limit ${f.limit + 1}`)
      const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from galaxies g join results r on r.galaxy_id = g.id where ${where}`)).rows
      const items = rows.rows.slice(0, f.limit)
      const last = items[items.length - 1]
      const sv = last ? (typeof last.sort_value === 'number' && !Number.isFinite(last.sort_value) ? null : last.sort_value) : null
      return {
        revision, total: n, items: items.map(summary),
        nextCursor: rows.rows.length > f.limit && last ? encodeCursor([sv as string | number | null, last.id as number]) : null,
      }
    },

    async getOne(projectId: string, key: string, revision?: number) {
      const shown = await projectRevisionForQueries(db, projectId)
      const [g] = await db.select().from(galaxies).where(and(eq(galaxies.projectId, projectId), eq(galaxies.key, key)))
      if (!g) throw notFound('galaxy')
      const revs = await db.select({ revision: results.revision, methodVersion: results.methodVersion, computedAt: results.computedAt })
        .from(results).where(eq(results.galaxyId, g.id)).orderBy(results.revision)
      const want = revision ?? (revs.some((r) => r.revision === shown) ? shown : revs[revs.length - 1]?.revision)
      const [res] = want === undefined ? [] : await db.select().from(results).where(and(eq(results.galaxyId, g.id), eq(results.revision, want)))
      if (revision !== undefined && !res) throw notFound('result for that revision')
      const history = await db.select({ i: intakes, byName: users.name, change: galaxyIntakes.change }).from(galaxyIntakes)
        .innerJoin(intakes, eq(intakes.id, galaxyIntakes.intakeId)).leftJoin(users, eq(users.id, intakes.userId))
        .where(eq(galaxyIntakes.galaxyId, g.id)).orderBy(intakes.createdAt)
      const input = g.input as { lines: unknown; ew?: unknown; fwhm?: unknown }
      return {
        id: g.key, redshift: g.redshift, fluxUnit: g.fluxUnit, ra: g.ra, dec: g.dec,
        lines: input.lines, ew: input.ew ?? null, fwhm: input.fwhm ?? null,
        revision: res?.revision ?? null, methodVersion: res?.methodVersion ?? null, computedAt: res?.computedAt.toISOString() ?? null,
        results: res?.result ?? null,
        // change: what the intake did (created, replaced, merged); earlier records: GET …/versions
        history: history.map((h) => ({ intakeId: h.i.id, kind: h.i.kind, fileName: h.i.fileName, createdAt: h.i.createdAt.toISOString(), by: h.byName, change: h.change })),
        revisions: revs.map((r) => ({ revision: r.revision, methodVersion: r.methodVersion, computedAt: r.computedAt.toISOString() })),
      }
    },

    /**
     * Columnar diagram data built by PostgreSQL itself (one row of arrays), so 10⁵–10⁶ galaxies
     * cost one scan and no per-row JavaScript.
     */
    async diagram(projectId: string, f: GalaxyFilter): Promise<DiagramDocument> {
      // one read for both: the revision shown and the data version that keys the cache
      const [p] = await db.select({ shown: projects.resultsRevision, version: projects.dataVersion }).from(projects).where(eq(projects.id, projectId))
      if (!p) throw notFound('project')
      const revision = f.revision ?? p.shown
      const version = p.version
      // every results write bumps data_version, so a cached document is never stale (across processes too)
      const cacheKey = `${projectId}|${revision}|${version}|${JSON.stringify(f)}`
      const hit = diagramCache.get(cacheKey)
      if (hit !== undefined) { diagramCache.delete(cacheKey); diagramCache.set(cacheKey, hit); return hit }
      // concurrent misses for the same document share one query instead of each running it
      const pending = diagramInflight.get(cacheKey)
      if (pending) return pending
      const build = buildDiagram(projectId, revision, f, cacheKey).finally(() => diagramInflight.delete(cacheKey))
      diagramInflight.set(cacheKey, build)
      return build
    },
  }

  async function buildDiagram(projectId: string, revision: number, f: GalaxyFilter, cacheKey: string): Promise<DiagramDocument> {
      const where = filterSql(projectId, revision, f)
      const lim = (b: { upper: number; lower: number }) =>
        sql.raw(`case when s.limits & ${b.upper} <> 0 then 1 when s.limits & ${b.lower} <> 0 then -1 else 0 end`)
      // one ordered scan feeds every array (array_agg keeps the subquery's order), so there is one sort
      const agg = (e: SQL | string) => sql`coalesce(array_agg(${typeof e === 'string' ? sql.raw(e) : e}), '{}')`
      // plotting precision: 10⁻⁴ dex is far below any measurement error and halves the document
      // (exact values are in the galaxy detail and the exports)
      // (float8 arithmetic: an integer over a power of ten prints as the short decimal, and is far cheaper than numeric)
      const r = (col: string, digits: number) => `round(${col} * 1e${digits}) / 1e${digits}`
      const res = await db.execute<{ doc: string }>(sql`
        select json_build_object(
          'revision', ${revision}::int, 'count', count(*),
          'ids', ${agg('s.key')}, 'redshift', ${agg(r('s.redshift', 6))},
          'class', json_build_object('overall', ${agg('s.class_overall')}, 'nii', ${agg('s.class_nii')}, 'sii', ${agg('s.class_sii')}, 'oi', ${agg('s.class_oi')}, 'whan', ${agg('s.class_whan')}),
          'x', json_build_object('nii', ${agg(r('s.x_nii', 4))}, 'sii', ${agg(r('s.x_sii', 4))}, 'oi', ${agg(r('s.x_oi', 4))}),
          'y', ${agg(r('s.y_oiii', 4))},
          'xErr', json_build_object('nii', ${agg(r('s.x_nii_err', 4))}, 'sii', ${agg(r('s.x_sii_err', 4))}, 'oi', ${agg(r('s.x_oi_err', 4))}),
          'yErr', ${agg(r('s.y_oiii_err', 4))},
          'xLimit', json_build_object('nii', ${agg(lim(LIMIT_BITS.niiHa))}, 'sii', ${agg(lim(LIMIT_BITS.siiHa))}, 'oi', ${agg(lim(LIMIT_BITS.oiHa))}),
          'yLimit', ${agg(lim(LIMIT_BITS.oiiiHb))},
          'ewHalpha', ${agg(r('s.ew_halpha', 3))}
        )::text as doc
        from (select g.key, g.redshift, r.class_overall, r.class_nii, r.class_sii, r.class_oi, r.class_whan, r.x_nii, r.x_sii, r.x_oi, r.y_oiii,
                r.x_nii_err, r.x_sii_err, r.x_oi_err, r.y_oiii_err, r.limits, r.ew_halpha
              from galaxies g join results r on r.galaxy_id = g.id where ${where} order by g.id) s`)
      const body = Buffer.from(res.rows[0].doc.slice(0, -1) + `,"classNames":${JSON.stringify(CLASS_NAMES)}}`)
      // encoded and hashed once: repeated requests then cost a memory copy, not a query and a hash
      const doc: DiagramDocument = { body, etag: `"d${createHash('sha1').update(body).digest('base64url')}"` }
      // every form made off the event loop: the binary columns on a compute thread, gzip on libuv's
      const [binary, gzipped] = await Promise.all([activePool().encodeDiagram(body), gzipAsync(body, { level: 6 })])
      doc.binary = Buffer.from(binary.buffer, binary.byteOffset, binary.byteLength)
      doc.gzipped = gzipped
      doc.binaryGzipped = await gzipAsync(doc.binary, { level: 6 })
      diagramCache.set(cacheKey, doc)
      while (diagramCache.size > DIAGRAM_CACHE_ENTRIES) diagramCache.delete(diagramCache.keys().next().value!)
      return doc
  }
}

/** Galaxies of one API batch written (and computed) together; the batch stays one transaction. */
const BATCH_WRITE_CHUNK = 1000

/**
 * Ingests one API batch as an intake: all or nothing, idempotent by key. The contract's upsert by
 * ID is `onExisting: replace` (the earlier records are kept as versions); `skip` and `merge` are
 * there for pipelines that ask.
 */
export async function ingestBatch(db: Db, auth: Auth, projectId: string, gals: GalaxyInputDto[], idempotencyKey: string | undefined, hash: string,
  onExisting: OnExisting = 'replace') {
  if (idempotencyKey) {
    const [prev] = await db.select().from(intakes).where(and(eq(intakes.projectId, projectId), eq(intakes.idempotencyKey, idempotencyKey)))
    if (prev) {
      if (prev.requestHash !== hash) throw conflict('this Idempotency-Key was used with a different body')
      if (prev.response) return { replay: true, body: prev.response }
    }
  }
  const { settings } = await revisionSettings(db, projectId)
  const errors = checkBatchRules(gals, settings)
  if (errors.length) throw new HttpProblem(422, 'Unprocessable Content', `${errors.length} problem(s) in the batch; nothing was stored`, errors)
  const draws = settings.monteCarlo.draws
  const over = overBudget(gals.length, draws, batchBudget, { anonymous: false, authenticatedBudget: batchBudget, path: '/galaxies' })
  if (over) throw new HttpProblem(422, 'Unprocessable Content', `this project's assumptions draw ${draws} Monte Carlo samples per galaxy: ${over.message}`, [over])
  try {
    return await db.transaction(async (tx) => {
      const revisions = await revisionsToCompute(tx, projectId)
      const revision = revisions[0].revision
      const [intake] = await tx.insert(intakes).values({
        projectId, kind: 'api', status: 'committed', userId: auth.user.id, apiKeyId: auth.key?.id ?? null,
        rowsTotal: gals.length, rowsAccepted: gals.length, rowsRejected: 0, revision,
        idempotencyKey: idempotencyKey ?? null, requestHash: hash, finishedAt: new Date(),
      }).returning()
      // in chunks, as a CSV intake is stored: building one chunk's SQL at a time keeps the event loop free
      const counts: IntakeCounts = { inserted: 0, updated: 0, replaced: 0, merged: 0, skipped: 0 }
      for (let start = 0; start < gals.length; start += BATCH_WRITE_CHUNK) {
        const part = gals.slice(start, start + BATCH_WRITE_CHUNK)
        const last = start + BATCH_WRITE_CHUNK >= gals.length
        const c = await writeIntakeChunk(tx, { projectId, intakeId: intake.id, onExisting, revisions, where: (i) => `/galaxies/${start + i}`, interactive: true, bumpVersion: last }, part)
        for (const k of Object.keys(counts) as Array<keyof IntakeCounts>) counts[k] += c[k]
      }
      const body = { intake: intakeDto(intake, { id: auth.user.id, name: auth.user.name }), ...counts, revision, methodVersion: METHOD_VERSION }
      await tx.update(intakes).set({ response: body, report: { ...counts, onExisting } }).where(eq(intakes.id, intake.id))
      return { replay: false, body }
    })
  } catch (err) {
    // a concurrent request with the same key won the race: answer as it did
    if ((err as { code?: string }).code === '23505' && idempotencyKey) {
      const [prev] = await db.select().from(intakes).where(and(eq(intakes.projectId, projectId), eq(intakes.idempotencyKey, idempotencyKey)))
      if (prev && prev.requestHash === hash && prev.response) return { replay: true, body: prev.response }
      if (prev) throw conflict('this Idempotency-Key was used with a different body')
    }
    throw err
  }
}
