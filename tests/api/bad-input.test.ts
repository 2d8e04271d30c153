import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { parse } from 'csv-parse/sync'

/**
 * The bad-input corpus (tests/bad-input): every file is named after what it tries. Each must get its
 * documented 4xx problem document — never a 500 — and leave nothing stored.
 */
const CORPUS = join(PROJECT_ROOT, 'tests', 'bad-input')
const JSON_EXPECT: Record<string, { status: number; path?: string }> = {
  'malformed-truncated': { status: 400 }, 'malformed-trailing-comma': { status: 400 }, 'malformed-single-quotes': { status: 400 },
  'bare-nan-token': { status: 400 },
  'wrong-type-galaxies-string': { status: 422, path: '/galaxies' }, 'wrong-type-id-number': { status: 422, path: '/galaxies/0/id' },
  'wrong-type-redshift-string': { status: 422, path: '/galaxies/0/redshift' },
  'nan-string-flux': { status: 422, path: '/galaxies/0/lines/halpha/flux' }, 'infinity-string-flux': { status: 422, path: '/galaxies/0/lines/halpha/flux' },
  'overflow-1e400-flux': { status: 422, path: '/galaxies/0/lines/halpha/flux' },
  'negative-flux': { status: 422, path: '/galaxies/0/lines/halpha/flux' }, 'negative-error': { status: 422, path: '/galaxies/0/lines/halpha/error' },
  'zero-error': { status: 422, path: '/galaxies/0/lines/halpha/error' }, 'zero-upper-limit': { status: 422, path: '/galaxies/0/lines/hbeta/upperLimit' },
  'flux-without-error': { status: 422, path: '/galaxies/0/lines/halpha/error' }, 'flux-and-limit-together': { status: 422, path: '/galaxies/0/lines/halpha/flux' },
  'unknown-line-identifier': { status: 422, path: '/galaxies/0/lines/h_alpha' }, 'duplicate-galaxy-ids': { status: 422, path: '/galaxies/1/id' },
  'empty-batch': { status: 422, path: '/galaxies' }, 'array-instead-of-object': { status: 422 },
  'empty-galaxy-id': { status: 422, path: '/galaxies/0/id' }, 'negative-redshift': { status: 422, path: '/galaxies/0/redshift' },
  'unknown-galaxy-field': { status: 422, path: '/galaxies/0/extra' }, 'wrong-type-equivalent-width': { status: 422, path: '/galaxies/0/ew/halpha' },
  'negative-fwhm': { status: 422, path: '/galaxies/0/fwhm/halpha_broad' },
  'diagnostics-unknown-extinction-law': { status: 422, path: '/settings/extinctionLaw' }, 'diagnostics-rv-string': { status: 422, path: '/settings/rv' },
  'diagnostics-negative-draws': { status: 422, path: '/settings/monteCarlo/draws' },
}
/** CSV files refused at upload (stage) or at commit, with the status. */
const CSV_EXPECT: Record<string, { at: 'stage' | 'commit'; status: number }> = {
  'header-only': { at: 'stage', status: 422 }, 'empty-file': { at: 'stage', status: 422 }, 'repeated-header': { at: 'stage', status: 422 },
  'missing-header-name': { at: 'stage', status: 422 }, 'latin1-not-utf8': { at: 'stage', status: 422 }, 'unclosed-quote': { at: 'stage', status: 422 },
  'formula-in-id': { at: 'commit', status: 422 }, 'formula-in-flux': { at: 'commit', status: 422 }, 'nan-flux-cell': { at: 'commit', status: 422 },
  'negative-error-cell': { at: 'commit', status: 422 }, 'duplicate-ids': { at: 'commit', status: 422 }, 'quoted-newline-in-id': { at: 'commit', status: 422 },
}

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string
let key: string
const stored = async () => {
  const q = async (sql: string) => Number((await t.db.$client.query(sql)).rows[0].count)
  return { galaxies: await q('select count(*) from galaxies'), results: await q('select count(*) from results'), committed: await q("select count(*) from intakes where status = 'committed'") }
}

