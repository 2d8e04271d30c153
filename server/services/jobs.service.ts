import PgBoss from 'pg-boss'
import { drizzle } from 'drizzle-orm/node-postgres'
import { and, asc, desc, eq, gt, inArray, sql } from 'drizzle-orm'
import type pg from 'pg'
import type { Db } from '../db/client.ts'
import * as schema from '../db/schema.ts'
import { galaxies, jobs, projects } from '../db/schema.ts'
import { notFound } from '../http/problem.ts'
import { logger } from '../lib/logger.ts'
import { revisionSettings } from './projects.service.ts'
import { computeRows } from './galaxy-ingest.service.ts'
import { storeResults } from './result-copy.ts'
import { currentLayoutId } from './stored-results.ts'
import { warmDiagramSoon } from './diagrams.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'

export const RECOMPUTE_QUEUE = 'recompute'
const CHUNK = 2000
/** How often a process looks for jobs whose worker has gone (a crashed peer's). */
const SWEEP_MS = 30_000
/** A queued job nobody has taken for this long lost its queue message (pg-boss expires active ones after 15 min). */
const QUEUED_GRACE_MS = 15 * 60_000
/** A queued in-process job not started within this time lost its process before it began. */
const IN_PROCESS_GRACE_MS = 60_000

export interface JobQueue { enqueue(name: string, data: object): Promise<void>; stop(): Promise<void> }

/** The JobQueue face of a pg-boss instance. */
const bossQueue = (boss: PgBoss): JobQueue => ({
  async enqueue(name, data) { await boss.send(name, data, { retryLimit: 3, retryDelay: 5 }) },
  async stop() { await boss.stop({ graceful: true, timeout: 10_000, wait: true }) },
})

/** A pg-boss queue in the same PostgreSQL; workers may run here or in `npm run worker` elsewhere. */
export async function startJobQueue(databaseUrl: string): Promise<{ queue: JobQueue; boss: PgBoss }> {
  const boss = new PgBoss({ connectionString: databaseUrl, max: 4, schema: 'pgboss' })
  boss.on('error', (err) => logger.warn({ err: String(err) }, 'job queue error'))
  await boss.start()
  await boss.createQueue(RECOMPUTE_QUEUE)
  return {
    boss,
    queue: bossQueue(boss),
  }
}

type JobRow = typeof jobs.$inferSelect

