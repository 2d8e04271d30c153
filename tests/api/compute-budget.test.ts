import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { diagnose, inProcessCompute } from '../../server/compute/pool.ts'
import { HttpProblem } from '../../server/http/problem.ts'
import { SettingsSchema } from '../../shared/schemas/galaxy.schema.ts'
import { diagnoseMany, type GalaxyInput } from '../../shared/science.ts'

/**
 * Per-request compute budgets (galaxies × (draws + 10) units; 200,000 without credentials and
 * 2,500,000 with them by default), the time budget and the queue bound of the compute pool, and
 * that the pool's answers are exactly those computed in-process.
 */
const lantern = (n: number, seed = 9) => generateLanternSurvey(n, seed).map(({ population: _p, ...g }) => g)

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'budget@example.org')
})
afterAll(async () => { await t.close() })

describe('compute budget of POST /diagnostics', () => {
  it('refuses an anonymous request over its budget with a 422 at /settings/monteCarlo/draws that names the limit and how to raise it', async () => {
    // 41 × (4,990 + 10) = 205,000 > 200,000
    const res = await request(t.app).post('/api/v1/diagnostics').send({ settings: { monteCarlo: { draws: 4990 } }, galaxies: lantern(41) })
    expect(res.status).toBe(422)
    expect(res.headers['content-type']).toMatch(/application\/problem\+json/)
    expect(res.body.errors).toHaveLength(1)
    expect(res.body.errors[0].path).toBe('/settings/monteCarlo/draws')
    expect(res.body.errors[0].message).toBe('galaxies × (draws + 10) may be at most 200,000 per request without credentials; '
      + 'that allows at most 4868 draws for 41 galaxies, or 40 galaxies with 4990 draws; signing in or sending an API key raises the limit to 2,500,000')
  })

  it('lets the same request through with credentials, and refuses one over the larger budget without the sign-in hint', async () => {
    const ok = await owner.agent.post('/api/v1/diagnostics').set('X-CSRF-Token', owner.csrf).send({ settings: { monteCarlo: { draws: 100 } }, galaxies: lantern(41) })
    expect(ok.status).toBe(200)
    expect(ok.body.results).toHaveLength(41)
    // 501 × (4,990 + 10) = 2,505,000 > 2,500,000
    const over = await owner.agent.post('/api/v1/diagnostics').set('X-CSRF-Token', owner.csrf).send({ settings: { monteCarlo: { draws: 4990 } }, galaxies: lantern(501) })
    expect(over.status).toBe(422)
    expect(over.body.errors[0].path).toBe('/settings/monteCarlo/draws')
    expect(over.body.errors[0].message).toBe('galaxies × (draws + 10) may be at most 2,500,000 per request; that allows at most 4980 draws for 501 galaxies, or 500 galaxies with 4990 draws')
  })

  it('still serves 10,000 galaxies without Monte Carlo to anonymous callers (the per-request limit), and 10,001 is a 413', async () => {
    const gals = lantern(10_000, 4)
    const res = await request(t.app).post('/api/v1/diagnostics').send({ galaxies: gals })
    expect(res.status).toBe(200)
    expect(res.body.results).toHaveLength(10_000)
    expect(res.body.results[9999].id).toBe(gals[9999].id)
    const big = await request(t.app).post('/api/v1/diagnostics').send({ galaxies: [...gals, galaxy('one-more')] })
    expect(big.status).toBe(413)
  })
})

describe('results from the pool', () => {
  it('equal the in-process science exactly, across chunk boundaries, with the same Monte Carlo numbers for the same seed', async () => {
    // 600 × 210 units: three chunks of 238 galaxies (CHUNK_UNITS 50,000) on the threads
    const gals = lantern(600, 12)
    const settings = { monteCarlo: { draws: 200, seed: 7 } }
    const res = await request(t.app).post('/api/v1/diagnostics').send({ settings, galaxies: gals })
    expect(res.status).toBe(200)
    const reference = JSON.parse(JSON.stringify(diagnoseMany(gals as GalaxyInput[], SettingsSchema.parse(settings))))
    expect(res.body.results).toEqual(reference)
    expect(res.body.results[599].extinction.ebvPercentiles).toEqual(reference[599].extinction.ebvPercentiles)
    const again = await request(t.app).post('/api/v1/diagnostics').send({ settings, galaxies: gals })
    expect(again.text).toBe(res.text)
    // another seed draws other numbers
    const other = await request(t.app).post('/api/v1/diagnostics').send({ settings: { monteCarlo: { draws: 200, seed: 8 } }, galaxies: gals })
    expect(other.body.results[0].extinction.ebvPercentiles).not.toEqual(res.body.results[0].extinction.ebvPercentiles)
  })

  it('name the galaxy at fault by its index in the whole request, not in its chunk', async () => {
    const gals = lantern(600, 12)
    // an impossible value the schema would have refused, to reach the science's own check in chunk 2
    ;(gals[450].lines as Record<string, unknown>).hbeta = { flux: 80, error: 0 }
    const settings = SettingsSchema.parse({ monteCarlo: { draws: 200 } })
    const fromPool = await diagnose(t.compute, gals, settings, { prefix: '/rows' }).catch((e: unknown) => e)
    const inProcess = await diagnose(inProcessCompute(), gals, settings, { prefix: '/rows' }).catch((e: unknown) => e)
    expect(fromPool).toBeInstanceOf(HttpProblem)
    expect((fromPool as HttpProblem).status).toBe(422)
    expect((fromPool as HttpProblem).errors).toEqual([{ path: '/rows/450/lines/hbeta/error', message: expect.stringContaining('/450/lines/hbeta/error') }])
    expect((fromPool as HttpProblem).errors).toEqual((inProcess as HttpProblem).errors)
  })
})