beforeAll(async () => {
  t = await startTestApp({ UPLOAD_LIMIT_MB: '1' })
  owner = await signedInAgent(t.app, 'bad-input@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'corpus' })).body.id
  key = (await owner.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', owner.csrf).send({ name: 'w', access: 'write' })).body.key
})
afterAll(async () => { await t.close() })

describe('bad-input corpus: JSON bodies', () => {
  const files = readdirSync(join(CORPUS, 'json')).filter((f) => f.endsWith('.json'))
  it('has an expectation for every file', () => {
    expect(files.map((f) => f.replace(/\.json$/, '')).sort()).toEqual(Object.keys(JSON_EXPECT).sort())
  })
  for (const file of files) {
    const name = file.replace(/\.json$/, '')
    it(`${name} → ${JSON_EXPECT[name]?.status}`, async () => {
      const body = readFileSync(join(CORPUS, 'json', file), 'utf8')
      const before = await stored()
      const url = name.startsWith('diagnostics-') ? '/api/v1/diagnostics' : `/api/v1/projects/${projectId}/galaxies/batch`
      const res = await request(t.app).post(url).set('Authorization', `Bearer ${key}`).set('Content-Type', 'application/json').send(body)
      expect(res.status, JSON.stringify(res.body)).toBe(JSON_EXPECT[name].status)
      expect(res.type).toBe('application/problem+json')
      if (JSON_EXPECT[name].path) expect(res.body.errors.map((e: { path: string }) => e.path)).toContain(JSON_EXPECT[name].path)
      expect(await stored()).toEqual(before)
    })
  }

  it('10,001 galaxies → 413; a body over the JSON limit → 413; nothing stored', async () => {
    const before = await stored()
    const many = { galaxies: Array.from({ length: 10_001 }, (_, i) => galaxy(`B-${i}`)) }
    const a = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${key}`).send(many)
    expect(a.status).toBe(413)
    const b = await request(t.app).post('/api/v1/diagnostics').send(many)
    expect(b.status).toBe(413)
    const huge = '{"galaxies":[' + '"x",'.repeat(9_000_000) + '"x"]}'
    const c = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${key}`).set('Content-Type', 'application/json').send(huge)
    expect(c.status).toBe(413)
    expect(await stored()).toEqual(before)
  }, 120_000)
})

describe('bad-input corpus: CSV files', () => {
  const files = readdirSync(join(CORPUS, 'csv')).filter((f) => f.endsWith('.csv'))
  it('has an expectation for every file', () => {
    expect(files.map((f) => f.replace(/\.csv$/, '')).sort()).toEqual(Object.keys(CSV_EXPECT).sort())
  })
  const upload = (buf: Buffer, name: string) => owner.agent.post(`/api/v1/projects/${projectId}/intakes/csv`).set('X-CSRF-Token', owner.csrf)
    .attach('file', buf, { filename: name, contentType: 'text/csv' })
  for (const file of files) {
    const name = file.replace(/\.csv$/, '')
    it(`${name} → ${CSV_EXPECT[name].status} at ${CSV_EXPECT[name].at}`, async () => {
      const before = await stored()
      const staged = await upload(readFileSync(join(CORPUS, 'csv', file)), file)
      if (CSV_EXPECT[name].at === 'stage') {
        expect(staged.status, JSON.stringify(staged.body)).toBe(CSV_EXPECT[name].status)
        expect(staged.type).toBe('application/problem+json')
      } else {
        expect(staged.status, JSON.stringify(staged.body)).toBe(201)
        const res = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${staged.body.intake.id}/commit`).set('X-CSRF-Token', owner.csrf)
          .send({ mapping: staged.body.suggestedMapping })
        expect(res.status, JSON.stringify(res.body)).toBe(CSV_EXPECT[name].status)
        expect(res.body.errors[0].message).toMatch(/^row \d+/)
      }
      expect(await stored()).toEqual(before)
    })
  }

  it('an upload over the size limit → 413', async () => {
    const big = Buffer.alloc(1024 * 1024 + 10, 'a')
    expect((await upload(big, 'big.csv')).status).toBe(413)
  })

  it('a quoted newline inside an unmapped text column is read correctly', async () => {
    const csv = 'id,note,halpha_flux,halpha_err\nQ-1,"two\nlines",300,6\nQ-2,plain,310,6\n'
    const staged = await upload(Buffer.from(csv), 'notes.csv')
    expect(staged.body.rowCount).toBe(2)
    const res = await owner.agent.post(`/api/v1/projects/${projectId}/intakes/${staged.body.intake.id}/commit`).set('X-CSRF-Token', owner.csrf)
      .send({ mapping: staged.body.suggestedMapping })
    expect(res.status).toBe(200)
    expect(res.body.inserted).toBe(2)
  })
})

describe('numbers at the edges of the schema are stored, never a 500', () => {
  const send = (gals: unknown[]) => request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${key}`).send({ galaxies: gals })

  it('derived values beyond float4 (star-formation rate, S/N, ratio errors) are kept exactly in the result and saturate in the columns', async () => {
    // fluxUnit and fluxes at their upper bounds at z = 20: L(Hα) ≈ 10⁹⁹ erg/s, far beyond the 3.4·10³⁸ a `real` holds
    const huge = galaxy('EDGE-HUGE', { redshift: 20, fluxUnit: 1e10, lines: { halpha: { flux: 1e30, error: 1e-30 }, hbeta: { flux: 3e29, error: 1e-30 }, nii_6584: { flux: 1e-30, error: 1e30 } }, ew: { halpha: 1e5 } })
    // and at the lower bounds: values below the smallest float4 are 0 in the columns
    const tiny = galaxy('EDGE-TINY', { fluxUnit: 1e-30, lines: { halpha: { flux: 1e-30, error: 1e30 }, hbeta: { flux: 3e-31, error: 1e30 } }, ew: { halpha: -1e5 } })
    const res = await send([huge, tiny])
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const detail = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies/EDGE-HUGE`).set('Authorization', `Bearer ${key}`)
    const sfr = detail.body.results.sfr.sfrHalpha as number
    expect(sfr).toBeGreaterThan(3.5e38) // the result document holds the double
    const [cols] = (await t.db.$client.query("select r.sfr_halpha, r.snr_min, r.x_nii_err, r.ew_halpha from results r join galaxies g on g.id = r.galaxy_id where g.key = 'EDGE-HUGE'")).rows
    expect(cols.sfr_halpha).toBeCloseTo(3.4028234663852886e38, -33) // saturated at the largest float4
    expect(cols.snr_min).toBeCloseTo(3.4028234663852886e38, -33)
    expect(cols.ew_halpha).toBe(1e5)
    const [small] = (await t.db.$client.query("select r.snr_min, r.ew_halpha from results r join galaxies g on g.id = r.galaxy_id where g.key = 'EDGE-TINY'")).rows
    expect(small.snr_min).toBe(0) // 3·10⁻⁶¹ flushed to zero
    expect(small.ew_halpha).toBe(-1e5)
    // sorting and filtering still place it beyond every bound
    const top = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies`).query({ sort: '-sfrHalpha', limit: 1 }).set('Authorization', `Bearer ${key}`)
    expect(top.body.items[0].id).toBe('EDGE-HUGE')
    const next = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies`).query({ sort: '-sfrHalpha', limit: 1, cursor: top.body.nextCursor }).set('Authorization', `Bearer ${key}`)
    expect(next.status).toBe(200)
    expect(next.body.items[0].id).not.toBe('EDGE-HUGE')
    const diagram = await request(t.app).get(`/api/v1/projects/${projectId}/diagram`).set('Authorization', `Bearer ${key}`)
    expect(diagram.status).toBe(200)
    const csv = await request(t.app).get(`/api/v1/projects/${projectId}/exports/galaxies.csv`).set('Authorization', `Bearer ${key}`).buffer(true)
      .parse((r, cb) => { let s = ''; r.on('data', (c: Buffer) => { s += c }); r.on('end', () => cb(null, s)) })
    expect(csv.status).toBe(200)
    expect(csv.body as string).not.toMatch(/Infinity|NaN/)
  })

  it('filter bounds beyond float4 filter instead of failing (minSnr=1e300, range=sfrHalpha:1e38:, zMax=1e308)', async () => {
    for (const query of [{ minSnr: '1e300' }, { range: 'sfrHalpha:1e38:' }, { range: 'ebv::1e-300' }, { zMax: '1e308' }]) {
      const list = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies`).query(query).set('Authorization', `Bearer ${key}`)
      expect(list.status, `${JSON.stringify(query)} ${JSON.stringify(list.body)}`).toBe(200)
      const diagram = await request(t.app).get(`/api/v1/projects/${projectId}/diagram`).query(query).set('Authorization', `Bearer ${key}`)
      expect(diagram.status).toBe(200)
    }
    const big = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies`).query({ range: 'sfrHalpha:1e38:' }).set('Authorization', `Bearer ${key}`)
    expect(big.body.items.map((g: { id: string }) => g.id)).toEqual(['EDGE-HUGE'])
  })
})

describe('text fields: control characters refused, line breaks where text may span lines', () => {
  it('a description and an assumptions note may hold line breaks and tabs; a name may not', async () => {
    const ok = await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'Lines', description: 'first line\nsecond\tline\r\n' })
    expect(ok.status).toBe(201)
    expect(ok.body.description).toBe('first line\nsecond\tline\r\n')
    const note = await owner.agent.put(`/api/v1/projects/${ok.body.id}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: {}, note: 'why:\n- dusty nuclei' })
    expect(note.status).toBe(201)
    const bad = await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'two\nlines' })
    expect(bad.status).toBe(422)
    expect(bad.body.errors).toEqual([{ path: '/name', message: 'must not contain control characters (such as NUL)' }])
  })

  it('a NUL in the sign-in and password-reset e-mail is a 422 naming /email, not a 500', async () => {
    for (const url of ['/api/v1/auth/sign-in', '/api/v1/auth/password-reset']) {
      const res = await request(t.app).post(url).send({ email: 'bad-input@example.org\u0000', password: 'correct horse battery' })
      expect([res.status, res.body.errors?.[0]?.path], url).toEqual([422, '/email'])
    }
  })
})

