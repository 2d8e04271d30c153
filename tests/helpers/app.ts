import request from 'supertest'
import { eq } from 'drizzle-orm'
import { connect, type Db } from '../../server/db/client.ts'
import { createApp } from '../../server/app.ts'
import { loadConfig } from '../../server/config.ts'
import { startMailCatcher } from '../../server/lib/mail-catcher.ts'
import { queuedMailer, smtpDelivery, type Deliver } from '../../server/lib/mailer.ts'
import { outboxMessages } from '../../server/db/schema.ts'
import { freshDatabaseUrl } from './db.ts'
import { startJobQueue, startRecomputeWorker } from '../../server/services/jobs.service.ts'
import { createComputePool, type ComputePool } from '../../server/compute/pool.ts'
import { DiagramCache } from '../../server/services/diagram-cache.ts'
import { galaxyContext, type GalaxyContext } from '../../server/services/galaxy-context.ts'

export interface TestApp {
  app: ReturnType<typeof createApp>
  db: Db
  databaseUrl: string
  compute: ComputePool
  /** the app's galaxy context (database, compute threads, diagram cache), which its recompute worker shares */
  galaxy: GalaxyContext
  /** every captured message, once the mail queue has delivered what it holds */
  mails: () => Promise<Array<typeof outboxMessages.$inferSelect>>
  close: () => Promise<void>
}

type Mail = typeof outboxMessages.$inferSelect

/** Where signedInAgent finds the mail of an app (a TestApp's, or a server started by a test). */
const mailboxes = new Map<unknown, () => Promise<Mail[]>>()
export function registerMailbox(app: unknown, db: Db) {
  mailboxes.set(app, () => db.select().from(outboxMessages).orderBy(outboxMessages.id))
}

/**
 * The real Express app on a fresh real database, with the real local mail catcher behind the
 * product's mail queue. `delivery` may wrap the SMTP hand-over (e.g. to hold it back).
 */
export async function startTestApp(env: Record<string, string> = {}, opts: { jobs?: boolean; delivery?: (smtp: Deliver) => Deliver } = {}): Promise<TestApp> {
  const databaseUrl = await freshDatabaseUrl()
  const db = connect(databaseUrl, 10)
  const catcher = await startMailCatcher(db)
  const smtp = smtpDelivery(catcher.url)
  const mailer = queuedMailer(opts.delivery ? opts.delivery(smtp.deliver) : smtp.deliver, { onClose: smtp.close })
  const config = loadConfig({ ...process.env, JWT_SECRET: 'test-secret-not-for-production', APP_URL: 'http://127.0.0.1:8080', AUTH_RATE_LIMIT: '1000', DIAGRAM_WARMUP_MS: '0', ...env })
  // the runtime's worker threads, so the tests exercise the same path as the server
  const compute = createComputePool(config)
  const diagrams = new DiagramCache(config.diagramWarmupMs)
  const galaxy = galaxyContext({ db, config, compute, diagrams, mailer })
  const jobs = opts.jobs ? await startJobQueue(databaseUrl) : undefined
  if (jobs) await startRecomputeWorker(jobs.boss, galaxy)
  const app = createApp({ db, config, mailer, jobs: jobs?.queue, compute, diagrams })
  const mails = async () => { await mailer.idle(); return db.select().from(outboxMessages).orderBy(outboxMessages.id) }
  mailboxes.set(app, mails)
  return {
    app, db, databaseUrl, compute, galaxy, mails,
    close: async () => { mailboxes.delete(app); await jobs?.queue.stop(); diagrams.close(); await compute.close(); await mailer.idle(); mailer.close(); await catcher.close(); await db.$client.end() },
  }
}

export const tokenIn = (text: string, path: string) => new RegExp(`${path}\\?token=([A-Za-z0-9_-]+)`).exec(text)?.[1]

/** Waits (up to 10 s) for a captured message that matches; mail is delivered in the background. */
export async function waitForMail(mails: () => Promise<Mail[]>, match: (m: Mail) => boolean): Promise<Mail> {
  for (let i = 0; i < 200; i++) {
    const found = (await mails()).filter(match).at(-1)
    if (found) return found
    await new Promise((ok) => setTimeout(ok, 50))
  }
  throw new Error('the expected mail did not arrive')
}

/**
 * Signs up (or in) and returns an agent that keeps the cookies and sends the CSRF header. The
 * address is verified by following the link of the captured mail, unless `verify: false`.
 */
export async function signedInAgent(app: TestApp['app'], email: string, password = 'correct horse battery', name = 'Test Person', opts: { verify?: boolean } = {}) {
  const agent = request.agent(app)
  const up = await agent.post('/api/v1/auth/sign-up').send({ email, password, name })
  if (up.status !== 201) throw new Error(`sign-up failed: ${up.status} ${JSON.stringify(up.body)}`)
  const res = await agent.post('/api/v1/auth/sign-in').send({ email, password })
  if (res.status >= 300) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? [])
  const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(cookies.join(';'))?.[1] ?? '')
  const userId = res.body.user.id as string
  const session = /rg_session=([^;]+)/.exec(cookies.join(';'))?.[1] ?? ''
  if (opts.verify !== false && (await agent.get('/api/v1/me')).body.emailVerified === false) {
    const mails = mailboxes.get(app)
    if (!mails) throw new Error('no mailbox known for this app: registerMailbox(app, db) first')
    const mail = await waitForMail(mails, (m) => m.toAddress === email.toLowerCase() && m.text.includes('/verify-email?token='))
    const verified = await agent.post('/api/v1/auth/verify-email').set('X-CSRF-Token', csrf).send({ token: tokenIn(mail.text, '/verify-email') })
    if (verified.status !== 200) throw new Error(`verification failed: ${verified.status} ${JSON.stringify(verified.body)}`)
  }
  return { agent, csrf, userId, cookie: `rg_session=${session}; rg_csrf=${csrf}` }
}

export { eq }
