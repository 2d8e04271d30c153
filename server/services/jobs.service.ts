import PgBoss from 'pg-boss'
import { and, asc, desc, eq, gt, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { galaxies, jobs, projects } from '../db/schema.ts'
import { notFound } from '../http/problem.ts'
import { logger } from '../lib/logger.ts'
import { revisionSettings } from './projects.service.ts'
import { computeRows, upsertResultsJson, warmDiagramSoon } from './galaxies.service.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'

export const RECOMPUTE_QUEUE = 'recompute'
const CHUNK = 2000

export interface JobQueue { enqueue(name: string, data: object): Promise<void>; stop(): Promise<void> }

/** A pg-boss queue in the same PostgreSQL; workers may run here or in `npm run worker` elsewhere. */
export async function startJobQueue(databaseUrl: string): Promise<{ queue: JobQueue; boss: PgBoss }> {
  const boss = new PgBoss({ connectionString: databaseUrl, max: 4, schema: 'pgboss' })
  boss.on('error', (err) => logger.warn({ err: String(err) }, 'job queue error'))
  await boss.start()
  await boss.createQueue(RECOMPUTE_QUEUE)
  return {
    boss,
    queue: {
      async enqueue(name, data) { await boss.send(name, data, { retryLimit: 3, retryDelay: 5 }) },
      async stop() { await boss.stop({ graceful: true, timeout: 10_000, wait: true }) },
    },
  }
}

export function jobDto(j: typeof jobs.$inferSelect) {
  return {
    id: j.id, kind: j.kind, status: j.status, revision: j.revision, total: j.total, done: j.done, error: j.error,
    createdAt: j.createdAt.toISOString(), finishedAt: j.finishedAt?.toISOString() ?? null,
  }
}

export async function getJob(db: Db, projectId: string, jobId: string) {
  const [j] = await db.select().from(jobs).where(and(eq(jobs.id, jobId), eq(jobs.projectId, projectId)))
  if (!j) throw notFound('job')
  return jobDto(j)
}

export async function listJobs(db: Db, projectId: string) {
  const rows = await db.select().from(jobs).where(eq(jobs.projectId, projectId)).orderBy(desc(jobs.createdAt)).limit(50)
  return rows.map(jobDto)
}

/**
 * Recomputes every galaxy of a project under one revision, in chunks by id, recording progress.
 * Idempotent: results are upserted, so a retried job just overwrites what it wrote.
 */
export async function runRecompute(db: Db, jobId: string) {
  const [job] = await db.select().from(jobs).where(eq(jobs.id, jobId))
  if (!job || job.status === 'done') return
  const { settings } = await revisionSettings(db, job.projectId, job.revision!)
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(galaxies).where(eq(galaxies.projectId, job.projectId))
  await db.update(jobs).set({ status: 'running', total: n, done: 0 }).where(eq(jobs.id, jobId))
  let lastId = 0, done = 0
  try {
    for (;;) {
      const rows = await db.select({ id: galaxies.id, key: galaxies.key, redshift: galaxies.redshift, ra: galaxies.ra, dec: galaxies.dec, fluxUnit: galaxies.fluxUnit, input: galaxies.input })
        .from(galaxies).where(and(eq(galaxies.projectId, job.projectId), gt(galaxies.id, lastId))).orderBy(asc(galaxies.id)).limit(CHUNK)
      if (!rows.length) break
      const inputs: GalaxyInputDto[] = rows.map((r) => ({
        id: r.key, ...(r.redshift !== null ? { redshift: r.redshift } : {}), fluxUnit: r.fluxUnit, ...(r.input as Pick<GalaxyInputDto, 'lines' | 'ew' | 'fwhm'>),
      }))
      // the compute threads also serialise the stored rows: the event loop only joins strings
      const results = await computeRows(inputs, settings)
      await upsertResultsJson(db, job.projectId, job.revision!, results.json(rows.map((r) => r.id), 0))
      done += rows.length
      lastId = rows[rows.length - 1].id
      await db.update(jobs).set({ done }).where(eq(jobs.id, jobId))
    }
    await db.transaction(async (tx) => {
      await tx.update(projects).set({ resultsRevision: sql`greatest(${projects.resultsRevision}, ${job.revision})` }).where(eq(projects.id, job.projectId))
      await tx.update(jobs).set({ status: 'done', done, finishedAt: sql`now()` }).where(eq(jobs.id, jobId))
    })
    warmDiagramSoon(db, job.projectId)
  } catch (err) {
    await db.update(jobs).set({ status: 'failed', error: err instanceof Error ? err.message : String(err), finishedAt: sql`now()` }).where(eq(jobs.id, jobId))
    throw err
  }
}

/** Subscribes this process as a worker of the recompute queue. */
export async function startRecomputeWorker(boss: PgBoss, db: Db) {
  await boss.work<{ jobId: string }>(RECOMPUTE_QUEUE, { pollingIntervalSeconds: 1, batchSize: 1 }, async ([job]) => {
    await runRecompute(db, job.data.jobId)
  })
}
