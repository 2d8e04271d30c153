import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { parse } from 'csv-parse/sync'
import { Ajv2020 } from 'ajv/dist/2020.js'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { DIAGRAM_CLASSES } from '../../shared/vocabulary/classes.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import { RESULT_FIELDS, type ResultField } from '../../shared/results/registry.ts'
import { EXPORT_COLUMNS } from '../../shared/results/export-columns.ts'
import { storedSql } from '../../shared/results/storage.ts'
import { at, rawValue } from '../../shared/results/values.ts'
import { documentReader, type StoredColumns } from '../../server/services/stored-results.ts'
import { exportNumber } from '../../server/services/exports.service.ts'

// Walks the result-field registry (shared/results/registry.ts) against the running app: every field
// is found in the database, in both exports (with unit and UCD), in the list's filters and sort,
// and in the OpenAPI document, whose response schemas the real answers must fit.

let t: TestApp
let owner: Awaited<ReturnType<typeof signedInAgent>>
let projectId: string
let key: string
const q = async <T = Record<string, unknown>>(text: string, params: unknown[] = []) => (await t.db.$client.query(text, params)).rows as T[]
const get = (path: string, query: Record<string, unknown> = {}) =>
  request(t.app).get(`/api/v1/projects/${projectId}${path}`).query(query).set('Authorization', `Bearer ${key}`)
const text = (path: string, query: Record<string, unknown> = {}) =>
  get(path, query).buffer(true).parse((r, cb) => { let s = ''; r.setEncoding('utf8'); r.on('data', (c: string) => { s += c }); r.on('end', () => cb(null, s)) })

// invented survey galaxies (every population, all lines) beside two with known ratios, one of them a limit
const survey = generateLanternSurvey(60, 7).map(({ population: _p, ...g }) => g)
const known = galaxy('REG-KNOWN', { ra: 150.1, dec: 2.2 }) as GalaxyInputDto
const limited = galaxy('REG-LIMIT', { lines: { ...galaxy('x').lines, oiii_5007: { upperLimit: 9 } } }) as GalaxyInputDto
const sent = [...survey, known, limited]

beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'registry-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'registry' })).body.id
  key = (await owner.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', owner.csrf).send({ name: 'pipe', projectId, access: 'write' })).body.key
  const res = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${key}`).send({ galaxies: sent })
  expect(res.status).toBe(200)
})
afterAll(async () => { await t.close() })

/** Each galaxy's stored copy of a field (as float8 for numbers) beside its key, its input and its result. */
async function stored(f: ResultField) {
  const cast = f.stored!.type === 'text' ? '' : '::float8'
  const rows = await q<{ key: string; v: number | string | null; input: GalaxyInputDto } & StoredColumns>(`select g.key, ${storedSql(f)}${cast} as v, g.input,
    r.revision, r.layout, r.measures, r.measures_exact, r.codes, r.mc_percentiles, r.mc_classes, r.result
    from galaxies g join results r on r.galaxy_id = g.id where g.project_id = $1 and r.revision = 1 order by g.id`, [projectId])
  // the document the API serves, rebuilt from the row's typed columns
  const reader = await documentReader(t.db, projectId, [1])
  return rows.map((r) => ({ key: r.key, v: r.v, input: r.input, result: reader.document(r.key, r) }))
}
const FROM_SENT = new Map(sent.map((g) => [g.id, g]))

describe('storage', () => {
  it('every stored field has its column, of its type, in PostgreSQL', async () => {
    const cols = await q<{ table_name: string; column_name: string; data_type: string; is_nullable: string }>(`select table_name, column_name, data_type, is_nullable
      from information_schema.columns where table_schema = 'public' and table_name in ('galaxies', 'results')`)
    for (const f of RESULT_FIELDS.filter((x) => x.stored)) {
      const c = cols.find((x) => x.table_name === f.stored!.table && x.column_name === f.stored!.column)
      expect(c, `${f.key}: ${f.stored!.table}.${f.stored!.column}`).toBeDefined()
      expect(c!.data_type, f.key).toBe(f.stored!.type)
      if (f.stored!.notNull) expect(c!.is_nullable, f.key).toBe('NO')
    }
  })

  it('each stored copy holds the value at the field\'s path in the stored result (or input)', async () => {
    let checked = 0
    for (const f of RESULT_FIELDS.filter((x) => x.stored)) {
      for (const row of await stored(f)) {
        const src = { galaxy: { key: row.key, ...pick(FROM_SENT.get(row.key)!) }, input: row.input, result: row.result }
        const v = rawValue(f, src)
        const where = `${f.key} of ${row.key}`
        if (f.kind === 'class') expect(DIAGRAM_CLASSES[f.diagram!][row.v as number], where).toBe(v ?? 'unclassified')
        else if (f.kind === 'flags') expect(row.v, where).toBe((v as string[]).length)
        else if (f.kind === 'limit') expect([((row.v as number) & f.stored!.bits!.upper) !== 0, ((row.v as number) & f.stored!.bits!.lower) !== 0], where).toEqual([v === 'upper', v === 'lower'])
        else if (f.kind === 'text') expect(row.v, where).toBe(v)
        else if (v === null || v === undefined) expect(row.v, where).toBeNull()
        // a `real` copy: float4 holds about 7 significant digits
        else expect(Math.abs((row.v as number) - (v as number)), where).toBeLessThanOrEqual(Math.abs(v as number) * 1e-6 + 1e-30)
        checked++
      }
    }
    expect(checked).toBeGreaterThan(RESULT_FIELDS.filter((x) => x.stored).length * 60)
  })
})
const pick = (g: GalaxyInputDto) => ({ redshift: g.redshift ?? null, ra: g.ra ?? null, dec: g.dec ?? null, fluxUnit: g.fluxUnit ?? 1 })

describe('exports', () => {
  const exported = RESULT_FIELDS.filter((f) => f.export)

  it('the CSV has every exported field as a column, its unit in the units line, and the values the registry reads', async () => {
    const res = await text('/exports/galaxies.csv')
    expect(res.status).toBe(200)
    const lines = (res.body as string).split('\n')
    const units = lines.find((l) => l.startsWith('# units: '))!
    const records = parse(lines.filter((l) => !l.startsWith('#')).join('\n'), { columns: true, skip_empty_lines: true }) as Array<Record<string, string>>
    expect(Object.keys(records[0])).toEqual(exported.map((f) => f.export!.name))
    for (const f of exported) if (f.unit) expect(units, f.key).toContain(` ${f.export!.name}=${f.unit}`)
    const row = records.find((x) => x.galaxy_id === 'REG-KNOWN')!
    // shared/science/README.md §2.1: log of observed ratios (Baldwin, Phillips & Terlevich 1981, PASP 93, 5)
    // results are stored as float4: about 7 significant digits
    expect(Number(row.niiHa)).toBeCloseTo(Math.log10(60 / 300), 6)
    expect(Number(row.oiiiHb)).toBeCloseTo(Math.log10(50 / 80), 6)
    expect([row.ra, row.dec]).toEqual(['150.1', '2.2'])
    expect(records.find((x) => x.galaxy_id === 'REG-LIMIT')!.oiiiHb_limit).toBe('upper') // README §9: a limit in the numerator
    const detail = (await get('/galaxies/REG-KNOWN')).body
    const g = { key: 'REG-KNOWN', ...pick(known) }
    for (const c of EXPORT_COLUMNS) {
      const v = c.get(g, detail.results)
      expect(row[c.name], c.name).toBe(v === null ? '' : typeof v === 'number' ? exportNumber(v) : String(v))
    }
  })

  it('the VOTable has a FIELD for every exported field, with its unit and UCD', async () => {
    const res = await text('/exports/galaxies.vot')
    expect(res.status).toBe(200)
    const fields = [...(res.body as string).matchAll(/<FIELD name="([^"]+)" ([^>]*)>/g)].map((m) => ({
      name: m[1], unit: /unit="([^"]*)"/.exec(m[2])?.[1] ?? null, ucd: /ucd="([^"]*)"/.exec(m[2])?.[1], datatype: /datatype="([^"]*)"/.exec(m[2])?.[1],
    }))
    expect(fields.map((x) => x.name)).toEqual(exported.map((f) => f.export!.name))
    for (const f of exported) {
      const x = fields.find((y) => y.name === f.export!.name)!
      expect([x.unit, x.ucd, x.datatype], f.key).toEqual([f.unit, f.ucd, f.export!.datatype])
    }
  })
})

describe('list filters and sort', () => {
  it('every range field filters by its stored value', async () => {
    for (const f of RESULT_FIELDS.filter((x) => x.range)) {
      const rows = (await stored(f)).filter((r) => r.v !== null) as Array<{ key: string; v: number }>
      const values = [...new Set(rows.map((r) => r.v))].sort((a, b) => a - b)
      expect(values.length, `${f.key} needs two distinct values in the sample`).toBeGreaterThanOrEqual(2)
      const mid = Math.floor(values.length / 2)
      const cut = (values[mid - 1] + values[mid]) / 2 // no stored value is near the cut
      const above = await get('/galaxies', { range: `${f.key}:${cut}:`, limit: 1000 })
      const below = await get('/galaxies', { range: `${f.key}::${cut}`, limit: 1000 })
      expect(above.status, f.key).toBe(200)
      expect(above.body.items.map((i: { id: string }) => i.id).sort(), f.key).toEqual(rows.filter((r) => r.v > cut).map((r) => r.key).sort())
      expect(below.body.items.map((i: { id: string }) => i.id).sort(), f.key).toEqual(rows.filter((r) => r.v < cut).map((r) => r.key).sort())
    }
  })

  it('every sort field orders by its stored value, nulls last either way', async () => {
    for (const f of RESULT_FIELDS.filter((x) => x.sort)) {
      const value = new Map((await stored(f)).map((r) => [r.key, r.v]))
      for (const desc of [false, true]) {
        const res = await get('/galaxies', { sort: `${desc ? '-' : ''}${f.key}`, limit: 1000 })
        expect(res.status, f.key).toBe(200)
        const seen = res.body.items.map((i: { id: string }) => value.get(i.id)) as Array<number | string | null>
        expect(seen, f.key).toHaveLength(sent.length)
        const firstNull = seen.indexOf(null)
        if (firstNull >= 0) expect(seen.slice(firstNull).every((v) => v === null), `${f.key}: nulls last`).toBe(true)
        const known_ = seen.filter((v) => v !== null)
        const ordered = f.stored!.type === 'text'
          ? (await q<{ key: string }>(`select key from galaxies where project_id = $1 order by key ${desc ? 'desc' : 'asc'}`, [projectId])).map((r) => r.key)
          : [...known_].sort((a, b) => (desc ? (b as number) - (a as number) : (a as number) - (b as number)))
        expect(known_, `${f.key} ${desc ? 'desc' : 'asc'}`).toEqual(ordered)
      }
    }
  })

  it('every class filter keeps the galaxies of the classes asked for', async () => {
    for (const f of RESULT_FIELDS.filter((x) => x.classParam)) {
      const rows = await stored(f)
      const counts = new Map<string, number>()
      for (const r of rows) { const n = DIAGRAM_CLASSES[f.diagram!][r.v as number]; counts.set(n, (counts.get(n) ?? 0) + 1) }
      const [name, n] = [...counts].sort((a, b) => b[1] - a[1])[0]
      const res = await get('/galaxies', { [f.classParam!]: name, limit: 1000 })
      expect([res.status, res.body.total], f.key).toEqual([200, n])
      for (const item of res.body.items) expect(at(item, f.list ?? ['classes', f.diagram!]), f.key).toBe(name)
    }
  })

  it('list items carry every list field with the detail\'s value', async () => {
    const page = (await get('/galaxies', { limit: 1000, q: 'REG-KNOWN' })).body
    const item = page.items[0]
    const detail = (await get('/galaxies/REG-KNOWN')).body
    for (const f of RESULT_FIELDS.filter((x) => x.list)) {
      const want = f.kind === 'flags' ? detail.results.flags.length : f.from === 'galaxy' ? detail[f.key] : at(detail.results, f.path) ?? null
      expect(at(item, f.list!), f.key).toEqual(want)
    }
  })
})

describe('OpenAPI', () => {
  it('describes every list field, and the list, detail, results and overview answers fit their schemas', async () => {
    const doc = (await request(t.app).get('/api/openapi.json')).body
    const summary = doc.components.schemas.GalaxySummary
    for (const f of RESULT_FIELDS.filter((x) => x.list)) {
      let node = summary
      for (const k of f.list!) { expect(node.properties, f.key).toHaveProperty(k); node = node.properties[k] }
    }
    const ajv = new Ajv2020({ strict: false, allErrors: true }).addFormat('uuid', /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i)
    const check = async (docPath: string, path: string) => {
      const res = await get(path)
      expect(res.status, path).toBe(200)
      const schema = doc.paths[`/api/v1/projects/{projectId}${docPath}`].get.responses['200'].content['application/json'].schema
      const validate = ajv.compile({ ...schema, components: doc.components })
      expect(validate(res.body), `${path}: ${JSON.stringify(validate.errors?.slice(0, 3))}`).toBe(true)
    }
    await check('/galaxies', '/galaxies?limit=1000')
    await check('/galaxies/{galaxyId}', '/galaxies/REG-LIMIT')
    await check('/galaxies/{galaxyId}/results/{revision}', '/galaxies/REG-KNOWN/results/1')
    await check('/overview', '/overview')
  })
})
