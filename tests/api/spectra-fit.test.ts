import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { STAR_FORMING, syntheticCsv, zipOf } from '../helpers/spectra.ts'
import { resumeOrphanedJobs } from '../../server/services/jobs.service.ts'
import { exportNumber } from '../../server/services/exports.service.ts'

/**
 * The `fit` job of an upload (chunks, progress, resume after an interrupted run), the galaxy's lines
 * and diagnostics from the fit, refits when the fit settings change, the trial refit, the
 * fit-quality table, the overview's kinematics and the exports of lines and models.
 */
let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string
let uploadJob: { id: string; total: number }
const N = 20
const Z = 0.02

beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'fit-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'fits' })).body.id
}, 60_000)
afterAll(async () => { await t.close() })

const P = () => `/api/v1/projects/${projectId}`
const get = (path: string) => owner.agent.get(P() + path)
const q = async (text: string, values: unknown[] = []) => (await t.db.$client.query(text, values)).rows
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))

/** Polls a job until it ends, noting every `done` it showed on the way. */
async function follow(jobId: string) {
  const seen: number[] = []
  for (let i = 0; i < 3000; i++) {
    const j = (await get(`/jobs/${jobId}`)).body
    if (seen.at(-1) !== j.done) seen.push(j.done)
    if (j.status === 'done' || j.status === 'failed') return { job: j, seen }
    await sleep(20)
  }
  throw new Error('the job did not finish')
}
const fitsOf = (revision: number) => q(`select f.spectrum_id, f.result::text as result, f.settings, f.created_at from line_fits f join spectra s on s.id = f.spectrum_id
  where s.project_id = $1 and f.revision = $2 order by f.spectrum_id`, [projectId, revision])

describe('the fit job', () => {
  it('fits an upload in committed chunks with progress, and each galaxy gets its lines from the fit and its diagnostics from them', async () => {
    const files = Array.from({ length: N }, (_, i) => [`SF-${i}.csv`, syntheticCsv({ redshift: Z, lines: STAR_FORMING, seed: 100 + i, from: 4800 })] as [string, string])
    const res = await owner.agent.post(`${P()}/spectra`).set('X-CSRF-Token', owner.csrf).field('defaults', JSON.stringify({ redshift: Z }))
      .attach('files', await zipOf(files), { filename: 'night.zip' })
    expect(res.status, JSON.stringify(res.body).slice(0, 400)).toBe(202)
    expect(res.body.job).toMatchObject({ kind: 'fit', total: N })
    uploadJob = res.body.job
    const { job, seen } = await follow(uploadJob.id)
    expect(job).toMatchObject({ status: 'done', done: N, total: N, error: null })
    // progress moves by committed chunks of 16 spectra
    for (const d of seen) expect([0, 16, N]).toContain(d)

    const g = (await get('/galaxies/SF-3')).body
    const [fit] = await q(`select f.result from line_fits f join spectra s on s.id = f.spectrum_id where s.project_id = $1 and s.galaxy_id = 'SF-3' and f.revision = 1`, [projectId])
    // the record's lines are the fit's measurements, with where they came from
    expect(g.lines).toEqual(fit.result.measurements.lines)
    expect(g.provenance).toMatchObject({ source: 'line-fit', revision: 1 })
    expect(g.redshift).toBe(Z)
    // the diagnostics are computed from those lines: log [N II]/Hα of the measured fluxes (Baldwin, Phillips
    // & Terlevich 1981; shared/science/README.md §2.1)
    const m = fit.result.measurements.lines
    expect(g.results.ratios.niiHa).toBeCloseTo(Math.log10(m.nii_6584.flux / m.halpha.flux), 6) // stored as a real (24 bits)
    expect(g.results.ratios.oiiiHb).toBeCloseTo(Math.log10(m.oiii_5007.flux / m.hbeta.flux), 6)
    // the invented nucleus has [N II]/Hα = 0.25 and [O III]/Hβ = 0.43: log −0.60 and −0.37 (to the
    // measurement's accuracy), below Kauffmann et al. 2003 (MNRAS 346, 1055, eq. 1; shared/science/README.md §2.2, §2.3)
    expect(g.results.ratios.niiHa).toBeCloseTo(Math.log10(150 / 600), 1)
    expect(g.results.ratios.oiiiHb).toBeCloseTo(Math.log10(90 / 210), 1)
    expect(g.results.classes.nii).toBe('star-forming')
    const intake = (await get(`/intakes/${res.body.upload.intakeId}`)).body
    expect(intake).toMatchObject({ kind: 'spectra', status: 'committed', rowsTotal: N, rowsAccepted: N, revision: 1 })
  })

  it('resumes a fit job interrupted after its first chunk from there, with the same fits', async () => {
    const full = await fitsOf(1)
    const mine = full.filter((f) => true) // every spectrum of this project is from the upload
    expect(mine).toHaveLength(N)
    const cut = Number(mine[15].spectrum_id)
    // the state a crash after the first committed chunk leaves: the job running at 16 with no worker,
    // the fits of the first chunk only, the intake still being written
    await q(`update jobs set status = 'running', done = 16, last_id = $2, finished_at = null, heartbeat_at = now() - interval '10 minutes' where id = $1`, [uploadJob.id, cut])
    await q('delete from line_fits where spectrum_id > $1 and project_id = $2', [cut, projectId])
    await q(`update intakes set status = 'committing' where project_id = $1 and kind = 'spectra'`, [projectId])
    const kept = await q('select spectrum_id, created_at from line_fits where project_id = $1 order by spectrum_id', [projectId])
    expect(kept).toHaveLength(16)

    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([uploadJob.id])
    const { job } = await follow(uploadJob.id)
    expect(job).toMatchObject({ status: 'done', done: N, total: N, resumeCount: 1, resumedFrom: 16, error: null })
    const after = await fitsOf(1)
    expect(after.map((f) => [f.spectrum_id, f.result])).toEqual(full.map((f) => [f.spectrum_id, f.result]))
    const first = await q('select spectrum_id, created_at from line_fits where project_id = $1 and spectrum_id <= $2 order by spectrum_id', [projectId, cut])
    expect(first).toEqual(kept) // continued after the committed chunk, not from the start
    expect((await q(`select status from intakes where project_id = $1 and kind = 'spectra'`, [projectId]))[0].status).toBe('committed')
    expect(await resumeOrphanedJobs(t.galaxy)).toEqual([])
  })
})