export function jobDto(j: JobRow) {
  const params = j.params as { intakeId?: string; uploadId?: string } | null
  return {
    id: j.id, kind: j.kind, status: j.status, revision: j.revision, total: j.total, done: j.done, error: j.error,
    createdAt: j.createdAt.toISOString(), finishedAt: j.finishedAt?.toISOString() ?? null,
    intakeId: params?.intakeId ?? null, uploadId: params?.uploadId ?? null, heartbeatAt: j.heartbeatAt?.toISOString() ?? null,
    resumedAt: j.resumedAt?.toISOString() ?? null, resumeCount: j.resumeCount, resumedFrom: j.resumedFrom,
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

// ---- leases -------------------------------------------------------------------------------------

/** Namespace of the advisory locks that are job leases ("RGJB"). */
const LEASE_SPACE = 0x52474a42

/**
 * A job's lease: a session advisory lock held on one connection for as long as the job runs. A
 * worker that dies (SIGKILL, a crashed machine) loses its connection, and PostgreSQL frees the lock
 * at once, so any process sharing the database knows that the job's worker has gone — no clocks,
 * no process ids. `db` runs on the lease's own connection: a transaction there dies with the lease.
 */
export interface JobLease { db: Db; client: pg.PoolClient; release(): Promise<void> }

export async function takeLease(db: Db, jobId: string): Promise<JobLease | null> {
  const client = await db.$client.connect()
  try {
    const { rows } = await client.query<{ ok: boolean }>('select pg_try_advisory_lock($1, hashtext($2)) as ok', [LEASE_SPACE, jobId])
    if (!rows[0].ok) { client.release(); return null }
  } catch (err) {
    client.release(err as Error)
    throw err
  }
  const leased = drizzle(client, { schema, casing: 'snake_case' }) as unknown as Db
  let released = false
  return {
    db: leased, client,
    async release() {
      if (released) return
      released = true
      try {
        await client.query('select pg_advisory_unlock($1, hashtext($2))', [LEASE_SPACE, jobId])
        client.release()
      } catch (err) {
        client.release(err as Error) // a broken connection: the lock went with it
      }
    },
  }
}

/** Whether the lease's connection still answers (a job that lost it must stop without writing its end). */
async function leaseAlive(lease: JobLease) {
  try { await lease.client.query('select 1'); return true } catch { return false }
}

// ---- running jobs -------------------------------------------------------------------------------

export interface JobRunner {
  /** Does the work; throws to fail the job. The job row is `running` when it starts. `ctx.db` is the app's pool, not the lease. */
  run(lease: JobLease, job: JobRow, ctx: GalaxyContext): Promise<void>
  /** Whether this process can run it (an intake job needs the staged file on this machine's disk). */
  runnableHere?(job: JobRow, db: Db): Promise<boolean>
  /** Called when the job fails (after its row says so), e.g. to reopen an intake. */
  failed?(db: Db, job: JobRow, err: unknown): Promise<void>
  /** Whether a resumed job continues from its last committed chunk (or starts again: all or nothing). */
  continues: boolean
  /** Runs in the process that has it, not through the queue. */
  inProcess?: boolean
}

const runners = new Map<string, JobRunner>()
export function registerJobRunner(kind: string, runner: JobRunner) { runners.set(kind, runner) }

/** What a failed job says: the database's own message, not the query and its parameters around it. */
export function errorText(err: unknown): string {
  let e = err
  while (e instanceof Error && e.message.startsWith('Failed query:') && e.cause) e = e.cause
  const text = e instanceof Error ? e.message : String(e)
  return text.length > 500 ? text.slice(0, 497) + '…' : text
}

/**
 * Runs one job under its lease. Without the lease (another worker has it) nothing happens, so a
 * job sent twice runs once. A job found `running` here had a worker that went away: it is marked
 * as resumed and continues (see `JobRunner.continues`). `finalAttempt: false` leaves a failure
 * queued for the queue's retry.
 */
export async function runJob(ctx: GalaxyContext, jobId: string, opts: { finalAttempt?: boolean } = {}): Promise<'ran' | 'busy' | 'finished'> {
  const { db } = ctx
  const lease = await takeLease(db, jobId)
  if (!lease) return 'busy'
  let job: JobRow | undefined
  try {
    ;[job] = await lease.db.select().from(jobs).where(eq(jobs.id, jobId))
    if (!job || job.status === 'done' || job.status === 'failed') return 'finished'
    const runner = runners.get(job.kind)
    if (!runner) throw new Error(`no runner for jobs of kind ${job.kind}`)
    const [started] = await lease.db.update(jobs).set({
      status: 'running', heartbeatAt: sql`now()`,
      ...(job.status === 'running' ? resumedSet(runner, job) : {}),
    }).where(eq(jobs.id, jobId)).returning()
    await runner.run(lease, started, ctx)
    return 'ran'
  } catch (err) {
    if (!job || !(await leaseAlive(lease))) throw err // another worker resumes it
    if (opts.finalAttempt === false) {
      await db.update(jobs).set({ status: 'queued', error: errorText(err) }).where(eq(jobs.id, jobId))
      throw err
    }
    const [failed] = await db.update(jobs).set({ status: 'failed', error: errorText(err), finishedAt: sql`now()` }).where(eq(jobs.id, jobId)).returning()
    await runners.get(job.kind)?.failed?.(db, failed, err)
    throw err
  } finally {
    await lease.release()
  }
}

const resumedSet = (runner: JobRunner, job: JobRow) => ({
  resumedAt: sql`now()`, resumeCount: sql`${jobs.resumeCount} + 1`, resumedFrom: runner.continues ? job.done : 0,
  ...(runner.continues ? {} : { done: 0, lastId: 0 }),
})

/** Starts a job: through the queue when there is one (and the kind allows), else in this process. */
export async function dispatchJob(ctx: GalaxyContext, queue: JobQueue | undefined, job: Pick<JobRow, 'id' | 'kind'>) {
  const runner = runners.get(job.kind)
  if (queue && !runner?.inProcess) { await queue.enqueue(job.kind, { jobId: job.id }); return }
  runJob(ctx, job.id).catch((err) => logger.error({ err: errorText(err), jobId: job.id }, `${job.kind} job failed`))
}

/**
 * Jobs left `running` or `queued` by a worker that has gone (its lease is free) are taken up again
 * at once: marked as resumed (the dashboard says so, with how far they had come) and sent to a
 * worker, which continues from the last committed chunk. Called at start-up and every 30 s, so a
 * surviving process also resumes the jobs of a crashed peer. Returns the ids resumed.
 */
export async function resumeOrphanedJobs(ctx: GalaxyContext, queue?: JobQueue): Promise<string[]> {
  const { db } = ctx
  const open = await db.select().from(jobs).where(inArray(jobs.status, ['queued', 'running'])).orderBy(asc(jobs.createdAt))
  const resumed: string[] = []
  for (const job of open) {
    const runner = runners.get(job.kind)
    if (!runner) continue
    // a queued job is its starter's to send, unless that is long past (the message was lost)
    const grace = runner.inProcess ? IN_PROCESS_GRACE_MS : QUEUED_GRACE_MS
    if (job.status === 'queued' && Date.now() - (job.resumedAt ?? job.createdAt).getTime() < grace) continue
    if (runner.runnableHere && !(await runner.runnableHere(job, db))) continue
    const lease = await takeLease(db, job.id)
    if (!lease) continue // its worker is alive
    try {
      if (job.status === 'running') {
        const marked = await lease.db.update(jobs).set({ status: 'queued', ...resumedSet(runner, job) })
          .where(and(eq(jobs.id, job.id), eq(jobs.status, 'running'))).returning({ id: jobs.id })
        if (!marked.length) continue
      } else {
        const [still] = await lease.db.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, job.id))
        if (still?.status !== 'queued') continue
      }
    } finally {
      await lease.release()
    }
    logger.info({ jobId: job.id, kind: job.kind, done: job.done, total: job.total }, 'resuming a job whose worker had gone')
    resumed.push(job.id)
    await dispatchJob(ctx, queue, job)
  }
  return resumed
}

