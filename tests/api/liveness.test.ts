import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { DEFAULT_ANON_COMPUTE_BUDGET, DEFAULT_COMPUTE_BUDGET, GALAXY_COST } from '../../server/compute/budget.ts'

/**
 * Liveness, not speed: while the heaviest request a caller is allowed runs, the event loop still
 * answers `/api/health` within a second (before the compute pool it waited the whole request out:
 * seconds). The speed figures are in `npm run bench:liveness`.
 */
let t: TestApp
let server: Server
let base: string
let session: Record<string, string>

beforeAll(async () => {
  // the time budget is not under test here: a slow shared machine must not turn this into a 503
  t = await startTestApp({ COMPUTE_TIMEOUT_S: '600' })
  server = t.app.listen(0, '127.0.0.1')
  await new Promise((ok) => server.once('listening', ok))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  const a = await signedInAgent(t.app, 'liveness@example.org')
  session = { cookie: a.cookie, 'x-csrf-token': a.csrf }
})
afterAll(async () => {
  await new Promise((ok) => server.close(ok))
  await t.close()
})

/** The most Monte Carlo work that fits `budget` for `n` galaxies: n × (draws + GALAXY_COST) = budget at most. */
function heaviest(budget: number, n: number) {
  const draws = Math.min(5000, Math.floor(budget / n) - GALAXY_COST)
  const galaxies = generateLanternSurvey(n, 5).map(({ population: _p, ...g }) => g)
  return { settings: { monteCarlo: { draws, seed: 3 } }, galaxies }
}

/** Polls /api/health every ~20 ms until `pending` settles; the latency of every answer, in ms. */
async function healthWhile(pending: Promise<Response>) {
  let settled = false
  void pending.finally(() => { settled = true }).catch(() => {})
  const latencies: number[] = []
  while (!settled) {
    const t0 = performance.now()
    const res = await fetch(`${base}/api/health`)
    await res.arrayBuffer()
    latencies.push(performance.now() - t0)
    expect(res.status).toBe(200)
    await new Promise((ok) => setTimeout(ok, 20))
  }
  return latencies
}

const post = (body: unknown, headers: Record<string, string> = {}) =>
  fetch(`${base}/api/v1/diagnostics`, { method: 'POST', headers: { 'content-type': 'application/json', ...headers }, body: JSON.stringify(body) })

describe('the event loop stays live during heavy computations', () => {
  it('answers /api/health within 1 s while the heaviest allowed anonymous request runs', async () => {
    const body = heaviest(DEFAULT_ANON_COMPUTE_BUDGET, 40)
    expect(body.settings.monteCarlo.draws).toBe(4990) // 40 × (4,990 + 10) = 200,000: the anonymous budget, used whole
    const pending = post(body)
    const latencies = await healthWhile(pending)
    const res = await pending
    expect(res.status).toBe(200)
    const out = await res.json()
    expect(out.results).toHaveLength(40)
    expect(out.results[0].extinction.ebvPercentiles.p16).toEqual(expect.any(Number))
    // the request took long enough to be sampled many times, and no sample waited it out
    expect(latencies.length).toBeGreaterThanOrEqual(3)
    expect(Math.max(...latencies)).toBeLessThan(1000)
  })

  it('answers /api/health within 1 s while the heaviest allowed authenticated request runs', async () => {
    const body = heaviest(DEFAULT_COMPUTE_BUDGET, 500)
    expect(body.settings.monteCarlo.draws).toBe(4990) // 500 × (4,990 + 10) = 2,500,000: the budget with credentials
    const pending = post(body, session)
    const latencies = await healthWhile(pending)
    const res = await pending
    expect(res.status).toBe(200)
    const out = await res.json()
    expect(out.results).toHaveLength(500)
    expect(out.results.map((r: { id: string }) => r.id)).toEqual(body.galaxies.map((g) => g.id))
    expect(latencies.length).toBeGreaterThanOrEqual(10)
    expect(Math.max(...latencies)).toBeLessThan(1000)
  }, 300_000)
})
