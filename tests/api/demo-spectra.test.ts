import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { startTestApp, type TestApp } from '../helpers/app.ts'
import { DEMO_ACCOUNTS } from '../../server/seed/demo-accounts.ts'
import { DEMO_PROJECT_NAME, seedDemo } from '../../server/seed/demo.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { generateLanternSpectra } from '../../server/seed/lantern-spectra.ts'
import { runJob } from '../../server/services/jobs.service.ts'

/**
 * The demo seed's spectra: 300 nuclei of the invented "Lantern Nuclei Survey" get invented spectra
 * (the seeded generator of server/seed/lantern-spectra.ts; every number here is invented, none is an
 * observation) stored as one spectra upload, and its `fit` job fits them all. The thresholds below
 * are from running this fit on these spectra (measured, not from a source): 52 of 52 broad-line
 * nuclei keep broad Hα, 10 of 11 two-component nuclei keep the second component, 22 of 55 Na I D
 * nuclei get a column density, and the narrow nuclei's Hα pulls have mean +0.11 and SD 0.99.
 */
let t: TestApp
let projectId: string
let jobId: string
let seedLog = ''
let seedMs = 0
let fitMs = 0
const survey = generateLanternSurvey()
const table = new Map(survey.map((g) => [g.id, g]))
const kindOf = new Map(generateLanternSpectra(survey).map((s) => [s.galaxyId, s.kind]))
const q = async <T = Record<string, unknown>>(text: string, values: unknown[] = []) => (await t.db.$client.query(text, values)).rows as T[]

beforeAll(async () => {
  t = await startTestApp()
  let started = Date.now()
  // no context: the fit job is left queued, and run here to its end
  expect(await seedDemo(t.db, (m) => { seedLog = m })).toBe(true)
  seedMs = Date.now() - started
  ;[{ id: projectId }] = await q<{ id: string }>('select id from projects where name = $1', [DEMO_PROJECT_NAME])
  ;[{ id: jobId }] = await q<{ id: string }>(`select id from jobs where project_id = $1 and kind = 'fit'`, [projectId])
  started = Date.now()
  await runJob(t.galaxy, jobId)
  fitMs = Date.now() - started
  console.log(`demo seed ${seedMs} ms; fit job of 300 spectra ${fitMs} ms`)
}, 300_000)
afterAll(async () => { await t?.close() })

