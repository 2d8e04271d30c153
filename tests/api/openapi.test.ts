import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { Validator } from '@seriousme/openapi-schema-validator'
import { Ajv2020 } from 'ajv/dist/2020.js'
import { PROJECT_ROOT } from '../../server/config.ts'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy, seyfert } from '../helpers/fixtures.ts'
import { STAR_FORMING, syntheticCsv } from '../helpers/spectra.ts'

let t: TestApp
let doc: any // eslint-disable-line @typescript-eslint/no-explicit-any
beforeAll(async () => { t = await startTestApp(); doc = (await request(t.app).get('/api/openapi.json')).body })
afterAll(async () => { await t.close() })

/** Every (method, path) mounted on the Express app, found by walking its router stacks. */
function expressRoutes(app: TestApp['app']): string[] {
  const out: string[] = []
  const walk = (stack: any[]) => { // eslint-disable-line @typescript-eslint/no-explicit-any
    for (const layer of stack) {
      if (layer.route) for (const m of Object.keys(layer.route.methods)) out.push(`${m} ${layer.route.path}`)
      else if (layer.handle?.stack) walk(layer.handle.stack)
    }
  }
  walk((app as any).router.stack) // eslint-disable-line @typescript-eslint/no-explicit-any
  return out.filter((r) => !r.includes('{*splat}'))
}

/** Answers allowed to lack a schema for now (none: the galaxy list, detail and overview have theirs from shared/results/). */
const PENDING = new Set<string>([])

function operations(): Array<[string, string, any]> { // eslint-disable-line @typescript-eslint/no-explicit-any
  return Object.entries(doc.paths).flatMap(([p, ops]) => Object.entries(ops as Record<string, unknown>).map(([m, o]) => [p, m, o] as [string, string, any])) // eslint-disable-line @typescript-eslint/no-explicit-any
}
const op = (method: string, path: string) => doc.paths[path][method]

