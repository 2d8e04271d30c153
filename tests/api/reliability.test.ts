import { afterAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { spawn, spawnSync, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import pg from 'pg'
import { PROJECT_ROOT, loadConfig } from '../../server/config.ts'
import { freePort, startEmbeddedPostgres } from '../../server/db/embedded-postgres.ts'
import { connect, runMigrations } from '../../server/db/client.ts'
import { createApp } from '../../server/app.ts'
import { backupDatabase, restoreDatabase } from '../../server/db/backup.ts'
import { freshDatabaseUrl } from '../helpers/db.ts'
import { galaxy } from '../helpers/fixtures.ts'

const cleanups: Array<() => Promise<void> | void> = []
afterAll(async () => { for (const c of cleanups.reverse()) await c() })

const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))

async function signUpAndProject(base: string | ReturnType<typeof createApp>) {
  const agent = request.agent(base as never)
  await agent.post('/api/v1/auth/sign-up').send({ email: 'rel@example.org', password: 'reliable password', name: 'Rel' })
  const res = await agent.post('/api/v1/auth/sign-in').send({ email: 'rel@example.org', password: 'reliable password' }) // sign-up sets no session
  const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(([] as string[]).concat(res.headers['set-cookie']).join(';'))![1])
  const p = await agent.post('/api/v1/projects').set('X-CSRF-Token', csrf).send({ name: 'reliability' })
  return { agent, csrf, projectId: p.body.id as string }
}

describe('database restart with requests flowing', () => {
  it('answers 503 while PostgreSQL is down, recovers without a restart, and keeps every acknowledged write', async () => {
    const dir = mkdtempSync(join(PROJECT_ROOT, '.pg-restart-'))
    const cluster = await startEmbeddedPostgres({ dir, port: await freePort(), durable: false })
    // the cluster itself may live elsewhere (a root run in a private folder): remove both
    cleanups.push(() => { cluster.stop(); rmSync(cluster.dir, { recursive: true, force: true }); rmSync(dir, { recursive: true, force: true }) })
    const db = connect(cluster.url, 5)
    await runMigrations(db)
    const app = createApp({ db, config: loadConfig({ ...process.env, JWT_SECRET: 'x', AUTH_RATE_LIMIT: '1000' }), mailer: { send: async () => {}, close: () => {} } })
    cleanups.push(() => db.$client.end())
    const { agent, csrf, projectId } = await signUpAndProject(app)

    const acknowledged: string[] = []
    const statuses = new Map<number, number>()
    let n = 0, stop = false
    const writer = (async () => {
      while (!stop) {
        const id = `W-${n++}`
        const res = await agent.post(`/api/v1/projects/${projectId}/galaxies/batch`).set('X-CSRF-Token', csrf).send({ galaxies: [galaxy(id)] })
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1)
        if (res.status === 200) acknowledged.push(id)
        await sleep(10)
      }
    })()
    await sleep(800)
    const bin = spawnSync('bash', ['-c', 'ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1'], { encoding: 'utf8' }).stdout.trim()
    const as = process.getuid?.() === 0 ? ['runuser', '-u', 'postgres', '--'] : []
    const pgctl = (...args: string[]) => spawnSync(as[0] ?? `${bin}/pg_ctl`, as.length ? [...as.slice(1), `${bin}/pg_ctl`, ...args] : args, { encoding: 'utf8' })
    pgctl('-D', cluster.dataDir, '-m', 'fast', '-w', 'stop')
    await sleep(600)
    const health = await request(app).get('/api/health')
    expect(health.status).toBe(503)
    expect(health.body.db).toBe('unavailable')
    const during = await agent.get(`/api/v1/projects/${projectId}/galaxies`)
    expect(during.status).toBe(503)
    expect(during.headers['retry-after']).toBeDefined()
    // started again as `npm start` would: the same folder (or the one it was moved to) and port
    await startEmbeddedPostgres({ dir, port: cluster.port, durable: false })
    for (let i = 0; i < 50 && (await request(app).get('/api/health')).status !== 200; i++) await sleep(200)
    expect((await request(app).get('/api/health')).status).toBe(200)
    await sleep(800)
    stop = true
    await writer
    expect([...statuses.keys()].filter((s) => s >= 500 && s !== 503)).toEqual([])
    expect(statuses.get(503) ?? 0).toBeGreaterThan(0)
    const { rows } = await db.$client.query<{ key: string }>('select key from galaxies where project_id = $1', [projectId])
    const present = new Set(rows.map((r) => r.key))
    for (const id of acknowledged) expect(present.has(id), id).toBe(true)
    console.log(`restart: ${acknowledged.length} acknowledged writes, all ${present.size >= acknowledged.length ? 'present' : 'NOT present'}; statuses ${JSON.stringify(Object.fromEntries(statuses))}`)
  }, 90_000)
})

