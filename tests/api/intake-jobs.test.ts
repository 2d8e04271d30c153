import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import pg from 'pg'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { resumeOrphanedJobs } from '../../server/services/jobs.service.ts'

/**
 * Large CSV commits as background `intake` jobs (progress, all or nothing, failure mid-way), and
 * jobs whose worker has gone being resumed (recompute from its last committed chunk).
 */
let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string

beforeAll(async () => {
  // files above 3,000 rows are stored in the background (1,000-row chunks inside)
  t = await startTestApp({ INTAKE_INLINE_ROWS: '3000', LARGE_INTAKE_ROWS: '4000' })
  owner = await signedInAgent(t.app, 'jobs-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'jobs' })).body.id
})
afterAll(async () => { await t.close() })

const P = () => `/api/v1/projects/${projectId}`
const post = (path: string, body?: object) => owner.agent.post(P() + path).set('X-CSRF-Token', owner.csrf).send(body)
const get = (path: string) => owner.agent.get(P() + path)
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))
const q = async (text: string, values: unknown[] = []) => (await t.db.$client.query(text, values)).rows
const count = async (prefix: string) => Number((await q('select count(*) from galaxies where project_id = $1 and key like $2', [projectId, `${prefix}%`]))[0].count)
const HEADER = 'id,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err,nii_6584_flux,nii_6584_err,oiii_5007_flux,oiii_5007_err'
const csvOf = (prefix: string, n: number) => [HEADER, ...Array.from({ length: n }, (_, i) => `${prefix}${i},0.05,${300 + (i % 50)},6,80,3,60,3,50,3`)].join('\n')
const upload = (body: string, name = 'big.csv') =>
  owner.agent.post(`${P()}/intakes/csv`).set('X-CSRF-Token', owner.csrf).attach('file', Buffer.from(body), { filename: name, contentType: 'text/csv' })

/** Polls a job until it ends, noting every `done` it showed on the way. */
async function follow(jobId: string, onPoll?: () => Promise<void>) {
  const seen: number[] = []
  for (let i = 0; i < 1200; i++) {
    const j = (await get(`/jobs/${jobId}`)).body
    if (seen.at(-1) !== j.done) seen.push(j.done)
    if (j.status === 'done' || j.status === 'failed') return { job: j, seen }
    await onPoll?.()
    await sleep(20)
  }
  throw new Error('the job did not finish')
}