/** Sweeps for orphaned jobs now and every 30 s, until `stop`. */
export function watchOrphanedJobs(ctx: GalaxyContext, queue?: JobQueue) {
  let stopped = false
  const sweep = () => {
    if (stopped) return
    resumeOrphanedJobs(ctx, queue).catch((err) => { if (!stopped) logger.warn({ err: errorText(err) }, 'looking for orphaned jobs failed') })
  }
  sweep()
  const timer = setInterval(sweep, SWEEP_MS)
  timer.unref()
  return { stop() { stopped = true; clearInterval(timer) } }
}

/** Progress of a running job, written on the pool so that it is seen while the job's transaction is open. */
export async function reportProgress(db: Db, jobId: string, set: { done: number; total?: number }) {
  await db.update(jobs).set({ ...set, heartbeatAt: sql`now()` }).where(eq(jobs.id, jobId))
}

// ---- recompute ----------------------------------------------------------------------------------

/**
 * A step of every recompute chunk, given its galaxies (`rows`, with the inputs built from their
 * records): it may replace inputs (lines measured anew from a spectrum) and returns the writes to
 * commit with the chunk's results. The spectra fit registers one (spectra-fit.service.ts).
 */
export type RecomputeStage = (ctx: GalaxyContext, job: JobRow, rows: Array<{ id: number; key: string; ra: number | null; dec: number | null }>, inputs: GalaxyInputDto[], settings: Settings) =>
  Promise<((tx: Parameters<Parameters<Db['transaction']>[0]>[0]) => Promise<void>) | undefined>
const recomputeStages: RecomputeStage[] = []
export function registerRecomputeStage(stage: RecomputeStage) { recomputeStages.push(stage) }

