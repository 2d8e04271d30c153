import { spawnSync } from 'node:child_process'
import { existsSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'
import type { Server } from 'node:http'
import { PROJECT_ROOT, loadConfig, type Config } from './config.ts'
import { connect, runMigrations, type Db } from './db/client.ts'
import { startEmbeddedPostgres, portIsFree, type EmbeddedPostgres } from './db/embedded-postgres.ts'
import { startMailCatcher } from './lib/mail-catcher.ts'
import { smtpMailer, type Mailer } from './lib/mailer.ts'
import { createApp } from './app.ts'
import { createComputePool } from './compute/pool.ts'
import { DiagramCache } from './services/diagram-cache.ts'
import { galaxyContext } from './services/galaxy-context.ts'
import { logger } from './lib/logger.ts'
import { startJobQueue, startRecomputeWorker } from './services/jobs.service.ts'
import { expireStagedIntakes } from './services/intake.service.ts'
import { convertStoredDocuments } from './services/stored-results.ts'
import { forgetOldSignInFailures } from './services/sign-in-throttle.ts'

export interface Runtime {
  config: Config
  db: Db
  mailer: Mailer
  url: string
  server: Server
  stop: () => Promise<void>
}

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0
  const st = statSync(path)
  if (!st.isDirectory()) return st.mtimeMs
  let newest = st.mtimeMs
  for (const name of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, name)))
  return newest
}

/** Builds the client with Vite when dist/ is missing or older than any client source. */
export function buildClientIfStale(log: (m: string) => void) {
  const built = join(PROJECT_ROOT, 'dist', 'index.html')
  const sources = ['src', 'shared', 'public', 'index.html', 'vite.config.ts', 'package.json']
    .map((p) => newestMtime(join(PROJECT_ROOT, p)))
  const builtAt = existsSync(built) ? statSync(built).mtimeMs : 0
  if (builtAt >= Math.max(...sources)) return
  log('building the client (vite build) …')
  const r = spawnSync(process.execPath, [join(PROJECT_ROOT, 'node_modules', 'vite', 'bin', 'vite.js'), 'build', '--logLevel', 'warn'],
    { cwd: PROJECT_ROOT, stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production' } })
  if (r.status !== 0) throw new Error('the client build failed')
}

export interface StartOptions {
  env?: NodeJS.ProcessEnv
  serveClient?: boolean
  buildClient?: boolean
  /** seed the demo project; `{ spectra: false }` leaves out its invented spectra (and their background fit) */
  seed?: boolean | { spectra: boolean }
  /** Throwaway cluster for tests: no durability, own folder. */
  embeddedDir?: string
  durable?: boolean
  log?: (m: string) => void
}

export async function startRuntime(opts: StartOptions = {}): Promise<Runtime> {
  const log = opts.log ?? ((m: string) => console.log(m))
  const config = loadConfig(opts.env ?? process.env)
  if (!(await portIsFree(config.port, config.host)) && config.port !== 0) {
    throw new Error(`port ${config.port} on ${config.host} is already in use — stop the other process or set PORT to a free port`)
  }
  let pg: EmbeddedPostgres | undefined
  let databaseUrl = config.databaseUrl
  if (!databaseUrl) {
    pg = await startEmbeddedPostgres({
      dir: opts.embeddedDir ?? join(config.dataDir, 'pg'),
      port: config.embeddedPgPort,
      durable: opts.durable ?? true,
      log,
    })
    databaseUrl = pg.url
    log(`embedded PostgreSQL on 127.0.0.1:${pg.port} (cluster in ${pg.dir}${pg.startedHere ? '' : ', already running'})`)
  }
  const db = connect(databaseUrl, 20)
  await runMigrations(db)
  // results stored as documents by earlier versions become typed columns in the background (they
  // are read either way meanwhile)
  const stopConverting = new AbortController()
  const converting = convertStoredDocuments(db, log, stopConverting.signal).catch((err) => logger.warn({ err }, 'converting stored result documents failed'))

  let catcher: Awaited<ReturnType<typeof startMailCatcher>> | undefined
  let smtpUrl = config.smtpUrl
  if (!smtpUrl) {
    catcher = await startMailCatcher(db, config.mailCatcherPort)
    smtpUrl = catcher.url
  }
  const mailer = smtpMailer(smtpUrl)
  // the compute threads and the diagram cache of this process's app, which its worker shares
  const compute = createComputePool(config)
  const diagrams = new DiagramCache(config.diagramWarmupMs)
  // one in-process worker; more can run as `npm run worker` against the same database
  const jobs = await startJobQueue(databaseUrl)
  const context = galaxyContext({ db, config, compute, diagrams, mailer })
  await startRecomputeWorker(jobs.boss, context)

  if (opts.seed) {
    const { seedDemo } = await import('./seed/demo.ts')
    await seedDemo(db, log, { context, spectra: opts.seed === true || opts.seed.spectra })
  }
  if (opts.buildClient) buildClientIfStale(log)

  // abandoned CSV uploads and sign-in failure counters past their time: swept at start and then hourly
  const sweep = () => {
    expireStagedIntakes(db, config.stagedIntakeHours).catch((err) => logger.warn({ err }, 'sweeping staged intakes failed'))
    forgetOldSignInFailures(db).catch((err) => logger.warn({ err }, 'sweeping sign-in failures failed'))
  }
  sweep()
  const sweeper = setInterval(sweep, 60 * 60 * 1000)
  sweeper.unref()

  const app = createApp({ db, config, mailer, jobs: jobs.queue, compute, diagrams, serveClient: opts.serveClient })
  const server = await new Promise<Server>((ok, fail) => {
    const s = app.listen(config.port, config.host, () => ok(s))
    s.once('error', (err: NodeJS.ErrnoException) => fail(err.code === 'EADDRINUSE'
      ? new Error(`port ${config.port} on ${config.host} is already in use — stop the other process or set PORT to a free port`)
      : err))
  })
  const addr = server.address()
  const port = typeof addr === 'object' && addr ? addr.port : config.port
  const url = `http://${config.host}:${port}`
  let stopping: Promise<void> | undefined
  const stop = () => stopping ??= (async () => {
    clearInterval(sweeper)
    await new Promise<void>((ok) => { server.close(() => ok()); server.closeAllConnections() })
    await jobs.queue.stop().catch(() => {})
    stopConverting.abort()
    await converting
    // let queued mail reach the relay (or the catcher, which closes next), but never hang the stop
    await Promise.race([mailer.idle?.(), new Promise((ok) => setTimeout(ok, 5000).unref())])
    diagrams.close()
    await compute.close()
    mailer.close()
    await catcher?.close()
    await db.$client.end().catch(() => {})
    pg?.stop()
  })()
  logger.debug({ url }, 'listening')
  return { config, db, mailer, url, server, stop }
}
