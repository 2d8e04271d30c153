import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { Validator } from '@seriousme/openapi-schema-validator'
import { Ajv2020 } from 'ajv/dist/2020.js'
import { PROJECT_ROOT } from '../../server/config.ts'
import { startTestApp, type TestApp } from '../helpers/app.ts'

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
    const FORMATS = new Set(['uuid', 'email', 'date-time'])
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

  it('matches the committed openapi/openapi.json (run `npm run openapi` after changing a route)', () => {
    const committed = JSON.parse(readFileSync(join(PROJECT_ROOT, 'openapi', 'openapi.json'), 'utf8'))
    expect(committed).toEqual(doc)
  })
})
