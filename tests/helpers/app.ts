import request from 'supertest'
import { eq } from 'drizzle-orm'
import { connect, type Db } from '../../server/db/client.ts'
import { createApp } from '../../server/app.ts'
import { loadConfig } from '../../server/config.ts'
import { startMailCatcher } from '../../server/lib/mail-catcher.ts'
import { smtpMailer } from '../../server/lib/mailer.ts'
import { outboxMessages } from '../../server/db/schema.ts'
import { freshDatabaseUrl } from './db.ts'
import { startJobQueue, startRecomputeWorker } from '../../server/services/jobs.service.ts'
import { createComputePool, type ComputePool } from '../../server/compute/pool.ts'

export interface TestApp {
  app: ReturnType<typeof createApp>
  db: Db
  databaseUrl: string
  compute: ComputePool
  mails: () => Promise<Array<typeof outboxMessages.$inferSelect>>
  close: () => Promise<void>
}

/** The real Express app on a fresh real database, with the real local mail catcher. */
export async function startTestApp(env: Record<string, string> = {}, opts: { jobs?: boolean } = {}): Promise<TestApp> {
  const databaseUrl = await freshDatabaseUrl()
  const db = connect(databaseUrl, 10)
  const catcher = await startMailCatcher(db)
  const mailer = smtpMailer(catcher.url)
  const config = loadConfig({ ...process.env, JWT_SECRET: 'test-secret-not-for-production', APP_URL: 'http://127.0.0.1:8080', AUTH_RATE_LIMIT: '1000', DIAGRAM_WARMUP_MS: '0', ...env })
  const jobs = opts.jobs ? await startJobQueue(databaseUrl) : undefined
  if (jobs) await startRecomputeWorker(jobs.boss, db)
  // the runtime's worker threads, so the tests exercise the same path as the server
  const compute = createComputePool(config)
  const app = createApp({ db, config, mailer, jobs: jobs?.queue, compute })
  return {
    app, db, databaseUrl, compute,
    mails: () => db.select().from(outboxMessages).orderBy(outboxMessages.id),
    close: async () => { await jobs?.queue.stop(); await compute.close(); mailer.close(); await catcher.close(); await db.$client.end() },
  }
}

/** Signs up (or in) and returns an agent that keeps the cookies and sends the CSRF header. */
export async function signedInAgent(app: TestApp['app'], email: string, password = 'correct horse battery', name = 'Test Person') {
  const agent = request.agent(app)
  let res = await agent.post('/api/v1/auth/sign-up').send({ email, password, name })
  if (res.status === 409) res = await agent.post('/api/v1/auth/sign-in').send({ email, password })
  if (res.status >= 300) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? [])
  const csrf = /rg_csrf=([^;]+)/.exec(cookies.join(';'))?.[1] ?? ''
  const userId = res.body.user.id as string
  const session = /rg_session=([^;]+)/.exec(cookies.join(';'))?.[1] ?? ''
  return { agent, csrf: decodeURIComponent(csrf), userId, cookie: `rg_session=${session}; rg_csrf=${csrf}` }
}

export { eq }
