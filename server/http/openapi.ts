import {
  OpenApiBuilder, type ContentObject, type OpenAPIObject, type OperationObject, type ParameterObject, type ResponseObject, type SchemaObject,
} from 'openapi3-ts/oas31'
import { z } from 'zod'
import type { AnySpec, ResponseSpec } from './route.ts'
import { ProblemSchema } from '../../shared/schemas/api.schema.ts'
import { HealthSchema } from '../routes/health.routes.ts'
import { APP_VERSION } from '../lib/version.ts'

/** The document's tags, in the order the API reference shows them; every route names one. */
export const TAGS = {
  Service: 'Health of the service and this document',
  Accounts: 'Sign-up, sign-in, e-mail verification, password resets and invitations',
  'API keys': 'Keys for pipelines: `Authorization: Bearer <key>`',
  Projects: 'Projects, their overview and audit log',
  Team: 'Members, roles and invitations of a project',
  Galaxies: 'Ingestion by API, galaxies with their results, earlier records',
  Diagrams: 'Columnar data of the diagnostic diagrams',
  Diagnostics: 'Stateless diagnostics: nothing is stored',
  Assumptions: 'The analysis settings of a project, as numbered revisions',
  Jobs: 'Background work (recomputes, large intakes, undos and spectrum fits) and its progress',
  Intake: 'CSV files: upload, mapping, validation, commit and undo',
  Exports: 'Results as CSV or VOTable',
  Spectra: '1-D spectra of a project\'s galaxies: upload, the fit-quality table, one galaxy\'s spectrum with its fit and model',
  'Site admin': 'Accounts and the local mail catcher, for site administrators',
} as const
export type Tag = keyof typeof TAGS

type IO = 'input' | 'output'
const COMPONENTS = '#/components/schemas/'
/** Ids given to the anonymous roots (bodies, parameters, answers) for the conversion; never components. */
const ROOT = '~root'

/** The answer of GET /api/openapi.json, described loosely: it is this document. */
const OpenApiDocumentSchema = z.looseObject({
  openapi: z.literal('3.1.0'), info: z.looseObject({ title: z.string(), version: z.string() }),
  paths: z.record(z.string(), z.looseObject({})), components: z.looseObject({}),
}).meta({ description: 'an OpenAPI 3.1 document' })

type Json = SchemaObject & { $id?: string; $schema?: string }

function refsIn(node: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(node)) for (const v of node) refsIn(v, out)
  else if (node && typeof node === 'object') {
    for (const [k, v] of Object.entries(node)) {
      if (k === '$ref' && typeof v === 'string') out.add(v.slice(COMPONENTS.length))
      else refsIn(v, out)
    }
  }
  return out
}

/**
 * zod → JSON Schema 2020-12 (what OpenAPI 3.1 uses) for a whole document at once, with zod's own
 * registry conversion: schemas named with `.meta({ id })` become components/schemas and are
 * referenced by name (`uri`); anonymous roots stay inline. A named schema whose request form
 * differs from its answer form (defaults make fields optional) and that is used in both gets two
 * components: `Name` for answers, `NameInput` for requests.
 */