describe('the demo seed\'s invented spectra', () => {
  it('are one upload of 300 spectra by the demo owner, named in the seed\'s log line; a second seed adds nothing', async () => {
    expect(seedLog).toMatch(/with 2400 galaxies and 300 invented spectra \(fitted in the background\) in [\d.]+ s$/)
    const owner = DEMO_ACCOUNTS.find((a) => a.role === 'owner')!
    const uploads = await q<{ spectrum_count: number; file_count: number; email: string }>(`select u.spectrum_count, u.file_count, us.email
      from spectrum_uploads u join users us on us.id = u.created_by where u.project_id = $1`, [projectId])
    expect(uploads).toEqual([{ spectrum_count: 300, file_count: 1, email: owner.email }])
    expect(new Set(kindOf.values())).toEqual(new Set(['broad-line', 'two-component', 'sodium', 'narrow']))
    expect(await seedDemo(t.db)).toBe(false)
    expect((await q<{ n: number }>('select count(*)::int as n from spectra'))[0]!.n).toBe(300)
    expect((await q<{ n: number }>('select count(*)::int as n from spectrum_uploads'))[0]!.n).toBe(1)
  })

  it('are all fitted by the fit job, and GET …/spectra lists them with their fits', async () => {
    const [job] = await q<{ status: string; done: number; total: number }>('select status, done, total from jobs where id = $1', [jobId])
    expect(job).toEqual({ status: 'done', done: 300, total: 300 })
    const owner = DEMO_ACCOUNTS.find((a) => a.role === 'owner')!
    const agent = request.agent(t.app)
    expect((await agent.post('/api/v1/auth/sign-in').send({ email: owner.email, password: owner.password })).status).toBe(200)
    const res = await agent.get(`/api/v1/projects/${projectId}/spectra?pageSize=500`)
    expect(res.status).toBe(200)
    expect(res.body.total).toBe(300)
    const items = res.body.items as Array<{ galaxyId: string; revision: number | null; components: number | null; broadHalpha: boolean | null; flags: string[] }>
    expect(items.filter((i) => i.revision === 1 && i.components !== null && !i.flags.includes('fit-failed'))).toHaveLength(300)
    // broad Hα where the generator drew one (measured: 52 of 52), and nowhere else in most nuclei
    const broad = items.filter((i) => kindOf.get(i.galaxyId) === 'broad-line')
    expect(broad.length).toBe(52)
    expect(broad.filter((i) => i.broadHalpha).length).toBeGreaterThanOrEqual(45)
    // the blueshifted wing kept as a second narrow component by BIC (shared/science/README.md §13.7; measured: 10 of 11)
    const two = items.filter((i) => kindOf.get(i.galaxyId) === 'two-component')
    expect(two.filter((i) => i.components === 2).length).toBeGreaterThanOrEqual(5)
    // a galaxy's lines are now its fit's (provenance line-fit)
    const [g] = await q<{ provenance: { source: string } }>('select provenance from galaxies where project_id = $1 and key = $2', [projectId, broad[0]!.galaxyId])
    expect(g!.provenance.source).toBe('line-fit')
  })

  it('give Na I D column densities and narrow Hα fluxes that agree with the table the spectra were drawn from', async () => {
    const fits = await q<{ galaxy_id: string; result: { lines: Record<string, { detected: boolean; flux?: number; error?: number }>; absorption: { nad?: { logN?: number } } } }>(
      'select s.galaxy_id, f.result from line_fits f join spectra s on s.id = f.spectrum_id where f.project_id = $1', [projectId])
    expect(fits).toHaveLength(300)
    // curve-of-growth log N of the doublet (shared/science/README.md §14; measured: 22 of 55)
    const sodium = fits.filter((f) => kindOf.get(f.galaxy_id) === 'sodium')
    expect(sodium.filter((f) => Number.isFinite(f.result.absorption.nad?.logN)).length).toBeGreaterThanOrEqual(10)
    // the fitted Hα flux against the table flux the generator drew it with: pull = (F_fit − F_table) / σ_fit
    const pulls = fits.filter((f) => kindOf.get(f.galaxy_id) === 'narrow').flatMap((f) => {
      const ha = f.result.lines.halpha
      const truth = (table.get(f.galaxy_id)!.lines as Record<string, { flux?: number }>).halpha?.flux
      return ha?.detected && truth !== undefined ? [(ha.flux! - truth) / ha.error!] : []
    })
    expect(pulls.length).toBeGreaterThan(170)
    const mean = pulls.reduce((a, b) => a + b, 0) / pulls.length
    const sd = Math.sqrt(pulls.reduce((a, b) => a + (b - mean) ** 2, 0) / (pulls.length - 1))
    expect(Math.abs(mean)).toBeLessThan(0.3)
    // the errors are right too: a unit spread (common practice for a pull distribution)
    expect(sd).toBeGreaterThan(0.8)
    expect(sd).toBeLessThan(1.25)
  })

  it('keep the table\'s flux unit (1e-17), so the fitted records\' luminosities and star-formation rates are on the table\'s scale', async () => {
    const rows = await q<{ key: string; flux_unit: number; source: string | null }>(
      "select key, flux_unit, provenance->>'source' as source from galaxies where project_id = $1 and provenance is not null", [projectId])
    expect(rows).toHaveLength(300)
    for (const r of rows) expect([r.key, r.flux_unit, r.source]).toEqual([r.key, table.get(r.key)!.fluxUnit, 'line-fit'])
    const stored = await q<{ flux_unit: number }>('select distinct flux_unit from spectra where project_id = $1', [projectId])
    expect(stored).toEqual([{ flux_unit: 1e-17 }])
  })
})
