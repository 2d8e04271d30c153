import { afterAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import pg from 'pg'
import { PROJECT_ROOT } from '../../server/config.ts'
import { freePort } from '../../server/db/embedded-postgres.ts'
import { freshDatabaseUrl } from '../helpers/db.ts'
import { STAR_FORMING, syntheticCsv, zipOf } from '../helpers/spectra.ts'

/** The real server killed (SIGKILL) while it fits a batch of spectra, then started again: the fit job resumes. */
const cleanups: Array<() => Promise<void> | void> = []
afterAll(async () => { for (const c of cleanups.reverse()) await c() })
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))

describe('SIGKILL during a batch fit', () => {
  it('resumes the fit job at start-up from its last committed chunk and fits every spectrum once', async () => {
    const databaseUrl = await freshDatabaseUrl()
    const port = await freePort()
    const dataDir = mkdtempSync(join(PROJECT_ROOT, '.test-data-'))
    cleanups.push(() => rmSync(dataDir, { recursive: true, force: true }))
    const start = () => spawn(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'server', 'cli', 'start.ts')], {
      env: { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), SEED_DEMO: '0', BUILD_CLIENT: '0', DATA_DIR: dataDir, JWT_SECRET: 'kill-test', LOG_LEVEL: 'silent', COMPUTE_THREADS: '1' },
      stdio: 'ignore',
    })
    const base = `http://127.0.0.1:${port}`
    const waitUp = async () => { for (let i = 0; i < 100; i++) { try { if ((await fetch(`${base}/api/health`)).ok) return } catch { /* not yet */ } await sleep(200) } throw new Error('server did not start') }
    let child: ChildProcess = start()
    cleanups.push(() => { child.kill('SIGKILL') })
    await waitUp()
    const agent = request.agent(base)
    await agent.post('/api/v1/auth/sign-up').send({ email: 'fit-kill@example.org', password: 'reliable password', name: 'Kill' })
    const signIn = await agent.post('/api/v1/auth/sign-in').send({ email: 'fit-kill@example.org', password: 'reliable password' })
    const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(([] as string[]).concat(signIn.headers['set-cookie']).join(';'))![1])
    const projectId = (await agent.post('/api/v1/projects').set('X-CSRF-Token', csrf).send({ name: 'fit restart' })).body.id as string
    const job = async (id: string) => (await agent.get(`/api/v1/projects/${projectId}/jobs/${id}`)).body

    const n = 80
    const zip = await zipOf(Array.from({ length: n }, (_, i) => [`K-${i}.csv`, syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 500 + i, from: 4800 })] as [string, string]))
    const res = await agent.post(`/api/v1/projects/${projectId}/spectra`).set('X-CSRF-Token', csrf).field('defaults', JSON.stringify({ redshift: 0.02 })).attach('files', zip, { filename: 'kill.zip' })
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(202)
    const jobId = res.body.job.id as string
    let atKill = 0
    for (let i = 0; i < 6000; i++) {
      const j = await job(jobId)
      if (j.done >= 16 && j.done <= n - 32) { atKill = j.done; break }
      if (j.status === 'done') break
      await sleep(10)
    }
    expect(atKill).toBeGreaterThan(0)
    child.kill('SIGKILL')
    await sleep(300)
    const client = new pg.Client({ connectionString: databaseUrl })
    await client.connect()
    cleanups.push(() => client.end())
    const crashed = (await client.query('select status, done from jobs where id = $1', [jobId])).rows[0]
    expect(crashed.status).toBe('running')
    const committedAtKill = crashed.done as number
    const fitsAtKill = Number((await client.query('select count(*) from line_fits where project_id = $1', [projectId])).rows[0].count)
    expect(fitsAtKill).toBe(committedAtKill) // a chunk's fits are committed with the job's cursor, nothing more

    child = start()
    await waitUp()
    let resumed = await job(jobId)
    for (let i = 0; i < 900 && resumed.status !== 'done' && resumed.status !== 'failed'; i++) { await sleep(100); resumed = await job(jobId) }
    expect(resumed).toMatchObject({ status: 'done', done: n, total: n, resumeCount: 1, resumedFrom: committedAtKill, error: null })
    const counts = (await client.query(`select (select count(*)::int from line_fits where project_id = $1) as fits,
      (select count(*)::int from galaxies where project_id = $1 and provenance->>'source' = 'line-fit') as galaxies,
      (select count(*)::int from results where project_id = $1) as results,
      (select count(*)::int from galaxy_versions v join galaxies g on g.id = v.galaxy_id where g.project_id = $1) as versions`, [projectId])).rows[0]
    // every spectrum fitted once, every galaxy written once (no earlier record copied twice), its results computed
    expect(counts).toEqual({ fits: n, galaxies: n, results: n, versions: 0 })
    expect((await agent.get(`/api/v1/projects/${projectId}/intakes/${res.body.upload.intakeId}`)).body).toMatchObject({ status: 'committed', rowsAccepted: n })
    console.log(`SIGKILL: fit job killed at ${committedAtKill} of ${n} spectra, resumed from there`)
    child.kill('SIGTERM')
  }, 300_000)
})