function convert(roots: Record<IO, Set<z.ZodType>>) {
  const named = new Map(z.globalRegistry._idmap)
  const rootIds = new Map<z.ZodType, string>()
  for (const io of ['input', 'output'] as const) {
    for (const s of roots[io]) if (!z.globalRegistry.get(s)?.id && !rootIds.has(s)) rootIds.set(s, `${ROOT}${rootIds.size}`)
  }
  const run = (io: IO, name: (id: string) => string): Record<string, Json> => {
    const registry = z.registry<{ id: string }>()
    for (const [id, s] of named) registry.add(s, { id })
    for (const s of roots[io]) { const id = rootIds.get(s); if (id) registry.add(s, { id }) }
    const { schemas } = z.toJSONSchema(registry, { target: 'draft-2020-12', io, unrepresentable: 'any', uri: (id) => COMPONENTS + name(id) })
    const out: Record<string, Json> = {}
    for (const [id, { $id: _id, $schema: _s, ...body }] of Object.entries(schemas as Record<string, Json>)) out[id] = body
    return out
  }
  const idOf = (s: z.ZodType) => z.globalRegistry.get(s)?.id ?? rootIds.get(s)!

  // first pass, every schema under its own id: which named schemas each side reaches, and which differ
  const first = { input: run('input', (id) => id), output: run('output', (id) => id) }
  const reached = { input: new Set<string>(), output: new Set<string>() }
  for (const io of ['input', 'output'] as const) {
    const todo = [...roots[io]].map(idOf)
    for (const id of todo) if (named.has(id)) reached[io].add(id)
    while (todo.length) {
      const id = todo.pop()!
      for (const ref of refsIn(first[io][id])) {
        if (ref.startsWith(ROOT)) throw new Error(`an unnamed schema is both a whole body and part of another one: give it .meta({ id })`)
        if (!reached[io].has(ref)) { reached[io].add(ref); todo.push(ref) }
      }
    }
  }
  const differs = new Set([...named.keys()].filter((id) => JSON.stringify(first.input[id]) !== JSON.stringify(first.output[id])))
  // a schema that holds one whose two forms differ refers to other components in each form
  for (let grew = true; grew;) {
    grew = false
    for (const id of named.keys()) {
      if (differs.has(id)) continue
      if ([...refsIn(first.input[id]), ...refsIn(first.output[id])].some((r) => differs.has(r))) { differs.add(id); grew = true }
    }
  }
  const split = new Set([...differs].filter((id) => reached.input.has(id) && reached.output.has(id)))
  const nameOf = (id: string, io: IO) => (io === 'input' && split.has(id) ? `${id}Input` : id)
  for (const id of split) if (named.has(`${id}Input`)) throw new Error(`schema ${id} needs a request form named ${id}Input, which is taken`)

  const final = { input: run('input', (id) => nameOf(id, 'input')), output: run('output', (id) => nameOf(id, 'output')) }
  const components: Record<string, SchemaObject> = {}
  for (const io of ['input', 'output'] as const) {
    for (const id of reached[io]) {
      const name = nameOf(id, io)
      if (components[name] && JSON.stringify(components[name]) !== JSON.stringify(final[io][id])) throw new Error(`component ${name} has two forms`)
      components[name] = final[io][id]
    }
  }
  return {
    /** The schema of a root: a reference when it is named, else the schema itself. */
    schema(s: z.ZodType, io: IO): SchemaObject {
      const id = z.globalRegistry.get(s)?.id
      return id ? { $ref: COMPONENTS + nameOf(id, io) } : final[io][rootIds.get(s)!]
    },
    /** The object schema behind a root (for path and query parameters). */
    object(s: z.ZodType, io: IO): SchemaObject {
      const id = z.globalRegistry.get(s)?.id
      return id ? final[io][id] : final[io][rootIds.get(s)!]
    },
    components: Object.fromEntries(Object.entries(components).sort(([a], [b]) => a.localeCompare(b))),
  }
}

/** Express `:name` → OpenAPI `{name}`. */
export const openapiPath = (p: string) => '/api/v1' + p.replace(/:([A-Za-z]+)/g, '{$1}')

/** Text media types are documented as strings, anything else as binary. */
const bodyText = (type: string): SchemaObject => (/^text\/|[+/]xml$|[+/]json$/.test(type) ? { type: 'string' } : { type: 'string', format: 'binary' })

function content(spec: ResponseSpec, schema: (s: z.ZodType) => SchemaObject): ContentObject | undefined {
  const out: ContentObject = {}
  if (spec.schema) out[spec.contentType ?? 'application/json'] = { schema: schema(spec.schema), ...(spec.example !== undefined ? { example: spec.example } : {}) }
  else if (spec.contentType) out[spec.contentType] = { schema: bodyText(spec.contentType) }
  for (const alt of spec.alternatives ?? []) out[alt.contentType] = { schema: { type: 'string', format: 'binary', description: alt.description } }
  return Object.keys(out).length ? out : undefined
}

const PROBLEMS = [
  ['400', 'malformed request'], ['401', 'no or invalid credentials'], ['403', 'role or key scope forbids it'], ['404', 'unknown, or not yours'],
  ['422', 'invalid values (field paths in errors)'], ['429', 'rate limited (Retry-After)'],
] as const

