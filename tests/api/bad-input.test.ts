import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT } from '../../server/config.ts'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'

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