describe('CSV export: no live formula in any spreadsheet locale', () => {
  it('the project name goes through the CSV writer; every ;-separated part of a text cell is neutralised', async () => {
    const name = 'Survey,=HYPERLINK("http://example.org/?q=1";"click"),end'
    const p = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name })).body.id
    const ids = ['X;=1+1', '=SUM(A1:A9)', 'plain;part', 'Q; "@cmd"']
    const stored = await owner.agent.post(`/api/v1/projects/${p}/galaxies/batch`).set('X-CSRF-Token', owner.csrf).send({ galaxies: ids.map((id) => galaxy(id)) })
    expect(stored.status, JSON.stringify(stored.body)).toBe(200)
    const res = await owner.agent.get(`/api/v1/projects/${p}/exports/galaxies.csv`).query({ columns: 'redshift' }).buffer(true)
      .parse((r, cb) => { let s = ''; r.on('data', (c: Buffer) => { s += c }); r.on('end', () => cb(null, s)) })
    expect(res.status).toBe(200)
    const text = res.body as string
    const lines = text.trimEnd().split('\n')
    const comments = lines.filter((l) => l.startsWith('#'))
    expect(comments).toHaveLength(8) // every provenance line still starts with # for readers that skip comments
    expect(comments[0]).toBe(`# Ratiograph 0.1.0 export of project,"Survey,=HYPERLINK(""http://example.org/?q=1"";""click""),end"`)
    // a comma spreadsheet: every cell of every line (comments included) is plain text
    const FORMULA = /^[\s"]*[=+\-@]|^[\t\r]/
    for (const record of parse(text, { relax_column_count: true, relax_quotes: true }) as string[][]) {
      for (const cell of record) expect(cell, cell).not.toMatch(FORMULA)
    }
    // a semicolon spreadsheet splits on every ';', inside quotes or not
    for (const line of lines) for (const cell of line.split(';')) expect(cell, line).not.toMatch(FORMULA)
    const rows = parse(lines.filter((l) => !l.startsWith('#')).join('\n'), { columns: true }) as Array<Record<string, string>>
    expect(rows.map((r) => r.galaxy_id).sort()).toEqual(["'=SUM(A1:A9)", 'Q;\' "@cmd"', "X;'=1+1", 'plain;part'].sort())
    expect(text).toContain('"X;\'=1+1"') // fields holding ; are quoted
  })
})