describe('SIGKILL in the middle of a large intake, then of a recompute', () => {
  it('leaves none of the intake, resumes both jobs at start-up, and ends with the whole intake and all results', async () => {
    const databaseUrl = await freshDatabaseUrl()
    const port = await freePort()
    const dataDir = mkdtempSync(join(PROJECT_ROOT, '.test-data-'))
    cleanups.push(() => rmSync(dataDir, { recursive: true, force: true }))
    const start = () => spawn(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'server', 'cli', 'start.ts')], {
      env: { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), SEED_DEMO: '0', BUILD_CLIENT: '0', DATA_DIR: dataDir, JWT_SECRET: 'kill-test', LOG_LEVEL: 'silent' },
      stdio: 'ignore',
    })
    const base = `http://127.0.0.1:${port}`
    const waitUp = async () => { for (let i = 0; i < 100; i++) { try { if ((await fetch(`${base}/api/health`)).ok) return } catch { /* not yet */ } await sleep(200) } throw new Error('server did not start') }
    let child: ChildProcess = start()
    cleanups.push(() => { child.kill('SIGKILL') })
    await waitUp()
    const { agent, csrf, projectId } = await signUpAndProject(base)
    const job = async (id: string) => (await agent.get(`/api/v1/projects/${projectId}/jobs/${id}`)).body
    const untilDone = async (id: string) => {
      for (let i = 0; i < 900; i++) { const j = await job(id); if (j.status === 'done' || j.status === 'failed') return j; await sleep(200) }
      throw new Error('the job did not finish')
    }
    const rows = 60_000
    const csv = ['id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err,oiii_5007_flux,oiii_5007_err',
      ...Array.from({ length: rows }, (_, i) => `K-${i},0.05,300,6,80,3,60,3,50,3`)].join('\n')
    const staged = await agent.post(`/api/v1/projects/${projectId}/intakes/csv`).set('X-CSRF-Token', csrf).attach('file', Buffer.from(csv), { filename: 'big.csv', contentType: 'text/csv' })
    expect(staged.status).toBe(201)
    const commit = await agent.post(`/api/v1/projects/${projectId}/intakes/${staged.body.intake.id}/commit`).set('X-CSRF-Token', csrf).send({ mapping: staged.body.suggestedMapping })
    expect(commit.status).toBe(202)
    const intakeJob = commit.body.job.id as string
    const client = new pg.Client({ connectionString: databaseUrl })
    await client.connect()
    cleanups.push(() => client.end())
    // kill while the intake's transaction is writing: wait for its first inserts to be under way
    let seen = false
    for (let i = 0; i < 4000 && !seen; i++) {
      const { rows: a } = await client.query(`select count(*)::int as n from pg_stat_activity where pid <> pg_backend_pid()
        and datname = current_database() and xact_start is not null and query ilike '%galaxies%'`)
      seen = a[0].n > 0
      if (!seen) await sleep(5)
    }
    expect(seen).toBe(true)
    child.kill('SIGKILL')
    await sleep(500)
    const count = async () => Number((await client.query('select count(*) from galaxies where project_id = $1', [projectId])).rows[0].count)
    expect(await count()).toBe(0) // nothing of a half-stored intake is visible
    child = start()
    await waitUp()
    // taken up again at start-up, from the first row (the crashed transaction stored nothing)
    const resumedIntake = await untilDone(intakeJob)
    expect(resumedIntake).toMatchObject({ status: 'done', done: rows, resumeCount: 1, resumedFrom: 0 })
    expect(await count()).toBe(rows)
    expect((await agent.get(`/api/v1/projects/${projectId}/intakes/${staged.body.intake.id}`)).body.status).toBe('committed')

    // a recompute of every galaxy, killed part-way, continues from its last committed chunk
    const change = await agent.put(`/api/v1/projects/${projectId}/assumptions`).set('X-CSRF-Token', csrf).send({ settings: { intrinsicBalmer: 3.1 } })
    expect(change.status).toBe(201)
    const recompute = change.body.job.id as string
    let atKill = 0
    for (let i = 0; i < 6000; i++) {
      const j = await job(recompute)
      if (j.done >= 4000 && j.done <= rows - 10_000) { atKill = j.done; break }
      if (j.status === 'done') break
      await sleep(20)
    }
    expect(atKill).toBeGreaterThan(0)
    child.kill('SIGKILL')
    await sleep(300)
    const crashed = await client.query('select status, done from jobs where id = $1', [recompute])
    expect(crashed.rows[0].status).toBe('running') // what the dashboard used to show for 15 minutes
    const committedAtKill = crashed.rows[0].done as number
    child = start()
    await waitUp()
    const resumed = await untilDone(recompute)
    expect(resumed).toMatchObject({ status: 'done', done: rows, resumeCount: 1, resumedFrom: committedAtKill })
    const results = await client.query('select count(*)::int as n from results where project_id = $1 and revision = 2', [projectId])
    expect(results.rows[0].n).toBe(rows)
    expect((await agent.get(`/api/v1/projects/${projectId}`)).body.resultsRevision).toBe(2)
    console.log(`SIGKILL: intake killed mid-transaction (0 of ${rows} rows visible), resumed and stored whole; recompute killed at ${committedAtKill} of ${rows}, resumed from there`)
    child.kill('SIGTERM')
  }, 300_000)
})

