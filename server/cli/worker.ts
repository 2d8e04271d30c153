import { loadConfig } from '../config.ts'
import { connect } from '../db/client.ts'
import { startJobQueue, startRecomputeWorker } from '../services/jobs.service.ts'
import { DiagramCache } from '../services/diagram-cache.ts'
import { galaxyContext } from '../services/galaxy-context.ts'
import '../services/spectra-fit.service.ts' // a recompute refits the spectra of galaxies whose lines came from a fit

// `npm run worker`: a recompute worker in its own process (this machine or another) on DATABASE_URL.
const config = loadConfig()
if (!config.databaseUrl) {
  console.error('set DATABASE_URL to the PostgreSQL that the Ratiograph server uses')
  process.exit(2)
}
const db = connect(config.databaseUrl, 4)
const { boss, queue } = await startJobQueue(config.databaseUrl)
// the science on this thread and no diagram warm-up: the servers warm their own caches
await startRecomputeWorker(boss, galaxyContext({ db, config, diagrams: new DiagramCache(0) }))
console.log('recompute worker running; Ctrl-C stops it')
const stop = async () => { await queue.stop(); await db.$client.end(); process.exit(0) }
process.on('SIGINT', stop)
process.on('SIGTERM', stop)
