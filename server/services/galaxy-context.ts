import type { Config } from '../config.ts'
import type { Db } from '../db/client.ts'
import type { Mailer } from '../lib/mailer.ts'
import { inProcessCompute, type ComputePool } from '../compute/pool.ts'
import type { DiagramCache } from './diagram-cache.ts'

/** The mail a finished large intake sends its starter: the app's mail queue and where its links point. */
export interface IntakeMail {
  readonly mailer: Mailer
  readonly appUrl: string
  /** intakes of at least this many rows mail when they finish (LARGE_INTAKE_ROWS) */
  readonly largeIntakeRows: number
}

/**
 * What galaxy writes, reads and jobs of one app share: its database, its compute threads, the
 * ingestion budget, its diagram documents and its mail. Made from the app's parts (AppDeps), so a
 * recompute worker started beside the app (server/runtime.ts) shares the same cache and threads.
 */
export interface GalaxyContext {
  readonly db: Db
  /** the compute threads; the calling thread once they are closed (a job outliving its app) */
  readonly compute: ComputePool
  /** compute units one authenticated batch may use (COMPUTE_BUDGET) */
  readonly batchBudget: number
  readonly diagrams: DiagramCache
  /** absent: jobs run by this context send no mail (a worker process without a mailer) */
  readonly intakeMail?: IntakeMail
}

/** Bundles an app's parts; without compute threads the science runs on the calling thread, without a mailer no job mails. */
export function galaxyContext(parts: {
  db: Db; config: Pick<Config, 'computeBudget' | 'appUrl' | 'largeIntakeRows'>; compute?: ComputePool; diagrams: DiagramCache; mailer?: Mailer
}): GalaxyContext {
  const own = inProcessCompute()
  const pool = parts.compute ?? own
  const { config, mailer } = parts
  return {
    db: parts.db, batchBudget: config.computeBudget, diagrams: parts.diagrams,
    ...(mailer ? { intakeMail: { mailer, appUrl: config.appUrl, largeIntakeRows: config.largeIntakeRows } } : {}),
    get compute() { return pool.closed ? own : pool },
  }
}
