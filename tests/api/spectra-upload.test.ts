import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { STAR_FORMING, syntheticCsv, syntheticSpectrum as syntheticSpectrumArrays, zipOf } from '../helpers/spectra.ts'

/**
 * Spectra uploads end to end: FITS and text files, zips of several, bad files (422 with `/files/<i>`
 * and nothing stored), `skipInvalid`, the limits (413), and who may upload and read.
 */
let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let viewer: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string

const FITS = join(import.meta.dirname, '../fixtures/formats/fits')
const fits = (name: string) => readFileSync(join(FITS, name))
const expected = JSON.parse(readFileSync(join(import.meta.dirname, '../fixtures/formats/fits-expected.json'), 'utf8')) as { spectra: Array<Record<string, unknown>> }
const expectedOf = (file: string) => expected.spectra.find((s) => s.file === file) as { wavelength: number[]; flux: number[]; error?: number[]; ivar?: number[]; object?: string }

beforeAll(async () => {
  t = await startTestApp({ SPECTRUM_FILE_LIMIT_MB: '1' })
  owner = await signedInAgent(t.app, 'spectra-owner@example.org')
  viewer = await signedInAgent(t.app, 'spectra-viewer@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'spectra' })).body.id
  await t.db.$client.query("insert into memberships (project_id, user_id, role) values ($1, $2, 'viewer')", [projectId, viewer.userId])
}, 60_000)
afterAll(async () => { await t.close() })

const P = () => `/api/v1/projects/${projectId}`
const get = (path: string) => owner.agent.get(P() + path)
const q = async (text: string, values: unknown[] = []) => (await t.db.$client.query(text, values)).rows
const counts = async () => (await q(`select (select count(*)::int from spectra where project_id = $1) as spectra,
  (select count(*)::int from spectrum_uploads where project_id = $1) as uploads, (select count(*)::int from intakes where project_id = $1 and kind = 'spectra') as intakes,
  (select count(*)::int from jobs where project_id = $1 and kind = 'fit') as jobs`, [projectId]))[0]

type Part = [string, Buffer | string]
function upload(files: Part[], fields: Record<string, string> = {}, who = owner) {
  let r = who.agent.post(`${P()}/spectra`).set('X-CSRF-Token', who.csrf)
  for (const [k, v] of Object.entries(fields)) r = r.field(k, v)
  for (const [name, content] of files) r = r.attach('files', Buffer.isBuffer(content) ? content : Buffer.from(content), { filename: name })
  return r
}

async function untilDone(jobId: string) {
  for (let i = 0; i < 1500; i++) {
    const j = (await get(`/jobs/${jobId}`)).body
    if (j.status === 'done' || j.status === 'failed') return j
    await new Promise((ok) => setTimeout(ok, 20))
  }
  throw new Error('the fit job did not finish')
}

describe('uploading spectra', () => {
  it('stores a FITS image spectrum as read (OBJECT, Z, BUNIT, air), fits it in the background and gives the galaxy its lines', async () => {
    const res = await upload([['image-linear-air.fits', fits('image-linear-air.fits')]])
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.upload.files).toEqual([{ name: 'image-linear-air.fits', size: 11520, spectra: [{ galaxyId: 'FIX-IMAGE-1', pixels: 240, source: expect.any(String), spectrumId: expect.any(Number), stored: 'created' }] }])
    expect(res.body.job).toMatchObject({ kind: 'fit', total: 1, uploadId: res.body.upload.id, intakeId: res.body.upload.intakeId })
    const job = await untilDone(res.body.job.id)
    expect(job).toMatchObject({ status: 'done', done: 1, total: 1, error: null })

    const got = await get('/galaxies/FIX-IMAGE-1/spectrum')
    expect(got.status, JSON.stringify(got.body).slice(0, 300)).toBe(200)
    const want = expectedOf('image-linear-air.fits')
    const s = got.body.spectrum
    // header values as astropy wrote them (tests/fixtures/formats/make_fits_fixtures.py)
    expect(s).toMatchObject({ galaxyId: 'FIX-IMAGE-1', redshift: 0.0312, wavelengthMedium: 'air', fluxUnit: 1e-17, fileName: 'image-linear-air.fits' })
    expect(s.wavelength).toEqual(want.wavelength)
    expect(s.flux.map((v: number) => Math.fround(v))).toEqual(want.flux.map((v) => Math.fround(v)))
    expect(s.error.map((v: number) => Math.fround(v))).toEqual(want.error!.map((v) => Math.fround(v)))
    expect(got.body.fit).toMatchObject({ revision: 1, settings: { profile: 'gaussian', components: 1, broadHalpha: 'auto', absorption: ['nad'], minSnr: 3 } })
    expect(got.body.fit.model.total).toHaveLength(240)

    const g = (await get('/galaxies/FIX-IMAGE-1')).body
    expect(g).toMatchObject({ redshift: 0.0312, fluxUnit: 1e-17, revision: 1, provenance: { source: 'line-fit', spectrumId: s.id, revision: 1 } })
    expect(Object.keys(g.lines).length).toBeGreaterThan(0)
    expect((await get(`/intakes/${res.body.upload.intakeId}`)).body).toMatchObject({ kind: 'spectra', status: 'committed', rowsAccepted: 1 })
  })

  it('reads a binary table with log-free wavelengths and an ivar column, and a CSV with its redshift from the form', async () => {
    const csv = syntheticCsv({ redshift: 0.03, lines: STAR_FORMING })
    const res = await upload([['table-rows.fits', fits('table-rows.fits')], ['SYN-1.csv', csv]], { defaults: JSON.stringify({ redshift: 0.03 }) })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.upload.files.map((f: { spectra: Array<{ galaxyId: string; pixels: number }> }) => f.spectra.map((s) => [s.galaxyId, s.pixels]))).toEqual([[['FIX-TABLE-ROWS', 240]], [['SYN-1', 2101]]])
    await untilDone(res.body.job.id)
    const table = (await get('/galaxies/FIX-TABLE-ROWS/spectrum')).body.spectrum
    const want = expectedOf('table-rows.fits')
    expect(table.wavelength).toEqual(want.wavelength)
    // stored as the inverse variance; answered as 1σ = 1/√ivar
    expect(table.error[0]).toBeCloseTo(1 / Math.sqrt(want.ivar![0]), 6)
    expect((await get('/galaxies/SYN-1/spectrum')).body.spectrum).toMatchObject({ redshift: 0.03, wavelengthMedium: 'air', fluxUnit: 1 })
  })

  it('says when no flux unit was given: the report marks the spectrum and its fit carries the flux-unit-assumed caution', async () => {
    const csv = (seed: number) => syntheticCsv({ redshift: 0.03, lines: STAR_FORMING, seed })
    // the FITS file has BUNIT; the first CSV has no unit anywhere; the second takes the form's
    const a = await upload([['image-linear-air.fits', fits('image-linear-air.fits')], ['UNIT-NONE.csv', csv(71)]], { defaults: JSON.stringify({ redshift: 0.03 }), onExisting: 'replace' })
    const b = await upload([['UNIT-FORM.csv', csv(72)]], { defaults: JSON.stringify({ redshift: 0.03, fluxUnit: 1e-17 }) })
    expect(a.status, JSON.stringify(a.body)).toBe(202)
    expect(b.status, JSON.stringify(b.body)).toBe(202)
    expect(a.body.upload.files[0].spectra[0].fluxUnitAssumed).toBeUndefined()
    expect(a.body.upload.files[1].spectra[0].fluxUnitAssumed).toBe(true)
    expect(b.body.upload.files[0].spectra[0].fluxUnitAssumed).toBeUndefined()
    await untilDone(a.body.job.id)
    await untilDone(b.body.job.id)
    const flagsOf = async (id: string) => ((await get(`/spectra?q=${id}`)).body.items[0] as { flags: string[] }).flags
    expect(await flagsOf('UNIT-NONE')).toContain('flux-unit-assumed')
    expect(await flagsOf('UNIT-FORM')).not.toContain('flux-unit-assumed')
    expect(await flagsOf('FIX-IMAGE-1')).not.toContain('flux-unit-assumed')
    expect((await get('/galaxies/UNIT-FORM/spectrum')).body.spectrum.fluxUnit).toBe(1e-17)
  })

  it('reads JSON spectrum files (one object or a request body) with their own resolution, which wins over the form\'s', async () => {
    const sp = (id: string) => ({ id, redshift: 0.025, fluxUnit: 1e-17, resolution: { resolvingPower: 2500 }, ...syntheticSpectrumArrays({ redshift: 0.025, lines: STAR_FORMING, seed: 5 }) })
    const res = await upload([['one.json', JSON.stringify(sp('JSON-A'))], ['body.json', JSON.stringify({ spectra: [sp('JSON-B')] })]],
      { defaults: JSON.stringify({ resolution: { fwhmAngstrom: 3 } }) })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.upload.files.map((f: { spectra: Array<{ galaxyId: string }> }) => f.spectra[0].galaxyId)).toEqual(['JSON-A', 'JSON-B'])
    await untilDone(res.body.job.id)
    const a = (await get('/galaxies/JSON-A/spectrum')).body
    expect(a.spectrum).toMatchObject({ redshift: 0.025, fluxUnit: 1e-17, resolution: { resolvingPower: 2500 } })
    expect(a.fit.result.lines.halpha.detected).toBe(true)
    const bad = await upload([['bad.json', JSON.stringify({ ...sp('JSON-C'), flux: 'none' })]])
    expect(bad.status).toBe(422)
    expect(bad.body.errors[0].path).toBe('/files/0/spectra/0/flux')
  })

  it('takes a zip of several files, each reported by its path in the archive', async () => {
    const zip = await zipOf([
      ['night1/ZIP-A.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 1 })],
      ['night1/ZIP-B.txt', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 2 }).replaceAll(',', ' ')],
      ['__MACOSX/night1/._ZIP-A.csv', 'resource fork'],
      ['night2/wave.fits', fits('image-wave-log.fits')],
    ])
    const res = await upload([['bundle.zip', zip]], { defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.upload.files.map((f: { name: string; spectra: Array<{ galaxyId: string }> }) => [f.name, f.spectra[0].galaxyId])).toEqual([
      ['bundle.zip/night1/ZIP-A.csv', 'ZIP-A'], ['bundle.zip/night1/ZIP-B.txt', 'ZIP-B'], ['bundle.zip/night2/wave.fits', 'FIX-IMAGE-2'],
    ])
    expect(res.body.upload).toMatchObject({ fileCount: 3, spectrumCount: 3 })
    expect((await untilDone(res.body.job.id))).toMatchObject({ status: 'done', done: 3 })
  })

  it('refuses an upload with a bad file: 422 naming /files/<i>, and nothing stored', async () => {
    const before = await counts()
    const good = syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })
    const res = await upload([
      ['BAD-OK.csv', good],
      ['broken.csv', 'wave,flux,error\n6500,1,0.1\n6501,abc,0.1\n'],
      ['unsorted.csv', 'wave,flux,error\n' + Array.from({ length: 20 }, (_, i) => `${6500 + (i === 7 ? -50 : i)},1,0.1`).join('\n')],
      ['notes.pdf', '%PDF-1.4'],
    ], { defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(res.status, JSON.stringify(res.body)).toBe(422)
    expect(res.body.errors).toEqual([
      { path: '/files/1', message: 'broken.csv: line 3: "6501,abc,0.1" holds a value that is not a number' },
      { path: '/files/2/spectra/0/wavelength/7', message: 'unsorted.csv: the wavelengths must increase (pixel 7: 6450 Å after 6506 Å)' },
      { path: '/files/3', message: expect.stringMatching(/^notes.pdf: "notes.pdf" is not a spectrum file/) },
    ])
    expect(await counts()).toEqual(before)
    expect((await get('/galaxies/BAD-OK')).status).toBe(404)
  })

  it('refuses a spectrum without a redshift from the file, the form or the project, by its path', async () => {
    const res = await upload([['NOZ-1.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })]])
    expect(res.status).toBe(422)
    expect(res.body.errors[0].path).toBe('/files/0/spectra/0/redshift')
    expect(res.body.errors[0].message).toMatch(/no redshift for NOZ-1/)
  })

  it('with skipInvalid stores the good files and reports the bad ones', async () => {
    const res = await upload([['broken.csv', 'wave,flux\n1,2\n'], ['SKIP-OK.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })]],
      { skipInvalid: 'true', defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    expect(res.body.upload.files).toEqual([
      { name: 'broken.csv', size: 14, error: { message: '1 pixels; a spectrum needs at least 10 (and 1 more)' } },
      { name: 'SKIP-OK.csv', size: expect.any(Number), spectra: [expect.objectContaining({ galaxyId: 'SKIP-OK', stored: 'created' })] },
    ])
    expect(res.body.upload.spectrumCount).toBe(1)
    await untilDone(res.body.job.id)
    // a report quoting a file's control characters is stored and shown with them replaced
    const nul = await upload([['nul.csv', 'wave\u0000,flux\u001b,error\n' + Array.from({ length: 12 }, (_, i) => `${6500 + i},1,0.1`).join('\n')]], { skipInvalid: 'true' })
    expect(nul.status, JSON.stringify(nul.body)).toBe(202)
    expect(nul.body.upload.files[0].error.message).toBe('no wavelength column: name one wavelength, wave or lambda (columns: wave?, flux?, error)')
    await untilDone(nul.body.job.id)
  })

  it('keeps a galaxy\'s spectrum with onExisting=skip and replaces it with onExisting=replace', async () => {
    const again = () => upload([['SKIP-OK.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 99 })]], { defaults: JSON.stringify({ redshift: 0.02 }), onExisting: 'replace' })
    const [before] = await q('select id from spectra where project_id = $1 and galaxy_id = $2', [projectId, 'SKIP-OK'])
    const skipped = await upload([['SKIP-OK.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 99 })]], { defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(skipped.body.upload.files[0].spectra[0]).toMatchObject({ stored: 'skipped', spectrumId: null })
    await untilDone(skipped.body.job.id)
    const replaced = await again()
    expect(replaced.body.upload.files[0].spectra[0]).toMatchObject({ stored: 'replaced' })
    await untilDone(replaced.body.job.id)
    const [after] = await q('select id from spectra where project_id = $1 and galaxy_id = $2', [projectId, 'SKIP-OK'])
    expect(after.id).not.toBe(before.id)
    // the record the earlier fit wrote went to galaxy_versions
    const versions = (await get('/galaxies/SKIP-OK/versions')).body.items
    expect(versions.length).toBe(1)
  })
})

describe('undo', () => {
  it('undoing a spectra upload restores the records it replaced, removes the galaxies it created and its spectra', async () => {
    await owner.agent.post(`${P()}/galaxies/batch`).set('X-CSRF-Token', owner.csrf)
      .send({ galaxies: [{ id: 'UNDO-1', redshift: 0.02, lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 } } }] })
    const res = await upload([['UNDO-1.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })], ['UNDO-2.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 3 })]],
      { defaults: JSON.stringify({ redshift: 0.02 }) })
    await untilDone(res.body.job.id)
    expect((await get('/galaxies/UNDO-1')).body.provenance).toMatchObject({ source: 'line-fit' })
    const undo = await owner.agent.post(`${P()}/intakes/${res.body.upload.intakeId}/undo`).set('X-CSRF-Token', owner.csrf)
    expect(undo.status, JSON.stringify(undo.body)).toBe(200)
    expect(undo.body).toMatchObject({ restored: 1, removed: 1 })
    const g = (await get('/galaxies/UNDO-1')).body
    expect(g).toMatchObject({ provenance: null, lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 } } })
    expect((await get('/galaxies/UNDO-2')).status).toBe(404)
    expect((await get('/galaxies/UNDO-1/spectrum')).status).toBe(404)
    expect(await q('select count(*)::int as n from spectra where upload_id = $1', [res.body.upload.id])).toEqual([{ n: 0 }])
  })
})

describe('limits and bad archives', () => {
  it('answers 413 for a spectrum of more than 50,000 pixels, a file above the limit, a zip entry that expands beyond it, and more than 1,000 spectra', async () => {
    const before = await counts()
    const long = 'wave,flux,error\n' + Array.from({ length: 50_001 }, (_, i) => `${4000 + i * 0.05},1,0.1`).join('\n')
    const r1 = await upload([['long.csv', long]], { defaults: JSON.stringify({ redshift: 0.01 }) })
    expect(r1.status).toBe(413)
    expect(r1.body.errors[0]).toMatchObject({ path: '/files/0/spectra/0' })
    const r2 = await upload([['big.csv', Buffer.alloc(1024 * 1024 + 10, 0x20)]])
    expect(r2.status).toBe(413)
    const bomb = await zipOf([['bomb.csv', Buffer.alloc(3 * 1024 * 1024, 0x20)]])
    expect(bomb.length).toBeLessThan(100_000)
    const r3 = await upload([['bomb.zip', bomb]])
    expect(r3.status).toBe(413)
    expect(r3.body.detail).toMatch(/expands to 3 MB/)
    const many = await zipOf(Array.from({ length: 1001 }, (_, i) => [`m${i}.csv`, 'wave,flux,error\n1,1,1\n'] as [string, string]))
    const r4 = await upload([['many.zip', many]])
    expect(r4.status).toBe(413)
    expect(r4.body.detail).toMatch(/more than 1000 files/)
    expect(await counts()).toEqual(before)
  })

  it('refuses a damaged zip entry by its CRC-32 (APPNOTE 4.4.7) and takes the undamaged one beside it', async () => {
    const good = syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 81 })
    const zip = await zipOf([['GOOD-ZIP.csv', good], ['BAD-ZIP.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 82 })]])
    // flip a byte inside the second entry's deflated data (after its local header and name)
    const at = zip.indexOf('BAD-ZIP.csv') + 'BAD-ZIP.csv'.length + 40
    zip[at] ^= 0xff
    const res = await upload([['pair.zip', zip]], { defaults: JSON.stringify({ redshift: 0.02 }), skipInvalid: 'true' })
    expect(res.status, JSON.stringify(res.body)).toBe(202)
    const [a, b] = res.body.upload.files
    expect(a.spectra[0]).toMatchObject({ galaxyId: 'GOOD-ZIP', stored: 'created' })
    expect(b.error.message).toMatch(/cannot be expanded|damaged/)
    await untilDone(res.body.job.id)
  })

  it('refuses a zip with a path that leaves the archive (..) and one that is not a zip, by the file\'s index', async () => {
    const zip = await zipOf([['xx/evil.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })]])
    const evil = Buffer.from(zip.toString('latin1').replaceAll('xx/evil.csv', '../evil.csv'), 'latin1')
    const res = await upload([['ok.csv', 'wave,flux,error\n1,1,1\n'], ['evil.zip', evil], ['fake.zip', 'not a zip at all']], { defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(res.status).toBe(422)
    expect(res.body.errors.map((e: { path: string }) => e.path)).toEqual(['/files/0/spectra/0/wavelength', '/files/1', '/files/2'])
    expect(res.body.errors[1].message).toMatch(/evil.zip: the archive cannot be read: invalid relative path: \.\.\/evil\.csv/)
    // one spectrum per galaxy and upload: the same galaxy in two files is refused at the second
    const twice = await zipOf([['a/DUP.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })], ['b/DUP.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING, seed: 2 })]])
    const dup = await upload([['twice.zip', twice]], { defaults: JSON.stringify({ redshift: 0.02 }) })
    expect(dup.status).toBe(422)
    expect(dup.body.errors).toEqual([{ path: '/files/1/spectra/0/id', message: 'twice.zip/b/DUP.csv: galaxy DUP has a spectrum in file 0 of this upload too' }])
  })

  it('refuses form fields that are not what they should be, by name', async () => {
    const ok: Part[] = [['F-1.csv', syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })]]
    expect((await upload(ok, { defaults: '{"redshift": -1}' })).body.errors[0].path).toBe('/defaults/redshift')
    expect((await upload(ok, { defaults: 'not json' })).body.errors[0].path).toBe('/defaults')
    expect((await upload(ok, { skipInvalid: 'maybe' })).body.errors[0].path).toBe('/skipInvalid')
    expect((await upload(ok, { onExisting: 'merge' })).body.errors[0].path).toBe('/onExisting')
    expect((await upload([], { onExisting: 'skip' })).body.errors[0].path).toBe('/files')
    expect((await upload([])).status).toBe(415) // no form at all
  })
})

describe('access', () => {
  it('a viewer reads spectra but cannot upload; another project\'s spectra answer 404', async () => {
    expect((await upload([['V-1.csv', 'wave,flux,error\n1,1,1\n']], {}, viewer)).status).toBe(403)
    expect((await viewer.agent.get(`${P()}/galaxies/FIX-IMAGE-1/spectrum`)).status).toBe(200)
    expect((await viewer.agent.get(`${P()}/spectra`)).status).toBe(200)
    const other = (await viewer.agent.post('/api/v1/projects').set('X-CSRF-Token', viewer.csrf).send({ name: 'mine' })).body.id
    expect((await viewer.agent.get(`/api/v1/projects/${other}/galaxies/FIX-IMAGE-1/spectrum`)).status).toBe(404)
    expect((await owner.agent.get(`/api/v1/projects/${other}/spectra`)).status).toBe(404)
  })
})

describe('stored arrays read back by a binary COPY', () => {
  it('binaryCopyRows reads PostgreSQL\'s own binary COPY: an int8, bytes and a NULL (PostgreSQL documentation, COPY, "Binary Format")', async () => {
    const { to: copyTo } = await import('pg-copy-streams')
    const { binaryCopyRows } = await import('../../server/services/spectra.service.ts')
    const client = await t.db.$client.connect()
    const chunks: Buffer[] = []
    try {
      for await (const c of client.query(copyTo("copy (select 7::bigint, '\\x01ff02'::bytea, null::bytea union all select 9, ''::bytea, '\\x00'::bytea) to stdout with (format binary)"))) chunks.push(c as Buffer)
    } finally { client.release() }
    const rows = binaryCopyRows(Buffer.concat(chunks))
    expect(rows.map((r) => [Number(r[0]!.readBigInt64BE(0)), r[1] && [...r[1]], r[2] && [...r[2]]])).toEqual([[7, [1, 255, 2], null], [9, [], [0]]])
  })
})
