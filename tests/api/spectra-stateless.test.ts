import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { STAR_FORMING, tinySpectrum } from '../helpers/spectra.ts'
import { broadLineExample, sodiumExample, syntheticSpectrum as generate } from '../../shared/spectra/index.ts'

/**
 * POST /api/v1/spectra/fit: the stateless fit of 1-D spectra (shared/science/README.md §13, §14).
 * Every spectrum here is invented (tests/helpers/spectra.ts, shared/spectra/synthetic.ts).
 */
let t: TestApp
beforeAll(async () => { t = await startTestApp() })
afterAll(async () => { await t.close() })

const fit = (body: unknown) => request(t.app).post('/api/v1/spectra/fit').send(body as object)

describe('POST /spectra/fit', () => {
  it('answers the documented shape, and its diagnostics are exactly POST /diagnostics of its measurements', async () => {
    // the fit's own seeded generator: lines 120 km/s wide intrinsically, seen through a 2.5 Å instrument
    const { spectrum: drawn } = generate({
      seed: 11, id: 'SF-1', redshift: 0.03, wavelength: { start: 4700 * 1.03, end: 6800 * 1.03, step: 1.03 }, continuum: { level: 10 }, noise: 0.3,
      resolution: { fwhmAngstrom: 2.5 }, lines: Object.entries(STAR_FORMING).filter(([id]) => id !== 'nii_6548' && id !== 'oiii_4959').map(([id, flux]) => ({ id: id as 'halpha', flux, sigma: 120 })),
    })
    const spectrum = { ...drawn, fluxUnit: 1e-17 }
    const res = await fit({ fit: { broadHalpha: 'off' }, spectra: [spectrum] })
    expect(res.status).toBe(200)
    expect(res.body.methodVersion).toMatch(/\+spectra-/)
    expect(res.body.fit).toEqual({ profile: 'gaussian', components: 1, broadHalpha: 'off', absorption: ['nad'], monteCarlo: { draws: 0, seed: 1 }, balmerAbsorptionEw: 0 })
    const [r] = res.body.results
    expect(r.id).toBe('SF-1')
    expect(Object.keys(r).sort()).toEqual(['absorption', 'diagnostics', 'fit', 'flags', 'id', 'lines', 'measurements'])
    // the invented truth: Hα 600 with a pixel noise of 0.3 (flux units); recovered within 3σ of its error
    const ha = r.lines.halpha
    expect(ha.detected).toBe(true)
    expect(Math.abs(ha.flux - 600)).toBeLessThan(3 * ha.error)
    // σ_int = √(σ² − σ_inst²) (shared/science/README.md §13), and it recovers the drawn 120 km/s
    expect(Math.abs(ha.sigmaIntrinsic - 120)).toBeLessThan(3 * ha.sigmaError)
    expect(ha.sigmaIntrinsic).toBeCloseTo(Math.sqrt(ha.sigma ** 2 - ha.sigmaInstrumental ** 2), 6)
    expect(r.fit.components).toBe(1)
    // no Na I D absorption was drawn: covered, so measured and not detected
    expect(r.absorption.nad.detected).toBe(false)
    const direct = await request(t.app).post('/api/v1/diagnostics').send({
      settings: res.body.settings, galaxies: [{ id: 'SF-1', redshift: 0.03, fluxUnit: 1e-17, lines: r.measurements.lines, ...(Object.keys(r.measurements.ew).length ? { ew: r.measurements.ew } : {}) }],
    })
    expect(direct.status).toBe(200)
    expect(r.diagnostics).toEqual(direct.body.results[0])
    expect(r.diagnostics.classes.nii).toBe('star-forming')
  })

  it('finds broad Hα and Na I D in the invented examples, and flags lines outside the spectrum', async () => {
    const res = await fit({ spectra: [broadLineExample(3).spectrum, sodiumExample(4).spectrum] })
    expect(res.status).toBe(200)
    const [broad, sodium] = res.body.results
    expect(broad.fit.broadHalpha).toBe(true)
    expect(broad.lines.halpha_broad.detected).toBe(true)
    expect(broad.measurements.fwhm.halpha_broad).toBeGreaterThan(2000)
    expect(broad.flags).toContain('not-covered:oii_3726') // the example starts at 4700 Å
    expect(sodium.absorption.nad.detected).toBe(true)
    expect(sodium.absorption.nad.flags).toContain('stellar-absorption-not-separated')
    expect(sodium.lines.hei_5876.detected).toBe(true)
  })

  it('refuses bad spectra with the JSON Pointer of the member, and nothing is fitted', async () => {
    const s = tinySpectrum()
    const cases: Array<[unknown, string]> = [
      [{ ...s, wavelength: [...s.wavelength.slice(0, 10), s.wavelength[9], ...s.wavelength.slice(11)] }, '/spectra/0/wavelength'],
      [{ ...s, flux: s.flux.slice(1) }, '/spectra/0/flux'],
      [{ ...s, error: undefined }, '/spectra/0'],
      [{ ...s, error: s.error.map((e, i) => (i === 100 ? -1 : e)) }, '/spectra/0/error/100'],
    ]
    for (const [spectrum, path] of cases) {
      const res = await fit({ spectra: [tinySpectrum('OK'), spectrum] })
      expect(res.status, path).toBe(422)
      expect(res.body.errors.map((e: { path: string }) => e.path)).toContain(path.replace('/spectra/0', '/spectra/1'))
    }
  })

  it('checks the size limits before the content: 413 for 1,001 spectra, 50,001 pixels, or a body over 64 MB', async () => {
    const many = await fit({ spectra: Array.from({ length: 1001 }, () => ({ id: 'x' })) })
    expect(many.status).toBe(413)
    expect(many.body.errors[0].path).toBe('/spectra')
    const long = await fit({ spectra: [{ id: 'x', wavelength: Array.from({ length: 50_001 }, (_, i) => i) }] })
    expect(long.status).toBe(413)
    expect(long.body.errors[0].path).toBe('/spectra/0/wavelength')
    const huge = await request(t.app).post('/api/v1/spectra/fit').set('Content-Type', 'application/json').send('{"spectra":[' + '1,'.repeat(33_600_000) + '1]}')
    expect(huge.status).toBe(413)
  })

  it('a 40 MB body (above the other routes\' 32 MB) is read and answered', async () => {
    const s = tinySpectrum('BIG')
    // padding in the flux digits: 40 MB of JSON, one spectrum
    const pad = (v: number) => Number(v.toFixed(3)) + 1e-12
    const body = JSON.stringify({ spectra: [{ ...s, flux: s.flux.map(pad) }], fit: { absorption: [] } }).replace(/"flux":\[/, '"flux":[' + ' '.repeat(40 * 1024 * 1024))
    const res = await request(t.app).post('/api/v1/spectra/fit').set('Content-Type', 'application/json').send(body)
    expect(res.status).toBe(200)
    expect(res.body.results[0].lines.halpha.detected).toBe(true)
  })

  it('keeps anonymous callers to the smaller compute budget, with the way to raise it (422 at /spectra or /fit/monteCarlo/draws)', async () => {
    const s = tinySpectrum()
    const anon = await fit({ spectra: Array.from({ length: 21 }, (_, i) => ({ ...s, id: `A-${i}` })) })
    expect(anon.status).toBe(422)
    expect(anon.body.errors[0].path).toBe('/spectra')
    expect(anon.body.errors[0].message).toContain('signing in or sending an API key raises the limit to 2,500,000')
    const draws = await fit({ fit: { monteCarlo: { draws: 30 } }, spectra: [s] })
    expect(draws.status).toBe(422)
    expect(draws.body.errors[0].path).toBe('/fit/monteCarlo/draws')
    const owner = await signedInAgent(t.app, 'spectra-fit@example.org')
    const ok = await owner.agent.post('/api/v1/spectra/fit').set('X-CSRF-Token', owner.csrf).send({ spectra: Array.from({ length: 21 }, (_, i) => ({ ...s, id: `A-${i}` })) })
    expect(ok.status).toBe(200)
    expect(ok.body.results).toHaveLength(21)
  })
})

describe('POST /spectra/fit on a short compute queue', () => {
  let small: TestApp
  beforeAll(async () => { small = await startTestApp({ COMPUTE_THREADS: '1', COMPUTE_QUEUE: '2' }) })
  afterAll(async () => { await small.close() })
  it('fits more spectra than the queue holds: a request keeps one fit per thread in flight, so it is not refused by its own fits', async () => {
    const spectra = Array.from({ length: 8 }, (_, i) => tinySpectrum(`Q-${i}`))
    const res = await request(small.app).post('/api/v1/spectra/fit').send({ fit: { broadHalpha: 'off', absorption: [] }, spectra })
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200)
    expect(res.body.results.map((r: { id: string }) => r.id)).toEqual(spectra.map((s) => s.id))
    expect(res.body.results.every((r: { lines: { halpha?: { detected: boolean } } }) => r.lines.halpha?.detected)).toBe(true)
  })
})