describe('OpenAPI document', () => {
  it('is a valid OpenAPI 3.1 document', async () => {
    expect(doc.openapi).toBe('3.1.0')
    const result = await new Validator().validate(doc)
    expect(result.errors ?? []).toEqual([])
    expect(result.valid).toBe(true)
  })

  it('documents every Express route', () => {
    const documented = new Set(Object.entries(doc.paths).flatMap(([p, ops]) => Object.keys(ops as object).map((m) => `${m} ${p}`)))
    const mounted = expressRoutes(t.app).map((r) => {
      const [m, p] = r.split(' ')
      const full = p === '/health' || p === '/openapi.json' ? `/api${p}` : `/api/v1${p}`
      return `${m} ${full.replace(/:([A-Za-z]+)/g, '{$1}')}`
    })
    expect(mounted.length).toBeGreaterThan(40)
    for (const r of mounted) expect(documented, r).toContain(r)
  })

  it('every documented example validates against its schema', () => {
    const ajv = new Ajv2020({ strict: false, allErrors: true })
    let examples = 0
    for (const [p, ops] of Object.entries(doc.paths)) {
      for (const [m, op] of Object.entries(ops as Record<string, any>)) { // eslint-disable-line @typescript-eslint/no-explicit-any
        for (const media of Object.values(op.requestBody?.content ?? {}) as any[]) { // eslint-disable-line @typescript-eslint/no-explicit-any
          if (media.example === undefined) continue
          examples++
          const validate = ajv.compile({ ...media.schema, components: doc.components }) // refs point into components
          expect(validate(media.example), `${m} ${p}: ${JSON.stringify(validate.errors)}`).toBe(true)
        }
      }
    }
    expect(examples).toBeGreaterThanOrEqual(3)
  })

  it('every text a request carries (path, query, body) refuses control characters, and says so in a pattern', () => {
    // passwords are hashed and never shown or stored as text, so any character is theirs to use
    const EXEMPT = new Set(['password'])
    // uploaded files (format binary) are bytes, read by their own readers, not text
    const FORMATS = new Set(['uuid', 'email', 'date-time', 'binary'])
    const unguarded: string[] = []
    let strings = 0
    const walk = (node: any, where: string, seen: Set<string>) => { // eslint-disable-line @typescript-eslint/no-explicit-any
      if (!node || typeof node !== 'object') return
      if (typeof node.$ref === 'string') {
        const name = node.$ref.replace('#/components/schemas/', '')
        if (!seen.has(name)) walk(doc.components.schemas[name], where, new Set([...seen, name]))
        return
      }
      const types = ([] as string[]).concat(node.type ?? [])
      if (types.includes('string') && node.enum === undefined && node.const === undefined && !FORMATS.has(node.format)) {
        strings++
        const pattern = node.pattern === undefined ? null : new RegExp(node.pattern, 'u')
        if (!pattern || pattern.test('a\u0000b') || pattern.test('a\u001bb') || pattern.test('a\u0085b')) unguarded.push(where)
      }
      for (const [k, v] of Object.entries(node.properties ?? {})) if (!EXEMPT.has(k)) walk(v, `${where}/${k}`, seen)
      for (const key of ['items', 'additionalProperties', 'not'] as const) walk(node[key], `${where}/${key}`, seen)
      for (const key of ['anyOf', 'oneOf', 'allOf', 'prefixItems'] as const) for (const [i, v] of (node[key] ?? []).entries()) walk(v, `${where}/${key}/${i}`, seen)
    }
    for (const [p, ops] of Object.entries(doc.paths)) {
      for (const [m, op] of Object.entries(ops as Record<string, any>)) { // eslint-disable-line @typescript-eslint/no-explicit-any
        for (const param of op.parameters ?? []) if (param.in !== 'header') walk(param.schema, `${m} ${p} ${param.in} ${param.name}`, new Set())
        for (const [type, media] of Object.entries(op.requestBody?.content ?? {}) as Array<[string, any]>) walk(media.schema, `${m} ${p} body (${type})`, new Set()) // eslint-disable-line @typescript-eslint/no-explicit-any
      }
    }
    expect(strings).toBeGreaterThan(20)
    expect(unguarded).toEqual([])
  })

  it('every operation has a camelCase operationId of its own and one declared tag; every declared tag is used', () => {
    const declared = (doc.tags as Array<{ name: string; description: string }>).map((t) => t.name)
    expect(new Set(declared).size).toBe(declared.length)
    for (const t of doc.tags) expect(t.description, t.name).toMatch(/\S/)
    const ids: string[] = [], used = new Set<string>()
    for (const [p, m, op] of operations()) {
      expect(op.operationId, `${m} ${p}`).toMatch(/^[a-z][a-zA-Z0-9]*$/)
      ids.push(op.operationId)
      expect(op.tags, `${m} ${p}`).toHaveLength(1)
      expect(declared, `${m} ${p} tag`).toContain(op.tags[0])
      used.add(op.tags[0])
    }
    expect(ids.filter((id, i) => ids.indexOf(id) !== i), 'repeated operationIds').toEqual([])
    expect(declared.filter((t) => !used.has(t)), 'declared tags no operation uses').toEqual([])
    // the ones client code is most likely to call, as the reader expects them
    expect(op('get', '/api/v1/projects/{projectId}/galaxies').operationId).toBe('listGalaxies')
    expect(op('get', '/api/v1/projects/{projectId}/exports/galaxies.csv').operationId).toBe('exportGalaxiesCsv')
    expect(op('get', '/api/v1/projects/{projectId}/jobs/{jobId}').tags).toEqual(['Jobs'])
  })

  it('every 2xx answer but 204 has content with a schema; binary and text media types are strings', () => {
    const missing: string[] = []
    for (const [p, m, o] of operations()) {
      for (const [status, res] of Object.entries(o.responses as Record<string, any>)) { // eslint-disable-line @typescript-eslint/no-explicit-any
        if (!/^2/.test(status)) continue
        if (status === '204') { expect(res.content, `${m} ${p} 204`).toBeUndefined(); continue }
        const media = Object.entries(res.content ?? {}) as Array<[string, any]> // eslint-disable-line @typescript-eslint/no-explicit-any
        if (!media.length || media.some(([, c]) => !c.schema || Object.keys(c.schema).length === 0)) missing.push(o.operationId)
        for (const [type, c] of media) {
          if (type.endsWith('json')) continue
          expect(c.schema?.type, `${m} ${p} ${type}`).toBe('string')
          if (!type.startsWith('text/') && !type.endsWith('+xml')) expect(c.schema.format, `${m} ${p} ${type}`).toBe('binary')
        }
      }
    }
    expect(missing.filter((id) => !PENDING.has(id))).toEqual([])
    // once they have schemas, take them off PENDING
    expect([...PENDING].filter((id) => !missing.includes(id)), 'PENDING entries that have a schema now').toEqual([])
    expect(op('get', '/api/v1/projects/{projectId}/exports/galaxies.vot').responses['200'].content).toHaveProperty('application/x-votable+xml')
  })

  it('no answer schema leaves a field as "anything", and every $ref resolves', () => {
    const vague: string[] = []
    const walk = (node: any, where: string, seen: Set<string>) => { // eslint-disable-line @typescript-eslint/no-explicit-any
      if (!node || typeof node !== 'object') return
      if (typeof node.$ref === 'string') {
        const name = node.$ref.replace('#/components/schemas/', '')
        expect(doc.components.schemas, `${where} → ${node.$ref}`).toHaveProperty([name])
        if (!seen.has(name)) walk(doc.components.schemas[name], `${where} → ${name}`, new Set([...seen, name]))
        return
      }
      if (Object.keys(node).filter((k) => k !== 'description').length === 0) vague.push(where)
      for (const [k, v] of Object.entries(node.properties ?? {})) walk(v, `${where}/${k}`, seen)
      // a record's values (additionalProperties) may be free-form: audit details, the document itself
      for (const key of ['items', 'not'] as const) walk(node[key], `${where}/${key}`, seen)
      for (const key of ['anyOf', 'oneOf', 'allOf', 'prefixItems'] as const) for (const [i, v] of (node[key] ?? []).entries()) walk(v, `${where}/${key}/${i}`, seen)
    }
    for (const [p, m, o] of operations()) {
      for (const [status, res] of Object.entries(o.responses as Record<string, any>)) { // eslint-disable-line @typescript-eslint/no-explicit-any
        for (const [type, c] of Object.entries(res.content ?? {}) as Array<[string, any]>) walk(c.schema, `${m} ${p} ${status} ${type}`, new Set()) // eslint-disable-line @typescript-eslint/no-explicit-any
      }
    }
    expect(vague).toEqual([])
  })

  it('component names are the schemas\' own names: no conversion artefacts, none unused', () => {
    const names = Object.keys(doc.components.schemas)
    expect(names.filter((n) => !/^[A-Z][A-Za-z0-9]*$/.test(n) || /InputInput$|Output$/.test(n))).toEqual([])
    const text = JSON.stringify({ paths: doc.paths, schemas: doc.components.schemas })
    expect(names.filter((n) => !text.includes(`"#/components/schemas/${n}"`))).toEqual([])
    // a schema whose request form differs (defaults make fields optional) has both, the answer form plain
    expect(doc.components.schemas.Settings.required).toContain('rv')
    expect(doc.components.schemas.SettingsInput.required ?? []).not.toContain('rv')
    expect(op('post', '/api/v1/diagnostics').requestBody.content['application/json'].schema).toEqual({ $ref: '#/components/schemas/DiagnosticsRequest' })
    expect(doc.components.schemas.DiagnosticsRequest.properties.settings).toMatchObject({ $ref: '#/components/schemas/SettingsInput' })
  })

  it('real answers match their documented schemas', async () => {
    const ajv = new Ajv2020({ strict: false, allErrors: true }).addFormat('uuid', /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i)
    const check = (method: string, path: string, res: { status: number; body: unknown }) => {
      const media = op(method, path).responses[String(res.status)]?.content?.['application/json']
      expect(media, `${method} ${path} ${res.status}`).toBeDefined()
      const validate = ajv.compile({ ...media.schema, components: doc.components })
      expect(validate(res.body), `${method} ${path}: ${JSON.stringify(validate.errors)}`).toBe(true)
    }
    const o = await signedInAgent(t.app, 'openapi-owner@example.org')
    const send = (r: ReturnType<typeof o.agent.post>) => r.set('X-CSRF-Token', o.csrf)
    const V1 = '/api/v1/projects/{projectId}'
    const project = await send(o.agent.post('/api/v1/projects')).send({ name: 'documented answers' })
    check('post', '/api/v1/projects', project)
    const url = `/api/v1/projects/${project.body.id}`
    const batch = await send(o.agent.post(`${url}/galaxies/batch`)).send({ galaxies: [galaxy('D-1'), seyfert('D-2'), galaxy('D-3', { lines: { halpha: { flux: 300, error: 6 }, hbeta: { upperLimit: 9 } } })] })
    check('post', `${V1}/galaxies/batch`, batch)
    const results = await o.agent.get(`${url}/galaxies/D-2/results/1`)
    expect(results.body).toMatchObject({ revision: 1, results: { id: 'D-2' } })
    check('get', `${V1}/galaxies/{galaxyId}/results/{revision}`, results)
    check('get', `${V1}/galaxies`, await o.agent.get(`${url}/galaxies`))
    check('get', `${V1}/galaxies/{galaxyId}`, await o.agent.get(`${url}/galaxies/D-3`))
    check('get', `${V1}/overview`, await o.agent.get(`${url}/overview`))
    const diagram = await o.agent.get(`${url}/diagram`).set('Accept', 'application/json')
    expect(diagram.body.count).toBe(3)
    check('get', `${V1}/diagram`, diagram)
    const change = await send(o.agent.put(`${url}/assumptions`)).send({ settings: { extinctionLaw: 'calzetti00' }, note: 'dusty' })
    expect(change.body.revision.settings.rv).toBe(4.05) // R′_V = 4.05, the default of Calzetti et al. 2000, ApJ 533, 682 (shared/science/README.md §1.3)
    check('put', `${V1}/assumptions`, change)
    check('get', `${V1}/jobs/{jobId}`, await o.agent.get(`${url}/jobs/${change.body.job.id}`))
    check('get', `${V1}/jobs`, await o.agent.get(`${url}/jobs`))
    check('get', `${V1}/assumptions`, await o.agent.get(`${url}/assumptions`))
    check('get', `${V1}/intakes/{intakeId}`, await o.agent.get(`${url}/intakes/${batch.body.intake.id}`))
    check('get', `${V1}/intakes`, await o.agent.get(`${url}/intakes`))
    check('get', `${V1}/audit`, await o.agent.get(`${url}/audit`))
    const again = await send(o.agent.post(`${url}/galaxies/batch`)).send({ galaxies: [galaxy('D-1', { redshift: 0.06 })] })
    check('get', `${V1}/galaxies/{galaxyId}/versions`, await o.agent.get(`${url}/galaxies/D-1/versions`))
    check('post', `${V1}/intakes/{intakeId}/undo`, await send(o.agent.post(`${url}/intakes/${again.body.intake.id}/undo`)))
    const csv = Buffer.from('# a comment\nid,z,halpha_flux,halpha_err,hbeta_flux,hbeta_err\nC-1,0.05,300,6,80,3\nC-2,0.06,280,7,70,3\n')
    const upload = () => send(o.agent.post(`${url}/intakes/csv`)).attach('file', csv, { filename: 'two.csv', contentType: 'text/csv' })
    const staged = await upload()
    check('post', `${V1}/intakes/csv`, staged)
    const options = { mapping: staged.body.suggestedMapping, saveMappingAs: 'two' }
    check('post', `${V1}/intakes/{intakeId}/validate`, await send(o.agent.post(`${url}/intakes/${staged.body.intake.id}/validate`)).send(options))
    const committed = await send(o.agent.post(`${url}/intakes/${staged.body.intake.id}/commit`)).send(options)
    expect(committed.body).toMatchObject({ inserted: 2 })
    check('post', `${V1}/intakes/{intakeId}/commit`, committed)
    const csvIntake = await o.agent.get(`${url}/intakes/${staged.body.intake.id}`)
    expect(csvIntake.body.report).toMatchObject({ inserted: 2, onExisting: 'skip' })
    check('get', `${V1}/intakes/{intakeId}`, csvIntake)
    const again2 = await upload()
    expect(again2.body.savedMappings.map((m: { name: string }) => m.name)).toEqual(['two'])
    check('post', `${V1}/intakes/csv`, again2)
    // a spectrum: the upload (202), the fit-quality table, the galaxy's spectrum with its fit, a trial refit, the jobs and overview with a fit
    const spectrum = await send(o.agent.post(`${url}/spectra`)).field('defaults', JSON.stringify({ redshift: 0.02 }))
      .attach('files', Buffer.from(syntheticCsv({ redshift: 0.02, lines: STAR_FORMING })), { filename: 'S-1.csv' })
    check('post', `${V1}/spectra`, spectrum)
    for (let i = 0; i < 500 && (await o.agent.get(`${url}/jobs/${spectrum.body.job.id}`)).body.status !== 'done'; i++) await new Promise((ok) => setTimeout(ok, 20))
    check('get', `${V1}/spectra`, await o.agent.get(`${url}/spectra`))
    const fitted = await o.agent.get(`${url}/galaxies/S-1/spectrum`)
    expect(fitted.body.fit.revision).toBeGreaterThan(0)
    check('get', `${V1}/galaxies/{galaxyId}/spectrum`, fitted)
    check('post', `${V1}/galaxies/{galaxyId}/spectrum/fit`, await send(o.agent.post(`${url}/galaxies/S-1/spectrum/fit`)).send({ fit: { broadHalpha: 'off' } }))
    check('get', `${V1}/galaxies/{galaxyId}`, await o.agent.get(`${url}/galaxies/S-1`))
    check('get', `${V1}/overview`, await o.agent.get(`${url}/overview`))
    check('get', `${V1}/jobs/{jobId}`, await o.agent.get(`${url}/jobs/${spectrum.body.job.id}`))
    check('get', '/api/v1/me', await o.agent.get('/api/v1/me'))
    check('get', '/api/v1/admin/users', await o.agent.get('/api/v1/admin/users'))
    check('get', '/api/v1/admin/outbox', await o.agent.get('/api/v1/admin/outbox'))
    const diagnostics = await request(t.app).post('/api/v1/diagnostics').send({ settings: { monteCarlo: { draws: 20 } }, galaxies: [galaxy('A-1')] })
    check('post', '/api/v1/diagnostics', diagnostics)
    check('post', '/api/v1/auth/password-reset', await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'nobody@example.org' }))
    check('get', '/api/health', await request(t.app).get('/api/health'))
  })

  it('matches the committed openapi/openapi.json (run `npm run openapi` after changing a route)', () => {
    const committed = JSON.parse(readFileSync(join(PROJECT_ROOT, 'openapi', 'openapi.json'), 'utf8'))
    expect(committed).toEqual(doc)
  })
})