describe('fit settings are assumptions', () => {
  it('a revision with other fit settings refits every spectrum: new fits, the lines from them with provenance, the earlier record kept', async () => {
    const versionsBefore = (await get('/galaxies/SF-3/versions')).body.items.length
    const change = await owner.agent.put(`${P()}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { fit: { broadHalpha: 'off' } }, note: 'no broad lines' })
    expect(change.status, JSON.stringify(change.body)).toBe(201)
    expect(change.body.revision.settings.fit).toEqual({ profile: 'gaussian', components: 1, broadHalpha: 'off', absorption: ['nad'], monteCarlo: { draws: 0, seed: 1 }, balmerAbsorptionEw: 0 })
    const { job } = await follow(change.body.job.id)
    expect(job).toMatchObject({ status: 'done', kind: 'recompute' })
    const fits = await fitsOf(2)
    expect(fits).toHaveLength(N)
    expect(fits.every((f) => f.settings.broadHalpha === 'off')).toBe(true)
    const g = (await get('/galaxies/SF-3')).body
    expect(g).toMatchObject({ revision: 2, provenance: { source: 'line-fit', revision: 2 } })
    const [fit] = await q(`select f.result from line_fits f join spectra s on s.id = f.spectrum_id where s.galaxy_id = 'SF-3' and s.project_id = $1 and f.revision = 2`, [projectId])
    expect(g.lines).toEqual(fit.result.measurements.lines)
    expect(g.results.ratios.niiHa).toBeCloseTo(Math.log10(fit.result.measurements.lines.nii_6584.flux / fit.result.measurements.lines.halpha.flux), 6) // stored as a real (24 bits)
    const versions = (await get('/galaxies/SF-3/versions')).body.items
    expect(versions).toHaveLength(versionsBefore + 1)
    expect(versions[0].supersededBy).toMatchObject({ kind: 'spectra', fileName: 'refit under revision 2' })

    // other settings, the same fit settings: the fits are reused, the record stays as it is
    const dust = await owner.agent.put(`${P()}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { fit: { broadHalpha: 'off' }, extinctionLaw: 'calzetti00' } })
    await follow(dust.body.job.id)
    expect((await fitsOf(3)).map((f) => f.result)).toEqual(fits.map((f) => f.result))
    expect((await get('/galaxies/SF-3')).body).toMatchObject({ revision: 3, provenance: { revision: 2 } })
    expect((await get('/galaxies/SF-3/versions')).body.items).toHaveLength(versionsBefore + 1)
  })
})

