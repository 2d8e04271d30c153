import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy, seyfert } from '../helpers/fixtures.ts'
import { decodeDiagramColumns, DIAGRAM_COLUMNS_TYPE } from '../../shared/diagram-columns.ts'

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string
let writeKey: string
const count = async () => Number((await t.db.$client.query('select count(*) from galaxies where project_id = $1', [projectId])).rows[0].count)

beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'gal-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'ingest' })).body.id
  writeKey = (await owner.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', owner.csrf).send({ name: 'pipe', projectId, access: 'write' })).body.key
})
afterAll(async () => { await t.close() })

const batch = (body: unknown, key?: string) => {
  const r = request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${writeKey}`)
  return key ? r.set('Idempotency-Key', key).send(body as object) : r.send(body as object)
}

describe('POST /projects/{id}/galaxies/batch', () => {
  it('stores galaxies with results and answers the intake', async () => {
    const res = await batch({ galaxies: [galaxy('LNS-0000001'), seyfert('LNS-0000002')] })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ inserted: 2, updated: 0, revision: 1 })
    expect(res.body.intake).toMatchObject({ kind: 'api', status: 'committed', rowsAccepted: 2 })
    const one = await request(t.app).get(`/api/v1/projects/${projectId}/galaxies/LNS-0000002`).set('Authorization', `Bearer ${writeKey}`)
    expect(one.status).toBe(200)
    expect(one.body.results.classes.nii).toBe('agn')
    expect(one.body.history).toHaveLength(1)
  })

  it('upserts by the pipeline ID', async () => {
    const res = await batch({ galaxies: [galaxy('LNS-0000001', { redshift: 0.06 })] })
    expect(res.body).toMatchObject({ inserted: 0, updated: 1 })
    expect(await count()).toBe(2)
  })

  it('is all or nothing: one bad row stores nothing and names every bad path', async () => {
    const before = await count()
    const bad = galaxy('LNS-0000009', { lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: -3 } } })
    const res = await batch({ galaxies: [galaxy('LNS-0000010'), galaxy('LNS-0000011'), bad, galaxy('LNS-0000010')] })
    expect([res.status, res.type]).toEqual([422, 'application/problem+json'])
    expect(res.body.errors).toContainEqual(expect.objectContaining({ path: '/galaxies/2/lines/hbeta/error' }))
    expect(await count()).toBe(before)
    const dup = await batch({ galaxies: [galaxy('LNS-0000010'), galaxy('LNS-0000010')] })
    expect(dup.body.errors).toContainEqual(expect.objectContaining({ path: '/galaxies/1/id' }))
    expect(await count()).toBe(before)
  })

  it('honours Idempotency-Key: same body → first answer, other body → 409, no duplicates', async () => {
    const body = { galaxies: [galaxy('LNS-0000020'), galaxy('LNS-0000021')] }
    const first = await batch(body, 'night-1')
    const again = await batch(body, 'night-1')
    expect(again.status).toBe(200)
    expect(again.headers['idempotent-replayed']).toBe('true')
    expect(again.body).toEqual(first.body)
    const other = await batch({ galaxies: [galaxy('LNS-0000022')] }, 'night-1')
    expect(other.status).toBe(409)
    const intakes = (await t.db.$client.query("select count(*) from intakes where idempotency_key = 'night-1'")).rows[0].count
    expect(Number(intakes)).toBe(1)
  })

  it('refuses 10,001 galaxies with 413, unknown lines and negative fluxes with 422', async () => {
    const many = Array.from({ length: 10_001 }, (_, i) => ({ id: `X${i}`, lines: {} }))
    expect((await batch({ galaxies: many })).status).toBe(413)
    const unknown = await batch({ galaxies: [galaxy('U1', { lines: { halpha: { flux: 1, error: 1 }, hepsilon: { flux: 1, error: 1 } } })] })
    expect(unknown.status).toBe(422)
    expect(unknown.body.errors).toContainEqual(expect.objectContaining({ path: '/galaxies/0/lines/hepsilon' }))
    const neg = await batch({ galaxies: [galaxy('N1', { lines: { halpha: { flux: -5, error: 1 }, hbeta: { flux: 1, error: 1 } } })] })
    expect(neg.body.errors).toContainEqual(expect.objectContaining({ path: '/galaxies/0/lines/halpha/flux' }))
  })
})

describe('queries', () => {
  it('lists with class filter, sort and cursor pagination', async () => {
    await batch({ galaxies: Array.from({ length: 25 }, (_, i) => (i % 5 === 0 ? seyfert(`P-${String(i).padStart(3, '0')}`) : galaxy(`P-${String(i).padStart(3, '0')}`))) })
    const seen: string[] = []
    let cursor: string | null = null
    do {
      const q: Record<string, string> = { limit: '7', q: 'P-', sort: 'id' }
      if (cursor) q.cursor = cursor
      const res = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies`).query(q)
      expect(res.status).toBe(200)
      expect(res.body.total).toBe(25)
      seen.push(...res.body.items.map((g: { id: string }) => g.id))
      cursor = res.body.nextCursor
    } while (cursor)
    expect(seen).toEqual([...seen].sort())
    expect(new Set(seen).size).toBe(25)
    const agn = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies`).query({ classNii: 'agn', q: 'P-' })
    expect(agn.body.items.map((g: { id: string }) => g.id)).toEqual(['P-000', 'P-005', 'P-010', 'P-015', 'P-020'])
    const desc = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies`).query({ sort: '-niiHa', limit: '3', q: 'P-' })
    expect(desc.body.items[0].classes.nii).toBe('agn')
    const bad = await owner.agent.get(`/api/v1/projects/${projectId}/galaxies`).query({ sort: 'nonsense' })
    expect(bad.status).toBe(422)
    expect(bad.body.errors[0].path).toBe('/sort')
  })

  it('serves columnar diagram data aligned by index', async () => {
    const res = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`)
    expect(res.status).toBe(200)
    const d = res.body
    expect(d.count).toBe(d.ids.length)
    for (const arr of [d.y, d.x.nii, d.x.sii, d.x.oi, d.class.overall, d.class.nii, d.yLimit, d.ewHalpha]) expect(arr).toHaveLength(d.count)
    const i = d.ids.indexOf('P-000')
    expect(d.classNames.nii[d.class.nii[i]]).toBe('agn')
    // plotting precision: ratios are rounded to 10⁻⁴ dex (log10(1.1) = 0.041393 → 0.0414)
    expect(d.x.nii[i]).toBe(0.0414)
    expect(d.x.nii[i]).toBeCloseTo(Math.log10(330 / 300), 4)
  })

  it('serves the same columns in binary when asked by Accept, with its own validator', async () => {
    const json = (await owner.agent.get(`/api/v1/projects/${projectId}/diagram`)).body
    const res = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('Accept', `${DIAGRAM_COLUMNS_TYPE}, application/json;q=0.5`)
      .buffer(true).parse((r, done) => { const chunks: Buffer[] = []; r.on('data', (c: Buffer) => chunks.push(c)); r.on('end', () => done(null, Buffer.concat(chunks))) })
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain(DIAGRAM_COLUMNS_TYPE)
    expect(res.headers.vary).toContain('Accept')
    expect(res.headers.etag).toMatch(/^"b/)
    const body = res.body as Buffer
    const d = decodeDiagramColumns(body.buffer.slice(body.byteOffset, body.byteOffset + body.byteLength) as ArrayBuffer)
    expect(d.count).toBe(json.count)
    expect(d.ids).toEqual(json.ids)
    const i = d.ids.indexOf('P-000')
    // Float32 of the 10⁻⁴-dex value, so equal to 6 decimals
    expect(d.x.nii[i]).toBeCloseTo(json.x.nii[i], 6)
    expect(d.class.nii[i]).toBe(json.class.nii[i])
    for (let k = 0; k < d.count; k++) {
      expect(Number.isNaN(d.y[k])).toBe(json.y[k] === null)
      expect(d.yLimit[k]).toBe(json.yLimit[k])
    }
    const again = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('Accept', DIAGRAM_COLUMNS_TYPE).set('If-None-Match', res.headers.etag)
    expect(again.status).toBe(304)
    // the JSON validator does not revalidate the binary form
    const other = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('Accept', DIAGRAM_COLUMNS_TYPE).set('If-None-Match', `"d${res.headers.etag.slice(2)}`)
    expect(other.status).toBe(200)
  })

  it('revalidates diagram data by ETag, and a new intake changes it', async () => {
    const first = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`)
    const etag = first.headers.etag as string
    expect(etag).toMatch(/^"d/)
    const again = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('If-None-Match', etag)
    expect(again.status).toBe(304)
    await batch({ galaxies: [galaxy('ETAG-1')] })
    const changed = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('If-None-Match', etag)
    expect(changed.status).toBe(200)
    expect(changed.body.ids).toContain('ETAG-1')
    expect(changed.body.count).toBe(first.body.count + 1)
    const gz = await owner.agent.get(`/api/v1/projects/${projectId}/diagram`).set('Accept-Encoding', 'gzip')
    expect(gz.headers['content-encoding']).toBe('gzip')
    expect(gz.body.ids).toEqual(changed.body.ids) // supertest inflates it
  })

  it('answers 404 for another project, as if it did not exist', async () => {
    const other = await signedInAgent(t.app, 'outsider@example.org')
    expect((await other.agent.get(`/api/v1/projects/${projectId}/galaxies`)).status).toBe(404)
    expect((await other.agent.get(`/api/v1/projects/${projectId}/galaxies/LNS-0000001`)).status).toBe(404)
    expect((await other.agent.get('/api/v1/projects/00000000-0000-4000-8000-000000000000')).status).toBe(404)
  })
})