/**
 * Recomputes every galaxy of a project under one revision, in chunks by id. Each chunk's results
 * and the job's cursor (`lastId`, `done`) are committed together on the lease's connection, so a
 * resumed job continues after the last committed chunk; a chunk's earlier results of the revision are
 * deleted before its own are copied in, so a repeated chunk only overwrites what it wrote.
 */
async function recompute(lease: JobLease, job: JobRow, ctx: GalaxyContext) {
  const { db } = ctx
  const { settings } = await revisionSettings(db, job.projectId, job.revision!)
  let lastId = job.lastId, done = job.done
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(galaxies)
    .where(and(eq(galaxies.projectId, job.projectId), gt(galaxies.id, lastId)))
  await lease.db.update(jobs).set({ total: done + n }).where(eq(jobs.id, job.id))
  for (;;) {
    const rows = await db.select({ id: galaxies.id, key: galaxies.key, redshift: galaxies.redshift, ra: galaxies.ra, dec: galaxies.dec, fluxUnit: galaxies.fluxUnit, input: galaxies.input, version: sql<string>`galaxies.xmin::text` })
      .from(galaxies).where(and(eq(galaxies.projectId, job.projectId), gt(galaxies.id, lastId))).orderBy(asc(galaxies.id)).limit(CHUNK)
    if (!rows.length) break
    const inputs: GalaxyInputDto[] = rows.map((r) => ({
      id: r.key, ...(r.redshift !== null ? { redshift: r.redshift } : {}), fluxUnit: r.fluxUnit, ...(r.input as Pick<GalaxyInputDto, 'lines' | 'ew' | 'fwhm'>),
    }))
    const writes: Array<Awaited<ReturnType<RecomputeStage>>> = []
    for (const stage of recomputeStages) writes.push(await stage(ctx, job, rows, inputs, settings))
    // the compute threads encode the stored rows: the event loop only puts the ids in front
    const results = await computeRows(ctx.compute, inputs, settings)
    done += rows.length
    lastId = rows[rows.length - 1].id
    await lease.db.transaction(async (tx) => {
      // a galaxy written since it was read (an intake replaced it, and stored its results under this
      // revision too) keeps those: only the galaxies still as read get this chunk's results
      const ids = '{' + rows.map((r) => r.id).join(',') + '}'
      const now = new Map((await tx.execute<{ id: number; version: string }>(sql`select id, xmin::text as version from galaxies where id = any(${ids}::bigint[]) for share`)).rows.map((r) => [r.id, r.version]))
      const fresh = rows.map((r) => (now.get(r.id) === r.version ? r.id : undefined))
      for (const write of writes) await write?.(tx)
      await storeResults(tx, { projectId: job.projectId, revision: job.revision!, layoutId: await currentLayoutId(tx) }, results, fresh, 0, fresh.filter((id): id is number => id !== undefined))
      await tx.update(jobs).set({ done, lastId, heartbeatAt: sql`now()` }).where(eq(jobs.id, job.id))
    })
  }
  await lease.db.transaction(async (tx) => {
    await tx.update(projects).set({ resultsRevision: sql`greatest(${projects.resultsRevision}, ${job.revision})` }).where(eq(projects.id, job.projectId))
    await tx.update(jobs).set({ status: 'done', done, total: done, finishedAt: sql`now()` }).where(eq(jobs.id, job.id))
  })
  warmDiagramSoon(ctx, job.projectId)
}

registerJobRunner('recompute', { run: recompute, continues: true })

/**
 * Subscribes this process as a worker of the recompute queue, and resumes — now and every 30 s —
 * the jobs whose worker has gone (a crash, a restart: see `resumeOrphanedJobs`).
 */
export async function startRecomputeWorker(boss: PgBoss, ctx: GalaxyContext) {
  await boss.work<{ jobId: string }>(RECOMPUTE_QUEUE, { pollingIntervalSeconds: 1, batchSize: 1, includeMetadata: true }, async ([job]) => {
    await runJob(ctx, job.data.jobId, { finalAttempt: job.retryCount >= job.retryLimit })
  })
  const watch = watchOrphanedJobs(ctx, bossQueue(boss))
  boss.once('stopped', () => watch.stop())
  return watch
}