describe('reading the fits', () => {
  it('a trial refit answers like GET …/spectrum with revision null and stores nothing', async () => {
    const before = await q('select count(*)::int as n from line_fits where project_id = $1', [projectId])
    const res = await owner.agent.post(`${P()}/galaxies/SF-3/spectrum/fit`).set('X-CSRF-Token', owner.csrf).send({ fit: { broadHalpha: 'on' } })
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200)
    expect(res.body.fit).toMatchObject({ revision: null, settings: { broadHalpha: 'on', minSnr: 3 } })
    expect(res.body.fit.model.total).toHaveLength(res.body.spectrum.wavelength.length)
    expect(await q('select count(*)::int as n from line_fits where project_id = $1', [projectId])).toEqual(before)
    expect((await owner.agent.post(`${P()}/galaxies/NOPE/spectrum/fit`).set('X-CSRF-Token', owner.csrf).send({ fit: {} })).status).toBe(404)
  })

  it('the fit-quality table sorts, filters and pages', async () => {
    const all = (await get('/spectra?pageSize=500')).body
    expect(all).toMatchObject({ total: N, page: 1, pageSize: 500 })
    const one = all.items.find((i: { galaxyId: string }) => i.galaxyId === 'SF-3')
    expect(one).toMatchObject({ revision: 3, pixels: 2001, components: 1, broadHalpha: false, flags: expect.any(Array) })
    expect(one.wavelengthMin).toBeCloseTo(4800 * (1 + Z), 9)
    expect(one.chi2dof).toBeCloseTo(one.chi2 / one.dof, 12)
    const byChi = (await get('/spectra?sort=-chi2dof&pageSize=500')).body.items.map((i: { chi2dof: number }) => i.chi2dof)
    expect(byChi).toEqual([...byChi].sort((a, b) => b - a))
    expect((await get('/spectra?q=SF-1')).body.items.map((i: { galaxyId: string }) => i.galaxyId).sort()).toEqual(['SF-1', ...Array.from({ length: 10 }, (_, i) => `SF-1${i}`)].sort())
    const page2 = (await get('/spectra?pageSize=7&page=3')).body
    expect(page2.items).toHaveLength(N - 14)
    expect((await get('/spectra?flag=no-such-flag')).body.total).toBe(0)
    // a whole flag, or its family (what the table's filter offers from the flag registry)
    const withFlag = (f: string) => all.items.filter((i: { flags: string[] }) => i.flags.some((x) => x === f || x.startsWith(`${f}:`))).length
    const some = all.items.flatMap((i: { flags: string[] }) => i.flags).find((f: string) => f.includes(':')) as string
    expect(some).toBeDefined()
    const family = some.split(':')[0]!
    expect((await get(`/spectra?flag=${encodeURIComponent(some)}&pageSize=500`)).body.total).toBe(withFlag(some))
    expect((await get(`/spectra?flag=${family}&pageSize=500`)).body.total).toBe(withFlag(family))
    expect(withFlag(family)).toBeGreaterThan(0)
  })

  it('the overview counts the fits and histograms narrow velocities and widths', async () => {
    const k = (await get('/overview')).body.kinematics
    expect(k.fitted).toBe(N)
    expect(k.broadFraction).toBe(0)
    expect(k.velocity.bins).toHaveLength(41)
    expect(k.velocity.counts.reduce((a: number, b: number) => a + b, 0)).toBe(N)
    expect(k.sigma.counts.reduce((a: number, b: number) => a + b, 0)).toBe(N)
  })

  it('exports the line measurements as CSV and VOTable with units and UCDs, and one spectrum\'s model as CSV', async () => {
    const csv = await get('/exports/lines.csv')
    expect(csv.status).toBe(200)
    const lines = csv.text.trim().split('\n')
    expect(lines[0]).toMatch(/^# Ratiograph .* line measurements of project,fits$/)
    expect(lines.find((l) => l.startsWith('# units:'))).toContain('halpha_flux=erg.s**-1.cm**-2 halpha_flux_err=erg.s**-1.cm**-2')
    const header = lines.find((l) => l.startsWith('galaxy_id,'))!.split(',')
    expect(header.slice(0, 7)).toEqual(['galaxy_id', 'spectrum_id', 'redshift', 'chi2', 'dof', 'components', 'broad_halpha'])
    expect(header).toEqual(expect.arrayContaining(['halpha_velocity', 'halpha_sigma_intrinsic', 'halpha_ew', 'nad_ew', 'nad_doublet_ratio', 'nad_log_n', 'nad_b', 'flags']))
    const rows = lines.slice(lines.indexOf(header.join(',')) + 1).map((l) => l.split(','))
    expect(rows).toHaveLength(N)
    const sf3 = rows.find((r) => r[0] === 'SF-3')!
    const g = (await get('/galaxies/SF-3')).body
    expect(Number(sf3[header.indexOf('halpha_flux')])).toBe(Number(exportNumber(g.lines.halpha.flux * g.fluxUnit))) // 15 significant digits
    expect(sf3[header.indexOf('broad_halpha')]).toBe('false')

    const vot = (await get('/exports/lines.vot')).text
    expect(vot).toContain('<FIELD name="halpha_flux" datatype="double" unit="erg.s**-1.cm**-2" ucd="phot.flux;em.line.Halpha">')
    expect(vot).toContain('<FIELD name="halpha_velocity" datatype="double" unit="km.s**-1" ucd="spect.dopplerVeloc;em.line.Halpha">')
    expect(vot).toContain('<FIELD name="nad_log_n" datatype="double" unit="dex(cm**-2)" ucd="phys.columnDensity">')
    expect(vot.match(/<TR>/g)).toHaveLength(N)

    const model = await get('/galaxies/SF-3/spectrum/model.csv')
    expect(model.status).toBe(200)
    const m = model.text.trim().split('\n').filter((l) => !l.startsWith('#'))
    const cols = m[0].split(',')
    expect(cols.slice(0, 5)).toEqual(['wavelength', 'flux', 'error', 'continuum', 'model'])
    expect(cols.at(-1)).toBe('residual')
    expect(m).toHaveLength(1 + 2001)
    for (const line of m.slice(1)) {
      const v = line.split(',')
      if (v[4] !== '') expect(Number(v.at(-1))).toBeCloseTo(Number(v[1]) - Number(v[4]), 4)
    }
    expect((await get('/galaxies/SF-3/spectrum/model.csv?revision=99')).status).toBe(404)
  })
})
