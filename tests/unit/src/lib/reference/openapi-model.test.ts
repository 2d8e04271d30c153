import { describe, expect, it } from 'vitest'
import { children, groupByTag, readOperations, typeText, type Schema } from '../../../../../src/lib/reference/openapi-model'

const doc: Schema = {
  openapi: '3.1.0',
  tags: [{ name: 'galaxies', description: 'Galaxies' }, { name: 'accounts' }],
  paths: {
    '/api/v1/auth/sign-in': { post: { tags: ['accounts'], summary: 'Sign in', requestBody: { required: true, content: { 'application/json': { schema: {
      // zod writes local $defs beside a $ref that points into them
      $ref: '#/$defs/SignIn', $defs: { SignIn: { type: 'object', required: ['email'], properties: { email: { type: 'string', format: 'email' }, password: { type: 'string' } } } },
    } } } }, responses: { 200: { description: 'signed in' } } } },
    '/api/v1/projects/{projectId}/galaxies': {
      parameters: [{ name: 'projectId', in: 'path', required: true, schema: { type: 'string', format: 'uuid' } }],
      get: { tags: ['galaxies'], summary: 'List', parameters: [{ $ref: '#/components/parameters/Limit' }], responses: { 200: { description: 'a page', content: { 'application/json': { schema: { $ref: '#/components/schemas/Page' } } } } } },
    },
  },
  components: {
    parameters: { Limit: { name: 'limit', in: 'query', schema: { type: 'integer', minimum: 1, maximum: 1000 } } },
    schemas: { Page: { type: 'object', properties: { items: { type: 'array', items: { type: 'string' } }, kind: { enum: ['a', 'b'] } } } },
  },
}

describe('openapi-model', () => {
  const ops = readOperations(doc)

  it('reads operations with shared and referenced parameters', () => {
    const list = ops.find((o) => o.method === 'GET')!
    expect(list.parameters.map((p) => `${p.in}:${p.name}:${p.required}`)).toEqual(['path:projectId:true', 'query:limit:false'])
    expect(typeText(list.parameters[1].schema, doc)).toBe('integer ≥ 1 ≤ 1000')
  })

  it('groups by tag in the document\'s tag order', () => {
    expect(groupByTag(ops, doc).map((g) => g.tag)).toEqual(['galaxies', 'accounts'])
  })

  it('resolves component refs and local $defs for the schema tree', () => {
    const signIn = ops.find((o) => o.method === 'POST')!
    expect(typeText(signIn.requestBody!.schema, doc)).toBe('SignIn')
    expect(children(signIn.requestBody!.schema, doc).map((c) => `${c.name}${c.required ? '*' : ''}`)).toEqual(['email*', 'password'])
    const page = ops.find((o) => o.method === 'GET')!.responses[0].schema
    const kids = children(page, doc)
    expect(kids.map((k) => typeText(k.schema, doc))).toEqual(['array of string', '"a" | "b"'])
  })
})
