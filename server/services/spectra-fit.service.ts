import { and, asc, eq, gt, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { intakes, jobs, lineFits, projects, spectra } from '../db/schema.ts'
import { logger } from '../lib/logger.ts'
import { flagName } from '../../shared/vocabulary/flags.ts'
import { GalaxyInputSchema, type GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import { FIT_METHOD_VERSION, type FitSettings } from '../compute/fit-spectra.task.ts'
import type { StoredRows } from './result-copy.ts'
import { bumpDataVersion, computeRows, revisionsToCompute, writeGalaxies, type RevisionPlan } from './galaxy-ingest.service.ts'
import { writingGalaxies } from './diagrams.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'
import type { ComputePool } from '../compute/pool.ts'
import { registerJobRunner, registerRecomputeStage, type JobLease } from './jobs.service.ts'
import { arraysOf, fitSettingsKey, fitSettingsOf, selectSpectra } from './spectra.service.ts'

/**
 * The `fit` job of an upload and the refits of a recompute. Each spectrum is fitted under the fit
 * settings of every revision the project computes (a revision with the same fit settings reuses the
 * fit), the fits are stored in `line_fits`, and the galaxy's lines become the measurements of the
 * newest revision's fit: its earlier record goes to `galaxy_versions`, its provenance says which
 * spectrum and revision the lines came from, and its diagnostics are computed from them.
 */

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx
type SpectrumRow = typeof spectra.$inferSelect
type JobRow = typeof jobs.$inferSelect

/**
 * Spectra fitted and written together: one committed step of the job (its progress and resume point).
 * The first chunk is small, so the first galaxies show soon; each next one doubles up to the largest,
 * whose writes cost little per spectrum (the project is locked while a chunk is written). The next
 * chunk is fitted while one is written, so the threads keep fitting through the writes.
 */
const FIT_CHUNK_FIRST = 16
const FIT_CHUNK_MAX = 128

/** The fit result as stored (the science library's shape; a fit that failed keeps only its error). */
interface StoredFit {
  fit?: { chi2: number; dof: number; components: number; broadHalpha: boolean } | null
  lines?: Record<string, { detected?: boolean }>
  measurements?: { lines: GalaxyInputDto['lines']; ew: NonNullable<GalaxyInputDto['ew']>; fwhm: NonNullable<GalaxyInputDto['fwhm']> }
  flags: string[]
  error?: string
}
/** A spectrum's fit under one revision: already stored, copied from a revision with the same fit settings, or fitted now. */
interface FitRecord { result: StoredFit; settings: FitSettings; methodVersion: string; origin: 'stored' | 'copied' | 'fitted' }
type FitsByRevision = Map<number, Map<number, FitRecord>>

export interface LineFitProvenance { source: 'line-fit'; spectrumId: number; revision: number }

/** Fits (or reuses) each spectrum under the fit settings of each plan. */
async function fitsFor(ex: Executor, compute: ComputePool, rows: SpectrumRow[], plans: RevisionPlan[]): Promise<FitsByRevision> {
  const ids = rows.map((r) => r.id)
  const stored = ids.length ? await ex.select({ spectrumId: lineFits.spectrumId, revision: lineFits.revision, settings: lineFits.settings, methodVersion: lineFits.methodVersion, result: lineFits.result })
    .from(lineFits).where(sql`${lineFits.spectrumId} = any(${'{' + ids.join(',') + '}'}::bigint[])`) : []
  const out: FitsByRevision = new Map()
  const toFit: Array<{ row: SpectrumRow; settings: FitSettings; revision: number }> = []
  for (const plan of plans) {
    const settings = fitSettingsOf(plan.settings)
    const key = fitSettingsKey(settings)
    const byId = new Map<number, FitRecord>()
    out.set(plan.revision, byId)
    for (const row of rows) {
      const mine = stored.filter((f) => f.spectrumId === row.id)
      const at = mine.find((f) => f.revision === plan.revision && f.methodVersion === FIT_METHOD_VERSION && fitSettingsKey(f.settings as FitSettings) === key)
      const same = at ?? mine.find((f) => f.methodVersion === FIT_METHOD_VERSION && fitSettingsKey(f.settings as FitSettings) === key)
      if (same) byId.set(row.id, { result: same.result as StoredFit, settings, methodVersion: same.methodVersion, origin: at ? 'stored' : 'copied' })
      else toFit.push({ row, settings, revision: plan.revision })
    }
  }
  // the same spectrum and settings under two revisions is fitted once
  const pending = new Map<string, Promise<StoredFit>>()
  const arrays = new Map<number, ReturnType<typeof arraysOf>>()
  await Promise.all(toFit.map(async ({ row, settings, revision }) => {
    const k = `${row.id}|${fitSettingsKey(settings)}`
    if (!pending.has(k)) {
      if (!arrays.has(row.id)) arrays.set(row.id, arraysOf(row))
      pending.set(k, compute.fitSpectrum({ spectrum: arrays.get(row.id)!, settings }).then((o) => (o.ok
        ? o.result as unknown as StoredFit
        : { fit: null, lines: {}, flags: [flagName('fit-failed')], error: o.error })))
    }
    out.get(revision)!.set(row.id, { result: await pending.get(k)!, settings, methodVersion: FIT_METHOD_VERSION, origin: 'fitted' })
  }))
  return out
}

const detections = (r: StoredFit) => Object.values(r.lines ?? {}).filter((l) => l.detected).length

/** Stores the fits that are new under their revision (a repeated chunk overwrites its own). */
async function insertFits(tx: Tx, projectId: string, fits: FitsByRevision) {
  const rows: Array<typeof lineFits.$inferInsert> = []
  for (const [revision, byId] of fits) {
    for (const [spectrumId, f] of byId) {
      if (f.origin === 'stored') continue
      rows.push({
        spectrumId, revision, projectId, settings: f.settings, result: f.result, chi2: f.result.fit?.chi2 ?? null, dof: f.result.fit?.dof ?? null,
        detections: detections(f.result), flags: f.result.flags ?? [], methodVersion: f.methodVersion,
      })
    }
  }
  if (!rows.length) return
  await tx.insert(lineFits).values(rows).onConflictDoUpdate({
    target: [lineFits.spectrumId, lineFits.revision],
    set: { settings: sql`excluded.settings`, result: sql`excluded.result`, chi2: sql`excluded.chi2`, dof: sql`excluded.dof`, detections: sql`excluded.detections`, flags: sql`excluded.flags`, methodVersion: sql`excluded.method_version`, createdAt: sql`now()` },
  })
}

/**
 * The galaxy record a fit gives: its measurements as the lines, the spectrum's redshift and flux
 * unit, the stored position kept. Null when the fit failed or measured nothing the record can hold.
 */
export function galaxyFromFit(row: Pick<SpectrumRow, 'galaxyId' | 'redshift' | 'fluxUnit'>, f: FitRecord | undefined, position: { ra: number | null; dec: number | null } | undefined): GalaxyInputDto | null {
  const m = f?.result.measurements
  if (!m || f.result.error) return null
  return galaxyFromMeasurements({
    id: row.galaxyId, redshift: row.redshift, fluxUnit: row.fluxUnit,
    ...(position?.ra != null ? { ra: position.ra } : {}), ...(position?.dec != null ? { dec: position.dec } : {}),
  }, m)
}

/**
 * A galaxy record from a fit's measurements (the same record `POST /diagnostics` takes), or null
 * when they do not make one (logged: the fit's output should always be a valid record).
 */
export function galaxyFromMeasurements(
  base: { id: string; redshift: number; fluxUnit?: number; ra?: number; dec?: number }, m: NonNullable<StoredFit['measurements']>,
): GalaxyInputDto | null {
  const parsed = GalaxyInputSchema.safeParse({
    ...base, lines: m.lines, ...(Object.keys(m.ew ?? {}).length ? { ew: m.ew } : {}), ...(Object.keys(m.fwhm ?? {}).length ? { fwhm: m.fwhm } : {}),
  })
  if (!parsed.success) {
    logger.warn({ galaxyId: base.id, issue: parsed.error.issues[0] }, 'the measurements of a fit do not make a galaxy record')
    return null
  }
  return parsed.data
}

async function positions(tx: Executor, projectId: string, keys: string[]) {
  const rows = (await tx.execute<{ key: string; ra: number | null; dec: number | null }>(sql`select key, ra, dec from galaxies
    where project_id = ${projectId}::uuid and key = any(array(select json_array_elements_text(${JSON.stringify(keys)}::json)))`)).rows
  return new Map(rows.map((r) => [r.key, r]))
}

/**
 * Writes one chunk of an upload's fit inside the caller's transaction: the new fits, and for each
 * spectrum fitted the galaxy record (from the newest revision's fit) with its results under every plan.
 */
async function writeFitChunk(tx: Tx, compute: ComputePool, projectId: string, intakeId: string, rows: SpectrumRow[], plans: RevisionPlan[], fits: FitsByRevision) {
  await insertFits(tx, projectId, fits)
  const current = plans[0]
  const pos = await positions(tx, projectId, rows.map((r) => r.galaxyId))
  const written: Array<{ row: SpectrumRow; gal: GalaxyInputDto }> = []
  for (const row of rows) {
    const gal = galaxyFromFit(row, fits.get(current.revision)!.get(row.id), pos.get(row.galaxyId))
    if (gal) written.push({ row, gal })
  }
  if (!written.length) return 0
  const computed: Array<{ revision: number; results: StoredRows }> = []
  for (const plan of plans) {
    // each revision's diagnostics come from its own fit (its fit settings may differ)
    const inputs = written.map(({ row, gal }) => (plan === current ? gal : galaxyFromFit(row, fits.get(plan.revision)!.get(row.id), pos.get(row.galaxyId)) ?? gal))
    computed.push({ revision: plan.revision, results: await computeRows(compute, inputs, plan.settings) })
  }
  await writeGalaxies(tx, projectId, intakeId, written.map((w) => w.gal), computed, {
    onExisting: 'replace', bumpVersion: false,
    provenance: written.map(({ row }) => ({ source: 'line-fit', spectrumId: row.id, revision: current.revision } satisfies LineFitProvenance)),
  })
  return written.length
}

interface FitJobParams { uploadId: string; intakeId: string }

/**
 * The `fit` job of an upload: its spectra in chunks by id. Each chunk's fits, galaxy records,
 * results and the job's cursor are committed together on the lease's connection, so a resumed job
 * continues after its last committed chunk. The fitting runs before the chunk's transaction; the
 * project row is locked while the chunk is written, so no revision appears half-way.
 */
async function runFitJob(lease: JobLease, job: JobRow, ctx: GalaxyContext) {
  const { db } = ctx
  const { uploadId, intakeId } = job.params as FitJobParams
  const projectId = job.projectId
  let lastId = job.lastId, done = job.done
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(spectra).where(and(eq(spectra.uploadId, uploadId), gt(spectra.id, lastId)))
  await lease.db.update(jobs).set({ total: done + n }).where(eq(jobs.id, job.id))
  let size = FIT_CHUNK_FIRST
  const fitAfter = async (after: number) => {
    const limit = size
    size = Math.min(FIT_CHUNK_MAX, 2 * size)
    const rows = await selectSpectra(db, and(eq(spectra.uploadId, uploadId), gt(spectra.id, after))!, limit)
    if (!rows.length) return null
    const planned = await revisionsToCompute(db, projectId)
    return { rows, planned, fits: await fitsFor(db, ctx.compute, rows, planned) }
  }
  let next = fitAfter(lastId)
  for (;;) {
    const chunk = await next
    if (!chunk) break
    const { rows, planned } = chunk
    let { fits } = chunk
    next = fitAfter(rows[rows.length - 1].id)
    // should the write below fail, the job stops there and this chunk's fits are never awaited
    next.catch(() => {})
    await writingGalaxies(ctx, projectId, () => lease.db.transaction(async (tx) => {
      await tx.select({ id: projects.id }).from(projects).where(eq(projects.id, projectId)).for('update')
      const plans = await revisionsToCompute(tx, projectId)
      if (plans.map((p) => p.revision).join() !== planned.map((p) => p.revision).join()) fits = await fitsFor(tx, ctx.compute, rows, plans)
      const written = await writeFitChunk(tx, ctx.compute, projectId, intakeId, rows, plans, fits)
      done += rows.length
      lastId = rows[rows.length - 1].id
      await tx.update(intakes).set({ rowsAccepted: sql`${intakes.rowsAccepted} + ${written}`, revision: plans[0].revision }).where(eq(intakes.id, intakeId))
      await tx.update(jobs).set({ done, lastId, heartbeatAt: sql`now()` }).where(eq(jobs.id, job.id))
    }))
  }
  await lease.db.transaction(async (tx) => {
    await bumpDataVersion(tx, projectId)
    await tx.update(intakes).set({ status: 'committed', finishedAt: sql`now()`, rowsRejected: sql`${intakes.rowsTotal} - ${intakes.rowsAccepted}` }).where(eq(intakes.id, intakeId))
    await tx.update(jobs).set({ status: 'done', done, total: done, finishedAt: sql`now()`, heartbeatAt: sql`now()` }).where(eq(jobs.id, job.id))
  })
}

registerJobRunner('fit', {
  run: runFitJob,
  continues: true, // chunks are committed with the cursor: a resumed job continues after the last one
  inProcess: true, // the queue's workers take recomputes only
  async failed(db, job) {
    const { intakeId } = job.params as FitJobParams
    // what the committed chunks wrote stays (and can be undone as an intake); the rest was never fitted
    await db.update(intakes).set({ status: 'failed', finishedAt: sql`now()` }).where(eq(intakes.id, intakeId))
  },
})

/**
 * In a recompute, the galaxies whose lines came from their spectrum's fit are refitted under the
 * revision's fit settings (or reuse a fit with the same settings) and computed from its
 * measurements. A fit made anew also becomes the galaxy's record, when the record is not from a
 * newer revision: under an intake of kind `spectra` that the job creates on its first such chunk.
 */
registerRecomputeStage(async (ctx, job, rows, inputs, settings) => {
  const { db } = ctx
  const ids = rows.map((r) => r.id)
  const found = (await db.execute<{ galaxy_index: number; spectrum_id: number; record_revision: number }>(sql`
    select g.id as galaxy_index, s.id as spectrum_id, (g.provenance->>'revision')::int as record_revision
    from galaxies g join spectra s on s.project_id = g.project_id and s.galaxy_id = g.key and s.id = (g.provenance->>'spectrumId')::bigint
    where g.id = any(${'{' + ids.join(',') + '}'}::bigint[]) and g.provenance->>'source' = 'line-fit'`)).rows
  if (!found.length) return undefined
  const specRows = await selectSpectra(db, sql`${spectra.id} = any(${'{' + found.map((f) => f.spectrum_id).join(',') + '}'}::bigint[])`)
  const byId = new Map(specRows.map((s) => [s.id, s]))
  const plan: RevisionPlan = { revision: job.revision!, settings }
  const fits = await fitsFor(db, ctx.compute, specRows, [plan])
  const renewed: Array<{ gal: GalaxyInputDto; spectrumId: number }> = []
  for (const f of found) {
    const i = ids.indexOf(Number(f.galaxy_index))
    const row = byId.get(Number(f.spectrum_id))!
    const rec = fits.get(plan.revision)!.get(row.id)
    const gal = galaxyFromFit(row, rec, rows[i])
    if (!gal) continue
    inputs[i] = gal
    if (rec!.origin === 'fitted' && plan.revision >= f.record_revision) renewed.push({ gal, spectrumId: row.id })
  }
  return async (tx: Tx) => {
    await insertFits(tx, job.projectId, fits)
    if (!renewed.length) return
    const params = job.params as { refitIntakeId?: string } | null
    let intakeId = params?.refitIntakeId
    if (!intakeId) {
      const [i] = await tx.insert(intakes).values({
        projectId: job.projectId, kind: 'spectra', status: 'committed', userId: job.createdBy, fileName: `refit under revision ${plan.revision}`,
        revision: plan.revision, finishedAt: new Date(),
      }).returning({ id: intakes.id })
      intakeId = i.id
      job.params = { ...(params ?? {}), refitIntakeId: intakeId }
      await tx.update(jobs).set({ params: job.params }).where(eq(jobs.id, job.id))
    }
    await writeGalaxies(tx, job.projectId, intakeId, renewed.map((r) => r.gal), [], {
      onExisting: 'replace', bumpVersion: false,
      provenance: renewed.map((r) => ({ source: 'line-fit', spectrumId: r.spectrumId, revision: plan.revision } satisfies LineFitProvenance)),
    })
    await tx.update(intakes).set({ rowsTotal: sql`${intakes.rowsTotal} + ${renewed.length}`, rowsAccepted: sql`${intakes.rowsAccepted} + ${renewed.length}` }).where(eq(intakes.id, intakeId))
  }
})
