import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { convertStoredDocuments, documentReader, type StoredColumns } from '../../server/services/stored-results.ts'

// Results stored before the typed columns (one JSON document per galaxy and revision) are converted
// in place at start-up: each document that rebuilds to itself from typed columns becomes them, any
// other stays a document, and the API serves the same answers before and after.

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string
const P = () => `/api/v1/projects/${projectId}`
const get = (path: string) => owner.agent.get(P() + path)
const sleep = (ms: number) => new Promise((ok) => setTimeout(ok, ms))
const q = async <T = Record<string, unknown>>(text: string, values: unknown[] = []) => (await t.db.$client.query(text, values)).rows as T[]
const survey = generateLanternSurvey(80, 11).map(({ population: _p, ...g }) => g)

beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'stored-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'stored' })).body.id
  expect((await owner.agent.post(`${P()}/galaxies/batch`).set('X-CSRF-Token', owner.csrf).send({ galaxies: survey })).status).toBe(200)
  // a second revision with Monte Carlo draws (percentiles and class fractions in their own columns)
  const change = await owner.agent.put(`${P()}/assumptions`).set('X-CSRF-Token', owner.csrf).send({ settings: { monteCarlo: { draws: 60 }, sfrCalibration: 'kennicuttEvans12' }, note: 'mc' })
  expect(change.status).toBe(201)
  for (let i = 0; (await get(`/jobs/${change.body.job.id}`)).body.status !== 'done'; i++) { expect(i).toBeLessThan(1500); await sleep(20) }
})
afterAll(async () => { await t.close() })

/** What the API serves of every galaxy under both revisions, and the CSV export. */
async function served() {
  const pages: Record<string, unknown> = {}
  for (const g of survey.filter((_, i) => i % 8 === 0)) for (const rev of [1, 2]) pages[`${g.id}@${rev}`] = (await get(`/galaxies/${g.id}/results/${rev}`)).body.results
  const csv = (await get('/exports/galaxies.csv').buffer(true).parse((r, cb) => { let s = ''; r.setEncoding('utf8'); r.on('data', (c: string) => { s += c }); r.on('end', () => cb(null, s)) })).body as string
  return { pages, csv: csv.replace(/^# generated: .*$/m, '') }
}

describe('results stored as documents', () => {
  it('are converted to typed columns when they rebuild to themselves, kept otherwise, and served the same', async () => {
    const rows = await q<StoredColumns & { galaxy_id: string; key: string }>(`select r.galaxy_id, g.key, r.revision, r.layout, r.measures, r.measures_exact, r.codes, r.mc_percentiles, r.mc_classes, r.result
      from results r join galaxies g on g.id = r.galaxy_id where r.project_id = $1 order by r.galaxy_id, r.revision`, [projectId])
    expect(rows).toHaveLength(2 * survey.length)
    expect(rows.every((r) => r.measures !== null && r.result === null)).toBe(true)
    const before = await served()

    // the state an older version left: every result a document, no typed columns
    const reader = await documentReader(t.db, projectId, [1, 2])
    const docs = rows.map((r) => ({ galaxy_id: r.galaxy_id, revision: r.revision, result: reader.document(r.key, r) as Record<string, unknown> }))
    // one document that no kernel row rebuilds (a key the current version does not write)
    const odd = docs[5]
    odd.result = { ...odd.result, legacyNote: 'written by another method version' }
    await q(`update results r set result = t.result, layout = null, measures = null, measures_exact = null, codes = null, mc_percentiles = null, mc_classes = null
      from json_to_recordset($1::json) as t(galaxy_id bigint, revision int, result json) where r.galaxy_id = t.galaxy_id and r.revision = t.revision`, [JSON.stringify(docs)])
    expect((await q<{ n: number }>('select count(*)::int as n from results where measures is null and result is not null'))[0].n).toBe(2 * survey.length)
    const { legacyNote: _, ...oddServed } = (await get(`/galaxies/${rows[5].key}/results/${odd.revision}`)).body.results
    expect(oddServed).toEqual((await documentReader(t.db, projectId, [odd.revision])).document(rows[5].key, { ...rows[5], result: null }))
    const asDocuments = await served()
    expect(asDocuments).toEqual(before)

    const logged: string[] = []
    expect(await convertStoredDocuments(t.db, (m) => logged.push(m))).toEqual({ converted: 2 * survey.length - 1, kept: 1 })
    expect(logged[0]).toBe(`converting ${2 * survey.length} stored result documents to typed columns`)
    const after = await q<{ galaxy_id: string; revision: number; typed: boolean; doc: boolean }>('select galaxy_id, revision, measures is not null and codes is not null as typed, result is not null as doc from results where project_id = $1 order by galaxy_id, revision', [projectId])
    expect(after.filter((r) => r.doc).map((r) => [String(r.galaxy_id), r.revision])).toEqual([[String(odd.galaxy_id), odd.revision]])
    expect(after.filter((r) => r.typed)).toHaveLength(2 * survey.length - 1)
    // the Monte Carlo revision's percentiles came back too
    expect((await q<{ n: number }>('select count(*)::int as n from results where project_id = $1 and revision = 2 and mc_percentiles is not null', [projectId]))[0].n).toBe(survey.length - (odd.revision === 2 ? 1 : 0))
    expect(await served()).toEqual(before)
    // run again (another process starting): nothing left to convert, the odd one stays
    expect(await convertStoredDocuments(t.db)).toEqual({ converted: 0, kept: 1 })
  })
})