describe('a large CSV commit', () => {
  it('answers 202 with an intake job, shows progress, keeps the intake invisible until it is whole, and stays responsive', async () => {
    const rows = 7000
    const staged = await upload(csvOf('BIG-', rows))
    const id = staged.body.intake.id
    const res = await post(`/intakes/${id}/commit`, { mapping: staged.body.suggestedMapping, fluxUnit: 1e-17 })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.job).toMatchObject({ kind: 'intake', total: rows, intakeId: id, resumeCount: 0 })
    expect(['queued', 'running']).toContain(res.body.job.status)
    expect(res.body.intake.status).toBe('committing')
    // a second commit of the same intake is refused while it runs
    expect((await post(`/intakes/${id}/commit`, { mapping: staged.body.suggestedMapping })).status).toBe(409)

    let midway = 0, slowest = 0
    const { job, seen } = await follow(res.body.job.id, async () => {
      const n = await count('BIG-')
      if (n !== 0 && n !== rows) midway++
      const started = Date.now()
      expect((await request(t.app).get('/api/health')).status).toBe(200)
      slowest = Math.max(slowest, Date.now() - started)
    })
    expect(job).toMatchObject({ status: 'done', done: rows, total: rows, error: null })
    expect(job.heartbeatAt).not.toBeNull()
    expect(seen.some((d) => d > 0 && d < rows)).toBe(true) // progress between chunks
    expect(midway).toBe(0) // never a part of the intake
    // the event loop kept answering between chunks (a liveness bound, generous for a loaded machine;
    // the inline commit of a file this size blocked it for seconds)
    expect(slowest).toBeLessThan(2000)
    expect(await count('BIG-')).toBe(rows)
    const intake = (await get(`/intakes/${id}`)).body
    expect(intake).toMatchObject({ status: 'committed', rowsAccepted: rows, report: { inserted: rows, skipped: 0, onExisting: 'skip', jobId: job.id } })
    expect(Number((await q('select count(*) from results r join galaxies g on g.id = r.galaxy_id where g.project_id = $1 and g.key like $2', [projectId, 'BIG-%']))[0].count)).toBe(rows)
    // the starter of a large intake is mailed
    for (let i = 0; i < 50 && !(await t.mails()).some((m) => m.subject === `Intake finished: big.csv (${rows} galaxies)`); i++) await sleep(100)
    expect((await t.mails()).map((m) => m.subject)).toContain(`Intake finished: big.csv (${rows} galaxies)`)
    // the jobs list holds it for the dashboard
    expect((await get('/jobs')).body.items[0]).toMatchObject({ id: job.id, kind: 'intake', status: 'done' })
  })

  it('is all or nothing when the job fails mid-way: nothing is stored, the intake is staged again with the reason', async () => {
    const before = Number((await q('select count(*) from galaxies where project_id = $1', [projectId]))[0].count)
    const versionBefore = (await q('select data_version from projects where id = $1', [projectId]))[0].data_version
    // a real failure in PostgreSQL while the third chunk is written
    await q(`create function fail_on_key() returns trigger language plpgsql as $$
      begin if new.key = 'MID-4500' then raise exception 'disk full (injected at %)', new.key; end if; return new; end $$`)
    await q('create trigger fail_on_key before insert on galaxies for each row execute function fail_on_key()')
    try {
      const staged = await upload(csvOf('MID-', 6000), 'mid.csv')
      const res = await post(`/intakes/${staged.body.intake.id}/commit`, { mapping: staged.body.suggestedMapping })
      expect(res.status).toBe(202)
      const { job, seen } = await follow(res.body.job.id)
      expect(job.status).toBe('failed')
      expect(job.error).toBe('disk full (injected at MID-4500)')
      expect(seen.some((d) => d >= 4000)).toBe(true) // it got past two chunks before failing
      expect(await count('MID-')).toBe(0)
      expect(Number((await q('select count(*) from galaxies where project_id = $1', [projectId]))[0].count)).toBe(before)
      expect((await q('select data_version from projects where id = $1', [projectId]))[0].data_version).toBe(versionBefore)
      const intake = (await get(`/intakes/${staged.body.intake.id}`)).body
      expect(intake).toMatchObject({ status: 'staged', report: { error: 'disk full (injected at MID-4500)' } })
      await q('drop trigger fail_on_key on galaxies')
      // the same staged file commits once the cause is gone
      const again = await post(`/intakes/${staged.body.intake.id}/commit`, { mapping: staged.body.suggestedMapping })
      expect(again.status).toBe(202)
      expect((await follow(again.body.job.id)).job.status).toBe('done')
      expect(await count('MID-')).toBe(6000)
    } finally {
      await q('drop trigger if exists fail_on_key on galaxies')
      await q('drop function if exists fail_on_key()')
    }
  })

  it('a file with a bad row late in it fails as a job with the problems in the intake report; nothing stored', async () => {
    const lines = csvOf('LATE-', 5000).split('\n')
    lines[4800] = lines[4800].replace(',80,3,', ',eighty,3,')
    const staged = await upload(lines.join('\n'))
    const res = await post(`/intakes/${staged.body.intake.id}/commit`, { mapping: staged.body.suggestedMapping })
    expect(res.status).toBe(202)
    const { job } = await follow(res.body.job.id)
    expect(job).toMatchObject({ status: 'failed', error: '1 problem(s) in the file; nothing was stored' })
    expect(await count('LATE-')).toBe(0)
    const intake = (await get(`/intakes/${staged.body.intake.id}`)).body
    expect(intake).toMatchObject({ status: 'staged', report: { problemCount: 1, problems: [{ row: 4801, column: 5, field: 'hbeta_flux', message: '"eighty" is not a number' }] } })
  })
})

describe('undoing a large intake', () => {
  it('runs as an undo job (202) with progress, restores the replaced records and removes the created ones', async () => {
    const commitAll = async (csv: string, onExisting: string) => {
      const staged = await upload(csv)
      const res = await post(`/intakes/${staged.body.intake.id}/commit`, { mapping: staged.body.suggestedMapping, onExisting })
      expect(res.status).toBe(202)
      expect((await follow(res.body.job.id)).job.status).toBe('done')
      return staged.body.intake.id as string
    }
    const first = await commitAll(csvOf('UJ-', 3500), 'skip')
    const before = (await get('/galaxies/UJ-1234')).body
    const second = await commitAll(csvOf('UJ-', 3500).replaceAll(',0.05,', ',0.07,'), 'replace')
    expect((await get('/galaxies/UJ-1234')).body.redshift).toBe(0.07)

    const undo = await post(`/intakes/${second}/undo`)
    expect(undo.status, JSON.stringify(undo.body)).toBe(202)
    expect(undo.body.job).toMatchObject({ kind: 'undo', total: 3500 })
    expect((await post(`/intakes/${second}/undo`)).status).toBe(409) // one at a time
    const { job, seen } = await follow(undo.body.job.id)
    expect(job).toMatchObject({ status: 'done', error: null })
    expect(seen.some((d) => d > 0 && d < 3500)).toBe(true)
    const after = (await get('/galaxies/UJ-1234')).body
    expect({ ...after, computedAt: null, revisions: null }).toEqual({ ...before, computedAt: null, revisions: null })
    expect((await get(`/intakes/${second}`)).body).toMatchObject({ status: 'undone', report: { undone: { restored: 3500, removed: 0 } } })

    const undoFirst = await post(`/intakes/${first}/undo`)
    expect(undoFirst.status).toBe(202)
    expect((await follow(undoFirst.body.job.id)).job.status).toBe('done')
    expect(await count('UJ-')).toBe(0)
  })
})

