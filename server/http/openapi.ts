import { OpenApiBuilder, type OperationObject, type ParameterObject, type SchemaObject } from 'openapi3-ts/oas31'
import { z } from 'zod'
import { ROUTES } from './route.ts'
import { ProblemSchema } from '../../shared/schemas/api.schema.ts'
import { APP_VERSION } from '../lib/version.ts'

/** Named schemas (zod `.meta({ id })`) collected for components/schemas while the document is built. */
let components: Record<string, SchemaObject> = {}

/**
 * zod → JSON Schema 2020-12 (what OpenAPI 3.1 uses). Named sub-schemas land in components/schemas;
 * an input variant that differs from the output one (defaults make fields optional) gets "Input".
 */
function toSchema(s: z.ZodType, io: 'input' | 'output'): SchemaObject & { $schema?: string } {
  const js = z.toJSONSchema(s, { target: 'draft-2020-12', io, unrepresentable: 'any', reused: 'inline' }) as SchemaObject & { $defs?: Record<string, SchemaObject> }
  const defs = js.$defs ?? {}
  delete js.$defs
  const names: Record<string, string> = {}
  for (const [id, def] of Object.entries(defs)) {
    const text = JSON.stringify(def)
    names[id] = components[id] === undefined || JSON.stringify(components[id]) === text ? id
      : io === 'input' ? `${id}Input` : `${id}Output`
  }
  const rename = (v: unknown) => JSON.parse(JSON.stringify(v).replace(/"#\/\$defs\/([^"]+)"/g, (_m, id: string) => `"#/components/schemas/${names[id] ?? id}"`))
  for (const [id, def] of Object.entries(defs)) components[names[id]] = rename(def)
  return rename(js)
}

function clean(s: SchemaObject & { $schema?: string }): SchemaObject {
  const { $schema: _drop, ...rest } = s
  return rest
}

/** Express `:name` → OpenAPI `{name}`. */
export const openapiPath = (p: string) => '/api/v1' + p.replace(/:([A-Za-z]+)/g, '{$1}')

/** The OpenAPI 3.1 document of every registered route, built from the same zod schemas that validate. */
export function buildOpenApi() {
  components = {}
  const b = OpenApiBuilder.create({
    openapi: '3.1.0',
    info: {
      title: 'Ratiograph API', version: APP_VERSION,
      description: 'Emission-line diagnostics of galaxy nuclei. Errors are RFC 9457 problem documents with JSON-Pointer field paths. Pipelines authenticate with `Authorization: Bearer <api key>`; the dashboard uses the session cookie and echoes the `rg_csrf` cookie in `X-CSRF-Token` on changes.',
    },
    paths: {},
  })
  b.addSecurityScheme('apiKey', { type: 'http', scheme: 'bearer', description: 'an API key from the dashboard (rg_…)' })
  b.addSecurityScheme('session', { type: 'apiKey', in: 'cookie', name: 'rg_session' })
  b.addSchema('Problem', clean(toSchema(ProblemSchema, 'output')))
  b.addPath('/api/health', { get: { summary: 'Health of the service and its database', tags: ['Service'], responses: {
    200: { description: 'up', content: { 'application/json': { schema: { type: 'object', properties: { status: { type: 'string' }, db: { type: 'string' }, version: { type: 'string' } } } } } },
    503: { description: 'the database is unreachable' } } } })
  b.addPath('/api/openapi.json', { get: { summary: 'This document', tags: ['Service'], responses: { 200: { description: 'OpenAPI 3.1' } } } })

  const paths: Record<string, Record<string, OperationObject>> = {}
  for (const r of ROUTES) {
    const parameters: ParameterObject[] = []
    const addParams = (schema: z.ZodType | undefined, where: 'path' | 'query') => {
      if (!schema) return
      const js = toSchema(schema, 'input') as SchemaObject
      const req = new Set(js.required ?? [])
      for (const [name, prop] of Object.entries(js.properties ?? {})) {
        parameters.push({ name, in: where, required: where === 'path' || req.has(name), schema: prop as SchemaObject,
          ...((prop as SchemaObject).description ? { description: (prop as SchemaObject).description } : {}) })
      }
    }
    addParams(r.params, 'path')
    addParams(r.query, 'query')
    for (const h of r.headers ?? []) parameters.push({ name: h.name, in: 'header', required: !!h.required, description: h.description, schema: { type: 'string' } })
    const op: OperationObject = {
      summary: r.summary, tags: [r.tag], operationId: `${r.method}${r.path.replace(/[/:{}-]+(\w)?/g, (_m, c: string | undefined) => (c ? c.toUpperCase() : ''))}`,
      ...(r.description ? { description: r.description } : {}),
      parameters,
      security: r.access === 'public' ? [] : r.access === 'optional' ? [{}, { apiKey: [] }, { session: [] }] : [{ apiKey: [] }, { session: [] }],
      'x-access': r.access,
      responses: {},
    }
    if (r.body) {
      const schema = clean(toSchema(r.body, 'input'))
      op.requestBody = { required: true, content: { [r.bodyContentType ?? 'application/json']: { schema, ...(r.bodyExample ? { example: r.bodyExample } : {}) } } }
    }
    for (const [status, spec] of Object.entries(r.responses)) {
      op.responses![status] = {
        description: spec.description,
        ...(spec.schema ? { content: { [spec.contentType ?? 'application/json']: { schema: clean(toSchema(spec.schema, 'output')), ...(spec.example ? { example: spec.example } : {}) } } }
          : spec.contentType ? { content: { [spec.contentType]: { schema: { type: 'string' } } } } : {}),
      }
      if (spec.alternatives?.length) {
        const content = (op.responses![status] as { content?: Record<string, unknown> }).content ?? { 'application/json': {} }
        for (const alt of spec.alternatives) content[alt.contentType] = { schema: { type: 'string', format: 'binary', description: alt.description } }
        ;(op.responses![status] as { content?: Record<string, unknown> }).content = content
      }
    }
    const problem = { content: { 'application/problem+json': { schema: { $ref: '#/components/schemas/Problem' } } } }
    for (const [s, d] of [['400', 'malformed request'], ['401', 'no or invalid credentials'], ['403', 'role or key scope forbids it'], ['404', 'unknown, or not yours'], ['422', 'invalid values (field paths in errors)'], ['429', 'rate limited (Retry-After)']] as const) {
      if (r.access === 'public' && (s === '401' || s === '403')) continue
      op.responses![s] ??= { description: d, ...problem }
    }
    const p = openapiPath(r.path)
    ;(paths[p] ??= {})[r.method] = op
  }
  for (const [p, ops] of Object.entries(paths)) b.addPath(p, ops)
  for (const [name, schema] of Object.entries(components)) { if (name !== 'Problem') b.addSchema(name, schema) }
  return b.getSpec()
}