describe('compute budget of batch ingestion', () => {
  it('refuses a batch whose galaxies × (draws + 10) under the project\'s assumptions exceed the budget, storing nothing', async () => {
    const project = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'Budget' })).body
    const put = await owner.agent.put(`/api/v1/projects/${project.id}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { monteCarlo: { draws: 5000 } } })
    expect(put.status).toBe(201)
    // 500 × 5,010 = 2,505,000 > 2,500,000
    const res = await owner.agent.post(`/api/v1/projects/${project.id}/galaxies/batch`).set('X-CSRF-Token', owner.csrf).send({ galaxies: lantern(500) })
    expect(res.status).toBe(422)
    expect(res.body.errors[0].path).toBe('/galaxies')
    expect(res.body.detail).toContain('this project\'s assumptions draw 5000 Monte Carlo samples per galaxy')
    expect(res.body.errors[0].message).toContain('or 499 galaxies with 5000 draws')
    const { rows } = await t.db.$client.query('select count(*)::int as n from galaxies where project_id = $1', [project.id])
    expect(rows[0].n).toBe(0)
    const fits = await owner.agent.post(`/api/v1/projects/${project.id}/galaxies/batch`).set('X-CSRF-Token', owner.csrf).send({ galaxies: lantern(3) })
    expect(fits.status).toBe(200)
    expect(fits.body.inserted).toBe(3)
  })
})

describe('time budget and queue bound', () => {
  it('stops a computation that runs past COMPUTE_TIMEOUT_S with a 503 and Retry-After, and the pool serves the next request', async () => {
    const slow = await startTestApp({ COMPUTE_TIMEOUT_S: '1', COMPUTE_THREADS: '1' })
    try {
      const who = await signedInAgent(slow.app, 'slow@example.org')
      // 400 × 5,010 units: several seconds, inside the compute budget
      const res = await who.agent.post('/api/v1/diagnostics').set('X-CSRF-Token', who.csrf).send({ settings: { monteCarlo: { draws: 5000 } }, galaxies: lantern(400) })
      expect(res.status).toBe(503)
      expect(res.headers['retry-after']).toBe('30')
      expect(res.body.detail).toBe('the computation ran longer than the 1 s time budget and was stopped; send fewer galaxies or Monte Carlo draws per request')
      // the stopped thread is replaced; until the new one has started (tsx, the science: about a
      // second, more on a busy machine) a request may itself run out of its 1 s
      let next = await request(slow.app).post('/api/v1/diagnostics').send({ galaxies: [galaxy('after')] })
      for (const until = Date.now() + 30_000; next.status === 503 && Date.now() < until;) {
        await new Promise((ok) => setTimeout(ok, 250))
        next = await request(slow.app).post('/api/v1/diagnostics').send({ galaxies: [galaxy('after')] })
      }
      expect(next.status).toBe(200)
      expect(next.body.results[0].id).toBe('after')
    } finally { await slow.close() }
  })

  it('answers 503 with Retry-After when chunks are already waiting for every queue place', async () => {
    const busy = await startTestApp({ COMPUTE_QUEUE: '1', COMPUTE_THREADS: '1', COMPUTE_TIMEOUT_S: '600' })
    try {
      const who = await signedInAgent(busy.app, 'busy@example.org')
      const heavy = () => who.agent.post('/api/v1/diagnostics').set('X-CSRF-Token', who.csrf).send({ settings: { monteCarlo: { draws: 2000 } }, galaxies: lantern(100) }).then((r) => r)
      const a = heavy(), b = heavy()
      const until = Date.now() + 30_000
      while (busy.compute.queued < 1 && Date.now() < until) await new Promise((ok) => setTimeout(ok, 5))
      expect(busy.compute.queued).toBeGreaterThanOrEqual(1)
      const refused = await request(busy.app).post('/api/v1/diagnostics').send({ galaxies: [galaxy('third')] })
      expect(refused.status).toBe(503)
      expect(refused.headers['retry-after']).toBe('5')
      expect(refused.body.detail).toBe('the compute queue is full; try again shortly')
      expect((await a).status).toBe(200)
      expect((await b).status).toBe(200)
    } finally { await busy.close() }
  })
})
