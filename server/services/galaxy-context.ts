import type { Config } from '../config.ts'
import type { Db } from '../db/client.ts'
import { inProcessCompute, type ComputePool } from '../compute/pool.ts'
import type { DiagramCache } from './diagram-cache.ts'

/**
 * What galaxy writes, reads and jobs of one app share: its database, its compute threads, the
 * ingestion budget and its diagram documents. Made from the app's parts (AppDeps), so a recompute
 * worker started beside the app (server/runtime.ts) shares the same cache and threads.
 */
export interface GalaxyContext {
  readonly db: Db
  /** the compute threads; the calling thread once they are closed (a job outliving its app) */
  readonly compute: ComputePool
  /** compute units one authenticated batch may use (COMPUTE_BUDGET) */
  readonly batchBudget: number
  readonly diagrams: DiagramCache
}

/** Bundles an app's parts; without compute threads the science runs on the calling thread. */
export function galaxyContext(parts: { db: Db; config: Pick<Config, 'computeBudget'>; compute?: ComputePool; diagrams: DiagramCache }): GalaxyContext {
  const own = inProcessCompute()
  const pool = parts.compute ?? own
  return {
    db: parts.db, batchBudget: parts.config.computeBudget, diagrams: parts.diagrams,
    get compute() { return pool.closed ? own : pool },
  }
}