describe('backups', () => {
  it('db:backup then db:restore round-trips every galaxy and result', async () => {
    const src = await freshDatabaseUrl()
    const db = connect(src, 4)
    cleanups.push(() => db.$client.end())
    const app = createApp({ db, config: loadConfig({ ...process.env, JWT_SECRET: 'x', AUTH_RATE_LIMIT: '1000' }), mailer: { send: async () => {}, close: () => {} } })
    const { agent, csrf, projectId } = await signUpAndProject(app)
    await agent.post(`/api/v1/projects/${projectId}/galaxies/batch`).set('X-CSRF-Token', csrf).send({ galaxies: Array.from({ length: 50 }, (_, i) => galaxy(`BK-${i}`)) })
    const file = join(mkdtempSync(join(PROJECT_ROOT, '.test-data-')), 'backup.dump')
    cleanups.push(() => rmSync(join(file, '..'), { recursive: true, force: true }))
    backupDatabase(src, file)
    const dst = await freshDatabaseUrl()
    restoreDatabase(dst, file)
    const dump = async (url: string) => {
      const c = new pg.Client({ connectionString: url }); await c.connect()
      const g = (await c.query('select key, redshift, input from galaxies order by key')).rows
      const r = (await c.query(`select g.key, r.revision, r.method_version, r.layout, r.measures::text as measures, r.measures_exact::text as exact, encode(r.codes, 'hex') as codes, r.result from results r join galaxies g on g.id = r.galaxy_id order by g.key, r.revision`)).rows
      await c.end()
      return { g, r }
    }
    const a = await dump(src), b = await dump(dst)
    expect(a.g).toHaveLength(50)
    expect(a.r).toHaveLength(50)
    expect(a.r[0].measures).toMatch(/^\{/) // typed columns, restored as such
    expect(b).toEqual(a)
  }, 60_000)
})