describe('jobs whose worker has gone', () => {
  it('a recompute left running (no lease, partial results) is resumed at once from its last committed chunk, with the same results', async () => {
    const n = 5000
    for (let s = 0; s < n; s += 2500) {
      const r = await post('/galaxies/batch', { galaxies: Array.from({ length: 2500 }, (_, i) => galaxy(`RC-${s + i}`, { redshift: 0.01 + (s + i) / 1e5 })) })
      expect(r.status).toBe(200)
    }
    const change = await owner.agent.put(`${P()}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { intrinsicBalmer: 3.1 }, note: 'AGN' })
    expect(change.status).toBe(201)
    const jobId = change.body.job.id as string
    const first = await follow(jobId)
    expect(first.job.status).toBe('done')
    const total = first.job.total as number
    const revision = change.body.revision.revision as number
    const full = await q(`select galaxy_id, measures::text as measures, measures_exact::text as exact, encode(codes, 'hex') as codes, result::text as result from results where project_id = $1 and revision = $2 order by galaxy_id`, [projectId, revision])
    expect(full).toHaveLength(total)
    expect(full[0].measures).toMatch(/^\{/)

    // the state a SIGKILL at 2,000 of the galaxies leaves: the job running, its cursor after the first
    // committed chunk, results of that chunk only, and nobody holding its lease
    const cut = full[1999].galaxy_id
    await q(`update jobs set status = 'running', done = 2000, last_id = $2, finished_at = null, heartbeat_at = now() - interval '10 minutes' where id = $1`, [jobId, cut])
    await q('delete from results where project_id = $1 and revision = $2 and galaxy_id > $3', [projectId, revision, cut])
    await q('update projects set results_revision = $2 where id = $1', [projectId, revision - 1])
    const kept = await q('select galaxy_id, computed_at from results where project_id = $1 and revision = $2 order by galaxy_id', [projectId, revision])

    // a live worker holds the lease (another connection): not resumed
    const worker = new pg.Client({ connectionString: t.databaseUrl })
    await worker.connect()
    await worker.query('select pg_advisory_lock($1, hashtext($2))', [0x52474a42, jobId])
    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([])
    expect((await get(`/jobs/${jobId}`)).body).toMatchObject({ status: 'running', resumeCount: 0 })
    // … until it dies: its session ends, the lock goes with it
    await worker.end()

    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([jobId])
    const marked = (await get(`/jobs/${jobId}`)).body
    expect(marked).toMatchObject({ resumeCount: 1, resumedFrom: 2000 })
    expect(marked.resumedAt).not.toBeNull()
    const { job } = await follow(jobId)
    expect(job).toMatchObject({ status: 'done', done: total, total, resumeCount: 1, resumedFrom: 2000, error: null })
    const after = await q(`select galaxy_id, measures::text as measures, measures_exact::text as exact, encode(codes, 'hex') as codes, result::text as result from results where project_id = $1 and revision = $2 order by galaxy_id`, [projectId, revision])
    expect(after).toEqual(full) // the same results as the uninterrupted run
    const firstChunk = await q('select galaxy_id, computed_at from results where project_id = $1 and revision = $2 and galaxy_id <= $3 order by galaxy_id', [projectId, revision, cut])
    expect(firstChunk).toEqual(kept) // continued after the committed chunk, not from the start
    expect((await get('')).body.resultsRevision).toBe(revision)
  })

  it('an intake job left running after a crash starts again (nothing of it was stored) and finishes whole', async () => {
    const staged = await upload(csvOf('RES-', 4500), 'resume.csv')
    const intakeId = staged.body.intake.id
    const options = { mapping: staged.body.suggestedMapping, fluxUnit: 1, nonDetection: 'limit-column', onExisting: 'skip' }
    // what a crash mid-way leaves: the intake committing, its job running at 4,000 with no worker
    await q("update intakes set status = 'committing' where id = $1", [intakeId])
    const [{ id: jobId }] = await q(`insert into jobs (project_id, kind, status, total, done, params, heartbeat_at)
      values ($1, 'intake', 'running', 4500, 4000, $2, now() - interval '1 minute') returning id`, [projectId, JSON.stringify({ intakeId, options })])
    expect(await count('RES-')).toBe(0)
    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([jobId])
    const { job } = await follow(jobId)
    expect(job).toMatchObject({ status: 'done', done: 4500, resumeCount: 1, resumedFrom: 0, intakeId })
    expect(await count('RES-')).toBe(4500)
    expect((await get(`/intakes/${intakeId}`)).body).toMatchObject({ status: 'committed', rowsAccepted: 4500 })
    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([]) // nothing left to resume
  })
})
