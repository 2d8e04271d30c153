import { createHash } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { intakes, projects } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { HttpProblem, conflict, type FieldError } from '../http/problem.ts'
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'
import type { IntakeCounts, OnExisting } from '../../shared/schemas/intake.schema.ts'
import { mergeGalaxy, type StoredGalaxy } from '../../shared/galaxy-merge.ts'
import { METHOD_VERSION, type GalaxyResult } from '../../shared/science.ts'
import { diagnose, diagnoseStored, type ComputeOptions, type ComputePool } from '../compute/pool.ts'
import { overBudget } from '../compute/budget.ts'
import { StoredRows, storeResults } from './result-copy.ts'
import { currentLayoutId } from './stored-results.ts'
import { intakeDto, revisionSettings } from './projects.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'
import { addCounts, zeroCounts } from './intake-counts.ts'

// Ingestion: the project's batch rules, the science on the compute threads, and the all-or-nothing,
// idempotent writes of galaxies, their earlier versions and their results.

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx

/** Repeated galaxy IDs within one request (each later one is an error naming the first). */
function duplicateIdErrors(gals: GalaxyInputDto[], prefix = '/galaxies'): FieldError[] {
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

/**
 * Runs the science chain on the compute threads (chunked, results in order), turning impossible
 * inputs into a 422 that names the field. Without options it is background work: it waits its turn
 * in the queue and never gets a 503 for a full queue.
 */
export async function computeAll(pool: ComputePool, gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies', opts: ComputeOptions = {}): Promise<GalaxyResult[]> {
  return diagnose(pool, gals, settings, { prefix, ...opts })
}

/** `computeAll` for storage: the threads encode each galaxy's `results` row for COPY (no document is built). */
export async function computeRows(pool: ComputePool, gals: GalaxyInputDto[], settings: Settings, prefix = '/galaxies', opts: ComputeOptions = {}): Promise<StoredRows> {
  return new StoredRows(await diagnoseStored(pool, gals, settings, { prefix, ...opts }))
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
  /** Where each galaxy's lines came from when not from the intake's rows (line fits), by index; else null. */
  provenance?: ReadonlyArray<object | null>
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
  computed: Array<{ revision: number; results: StoredRows }>, opts: WriteOptions = {}) {
  const onExisting = opts.onExisting ?? 'replace'
  let inserted = 0, updated = 0, skipped = 0
  const layoutId = computed.length ? await currentLayoutId(tx) : 0
  const CHUNK = 5000
  for (let start = 0; start < gals.length; start += CHUNK) {
    const part = gals.slice(start, start + CHUNK)
    const keys = part.map((g) => g.id)
    let locked: number[] = []
    if (onExisting !== 'skip') {
      const kept = await tx.execute<{ id: number }>(sql`
        with old as (
          select id, last_intake_id, redshift, ra, dec, flux_unit, input, provenance, updated_at from galaxies
          where project_id = ${projectId}::uuid and key = ${anyKey(keys)} for update),
        saved as (
          insert into galaxy_versions (galaxy_id, intake_id, previous_intake_id, redshift, ra, dec, flux_unit, input, provenance, written_at)
          select id, ${intakeId}::uuid, last_intake_id, redshift, ra, dec, flux_unit, input, provenance, updated_at from old)
        select id from old`)
      locked = kept.rows.map((r) => r.id)
    }
    const rows = part.map((g, j) => ({ key: g.id, redshift: g.redshift ?? null, ra: g.ra ?? null, dec: g.dec ?? null, flux_unit: g.fluxUnit ?? 1, input: storedInput(g), provenance: opts.provenance?.[start + j] ?? null }))
    const onConflict = onExisting === 'skip' ? sql`do nothing` : sql`do update set redshift = excluded.redshift, ra = excluded.ra, dec = excluded.dec,
        flux_unit = excluded.flux_unit, input = excluded.input, provenance = excluded.provenance, last_intake_id = excluded.last_intake_id, updated_at = now()
        where galaxies.id = any(${idArray(locked)})`
    const ids = await tx.execute<{ id: number; key: string; inserted: boolean }>(sql`
      insert into galaxies (project_id, key, redshift, ra, dec, flux_unit, input, provenance, last_intake_id)
      select ${projectId}::uuid, t.key, t.redshift, t.ra, t.dec, t.flux_unit, t.input, t.provenance, ${intakeId}::uuid
      from json_to_recordset(${JSON.stringify(rows)}::json) as t(key text, redshift float8, ra float8, dec float8, flux_unit float8, input json, provenance jsonb)
      on conflict (project_id, key) ${onConflict}
      returning id, key, (xmax = 0) as inserted`)
    const idByKey = new Map<string, number>()
    const links: Array<{ id: number; change: string }> = []
    const change = onExisting === 'merge' ? 'merged' : 'replaced'
    const overwritten: number[] = []
    for (const r of ids.rows) {
      idByKey.set(r.key, r.id)
      if (r.inserted) inserted++; else { updated++; overwritten.push(r.id) }
      links.push({ id: r.id, change: r.inserted ? 'created' : change })
    }
    if (idByKey.size < part.length) {
      if (onExisting === 'skip') skipped += part.length - idByKey.size
      else {
        const lost = part.find((g) => !idByKey.has(g.id))!
        throw conflict(`galaxy "${lost.id}" was created by another request while this one was being stored; nothing was stored, send it again`)
      }
    }
    // two arrays, not a JSON document per row: the server parses one number and one word per galaxy
    await tx.execute(sql`insert into galaxy_intakes (galaxy_id, intake_id, change)
      select t.id, ${intakeId}::uuid, t.change from unnest(${idArray(links.map((l) => l.id))}, ${`{${links.map((l) => l.change).join(',')}}`}::text[]) as t(id, change)
      on conflict do nothing`)
    // skipped IDs have no row: their id is undefined
    const partIds = part.map((g) => idByKey.get(g.id))
    for (const c of computed) await storeResults(tx, { projectId, revision: c.revision, layoutId }, c.results, partIds, start, overwritten)
  }
  if (computed.length && (opts.bumpVersion ?? true) && inserted + updated > 0) await bumpDataVersion(tx, projectId)
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
  /** the app's compute threads (GalaxyContext.compute) */
  compute: ComputePool
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
  const computed: Array<{ revision: number; results: StoredRows }> = []
  for (const r of ctx.revisions) computed.push({ revision: r.revision, results: await computeAt(ctx.compute, write, r.settings, (i) => ctx.where(at[i]), ctx.interactive) })
  const counts = await writeGalaxies(tx, ctx.projectId, ctx.intakeId, write, computed, { onExisting: ctx.onExisting, bumpVersion: ctx.bumpVersion })
  return {
    inserted: counts.inserted, updated: counts.updated, skipped: skipped + counts.skipped,
    replaced: ctx.onExisting === 'replace' ? counts.updated : 0, merged: ctx.onExisting === 'merge' ? counts.updated : 0,
  }
}

/** `computeRows` whose 422 names the galaxy where the caller's request has it. */
async function computeAt(pool: ComputePool, gals: GalaxyInputDto[], settings: Settings, where: (i: number) => string, interactive = false) {
  try {
    return await computeRows(pool, gals, settings, '', { interactive })
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

/** Every write of results bumps it: the diagram cache key (also across processes). */
export async function bumpDataVersion(tx: Executor, projectId: string) {
  await tx.execute(sql`update projects set data_version = data_version + 1 where id = ${projectId}::uuid`)
}

export const requestHash = (body: unknown) => createHash('sha256').update(JSON.stringify(body)).digest('hex')

/** Galaxies of one API batch written (and computed) together; the batch stays one transaction. */
const BATCH_WRITE_CHUNK = 1000

/**
 * Ingests one API batch as an intake: all or nothing, idempotent by key. The public API's upsert by
 * ID is `onExisting: replace` (the earlier records are kept as versions); `skip` and `merge` are
 * there for pipelines that ask.
 */
export async function ingestBatch(ctx: GalaxyContext, auth: Auth, projectId: string, gals: GalaxyInputDto[], idempotencyKey: string | undefined, hash: string,
  onExisting: OnExisting = 'replace') {
  const { db, batchBudget } = ctx
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
      const counts = zeroCounts()
      for (let start = 0; start < gals.length; start += BATCH_WRITE_CHUNK) {
        const part = gals.slice(start, start + BATCH_WRITE_CHUNK)
        const last = start + BATCH_WRITE_CHUNK >= gals.length
        addCounts(counts, await writeIntakeChunk(tx, { compute: ctx.compute, projectId, intakeId: intake.id, onExisting, revisions, where: (i) => `/galaxies/${start + i}`, interactive: true, bumpVersion: last }, part))
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