/** The OpenAPI 3.1 document of one app's routes, built from the same zod schemas that validate. */
export function buildOpenApi(specs: readonly AnySpec[]): OpenAPIObject {
  const roots = { input: new Set<z.ZodType>(), output: new Set<z.ZodType>([ProblemSchema, HealthSchema, OpenApiDocumentSchema]) }
  for (const r of specs) {
    for (const s of [r.params, r.query, r.body]) if (s) roots.input.add(s)
    for (const res of Object.values(r.responses)) if (res.schema) roots.output.add(res.schema)
  }
  const js = convert(roots)
  const answer = (s: z.ZodType) => js.schema(s, 'output')

  const b = OpenApiBuilder.create({
    openapi: '3.1.0',
    info: {
      title: 'Ratiograph API', version: APP_VERSION,
      description: 'Emission-line diagnostics of galaxy nuclei. Errors are RFC 9457 problem documents with JSON-Pointer field paths. Pipelines authenticate with `Authorization: Bearer <api key>`; the dashboard uses the session cookie and echoes the `rg_csrf` cookie in `X-CSRF-Token` on changes.',
    },
    paths: {},
  })
  for (const [name, description] of Object.entries(TAGS)) b.addTag({ name, description })
  b.addSecurityScheme('apiKey', { type: 'http', scheme: 'bearer', description: 'an API key from the dashboard (rg_…)' })
  b.addSecurityScheme('session', { type: 'apiKey', in: 'cookie', name: 'rg_session' })
  const health = { 'application/json': { schema: answer(HealthSchema) } }
  b.addPath('/api/health', { get: { operationId: 'getHealth', summary: 'Health of the service and its database', tags: ['Service'], security: [], responses: {
    200: { description: 'up', content: health }, 503: { description: 'the database is unreachable (Retry-After)', content: health } } } })
  b.addPath('/api/openapi.json', { get: { operationId: 'getOpenApiDocument', summary: 'This document', tags: ['Service'], security: [], responses: {
    200: { description: 'OpenAPI 3.1', content: { 'application/json': { schema: answer(OpenApiDocumentSchema) } } } } } })

  const problem = { content: { 'application/problem+json': { schema: answer(ProblemSchema) } } }
  const paths: Record<string, Record<string, OperationObject>> = {}
  for (const r of specs) {
    const parameters: ParameterObject[] = []
    const addParams = (schema: z.ZodType | undefined, where: 'path' | 'query') => {
      if (!schema) return
      const obj = js.object(schema, 'input')
      const required = new Set(obj.required ?? [])
      for (const [name, prop] of Object.entries(obj.properties ?? {}) as Array<[string, SchemaObject]>) {
        parameters.push({ name, in: where, required: where === 'path' || required.has(name), schema: prop, ...(prop.description ? { description: prop.description } : {}) })
      }
    }
    addParams(r.params, 'path')
    addParams(r.query, 'query')
    for (const h of r.headers ?? []) parameters.push({ name: h.name, in: 'header', required: !!h.required, description: h.description, schema: { type: 'string' } })
    const responses: Record<string, ResponseObject> = {}
    for (const [status, spec] of Object.entries(r.responses)) {
      const c = content(spec, answer)
      responses[status] = { description: spec.description, ...(c ? { content: c } : {}) }
    }
    for (const [s, d] of PROBLEMS) {
      if (r.access === 'public' && (s === '401' || s === '403')) continue
      responses[s] ??= { description: d, ...problem }
    }
    const op: OperationObject = {
      operationId: r.operationId, summary: r.summary, tags: [r.tag],
      ...(r.description ? { description: r.description } : {}),
      parameters,
      security: r.access === 'public' ? [] : r.access === 'optional' ? [{}, { apiKey: [] }, { session: [] }] : [{ apiKey: [] }, { session: [] }],
      'x-access': r.access,
      ...(r.body ? { requestBody: { required: true, content: { [r.bodyContentType ?? 'application/json']: {
        schema: js.schema(r.body, 'input'), ...(r.bodyExample ? { example: r.bodyExample } : {}) } } } } : {}),
      responses,
    }
    ;(paths[openapiPath(r.path)] ??= {})[r.method] = op
  }
  for (const [p, ops] of Object.entries(paths)) b.addPath(p, ops)
  for (const [name, schema] of Object.entries(js.components)) b.addSchema(name, schema)
  return b.getSpec()
}
