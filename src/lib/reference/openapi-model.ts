/**
 * A small reading of an OpenAPI 3.1 document: operations grouped by tag, `$ref`s resolved against
 * the document. Only what the reference page shows; unknown keywords are ignored, not fatal.
 */
export type Schema = Record<string, unknown>

export interface Parameter { name: string; in: string; required: boolean; description?: string; schema?: Schema }
export interface ResponseInfo { status: string; description: string; schema?: Schema; mediaType?: string }
export interface Operation {
  id: string
  method: string
  path: string
  summary: string
  description?: string
  tag: string
  parameters: Parameter[]
  requestBody?: { required: boolean; schema?: Schema; mediaType?: string; description?: string }
  responses: ResponseInfo[]
  security: string[]
}

const METHODS = ['get', 'post', 'put', 'patch', 'delete', 'head', 'options'] as const

/** `$defs` met on the way down: JSON Schema resolves `#/$defs/X` against the schema that declares it. */
export type Defs = Record<string, Schema>

export function withDefs(schema: Schema | undefined, defs: Defs = {}): Defs {
  const own = schema?.$defs as Defs | undefined
  return own ? { ...defs, ...own } : defs
}

export function resolveRef(doc: Schema, ref: string, defs: Defs = {}): Schema | undefined {
  const local = /^#\/\$defs\/(.+)$/.exec(ref)
  if (local && defs[local[1]]) return defs[local[1]]
  if (!ref.startsWith('#/')) return undefined
  let cur: unknown = doc
  for (const part of ref.slice(2).split('/')) {
    const key = part.replace(/~1/g, '/').replace(/~0/g, '~')
    if (!cur || typeof cur !== 'object') return undefined
    cur = (cur as Record<string, unknown>)[key]
  }
  return cur && typeof cur === 'object' ? (cur as Schema) : undefined
}

function deref<T>(doc: Schema, v: unknown): T | undefined {
  if (v && typeof v === 'object' && typeof (v as Schema).$ref === 'string') return resolveRef(doc, (v as Schema).$ref as string) as T
  return v as T
}

function firstContent(content: unknown): { mediaType?: string; schema?: Schema } {
  if (!content || typeof content !== 'object') return {}
  const [mediaType, media] = Object.entries(content as Record<string, { schema?: Schema }>)[0] ?? []
  return { mediaType, schema: media?.schema }
}

export function readOperations(doc: Schema): Operation[] {
  const paths = (doc.paths ?? {}) as Record<string, Record<string, unknown>>
  const ops: Operation[] = []
  for (const [path, item] of Object.entries(paths)) {
    const shared = (item.parameters as unknown[] | undefined) ?? []
    for (const method of METHODS) {
      const op = item[method] as Schema | undefined
      if (!op) continue
      const params = [...shared, ...((op.parameters as unknown[]) ?? [])]
        .map((p) => deref<Parameter>(doc, p))
        .filter((p): p is Parameter => !!p && typeof p.name === 'string')
        .map((p) => ({ ...p, required: !!p.required }))
      const body = deref<Schema>(doc, op.requestBody)
      const bodyContent = body ? firstContent(body.content) : {}
      const responses = Object.entries((op.responses ?? {}) as Record<string, unknown>).map(([status, r]) => {
        const res = deref<Schema>(doc, r) ?? {}
        const c = firstContent(res.content)
        return { status, description: String(res.description ?? ''), schema: c.schema, mediaType: c.mediaType }
      })
      const security = ((op.security ?? doc.security ?? []) as Record<string, unknown>[]).flatMap((s) => Object.keys(s))
      ops.push({
        id: `${method}-${path}`,
        method: method.toUpperCase(),
        path,
        summary: String(op.summary ?? ''),
        description: op.description as string | undefined,
        tag: ((op.tags as string[] | undefined)?.[0]) ?? 'other',
        parameters: params,
        requestBody: body ? { required: !!body.required, description: body.description as string | undefined, ...bodyContent } : undefined,
        responses,
        security,
      })
    }
  }
  return ops
}

export function groupByTag(ops: Operation[], doc: Schema): { tag: string; description?: string; operations: Operation[] }[] {
  const tagInfo = new Map(((doc.tags ?? []) as { name: string; description?: string }[]).map((t) => [t.name, t.description]))
  const order = [...tagInfo.keys()]
  const groups = new Map<string, Operation[]>()
  for (const op of ops) groups.set(op.tag, [...(groups.get(op.tag) ?? []), op])
  return [...groups.entries()]
    .sort(([a], [b]) => (order.indexOf(a) + 1 || 999) - (order.indexOf(b) + 1 || 999) || a.localeCompare(b))
    .map(([tag, operations]) => ({ tag, description: tagInfo.get(tag), operations }))
}

/** Short type text for one schema: `string`, `integer ≥ 1`, `array of Galaxy`, `"a" | "b"`. */
export function typeText(schema: Schema | undefined, doc: Schema, defs: Defs = {}): string {
  if (!schema) return 'any'
  defs = withDefs(schema, defs)
  if (typeof schema.$ref === 'string') return schema.$ref.split('/').pop() ?? 'object'
  if (Array.isArray(schema.enum)) return schema.enum.map((v) => JSON.stringify(v)).join(' | ')
  if ('const' in schema) return JSON.stringify(schema.const)
  for (const k of ['anyOf', 'oneOf', 'allOf'] as const) {
    if (Array.isArray(schema[k])) return (schema[k] as Schema[]).map((s) => typeText(s, doc, defs)).join(k === 'allOf' ? ' & ' : ' | ')
  }
  const t = Array.isArray(schema.type) ? (schema.type as string[]).join(' | ') : (schema.type as string | undefined)
  if (t === 'array') return `array of ${typeText(schema.items as Schema | undefined, doc, defs)}`
  const bounds: string[] = []
  if (schema.minimum !== undefined) bounds.push(`≥ ${schema.minimum}`)
  if (schema.exclusiveMinimum !== undefined) bounds.push(`> ${schema.exclusiveMinimum}`)
  if (schema.maximum !== undefined) bounds.push(`≤ ${schema.maximum}`)
  if (schema.format) bounds.push(String(schema.format))
  return [t ?? (schema.properties ? 'object' : 'any'), ...bounds].join(' ')
}

/** The schema to show children of, following one `$ref` and array items. */
export function expandable(schema: Schema | undefined, doc: Schema, defs: Defs = {}): Schema | undefined {
  let s = schema
  for (let i = 0; i < 4 && s; i++) {
    defs = withDefs(s, defs)
    if (typeof s.$ref === 'string') { s = resolveRef(doc, s.$ref, defs); continue }
    if (s.type === 'array' && s.items) { s = s.items as Schema; continue }
    break
  }
  return s
}

export function children(schema: Schema | undefined, doc: Schema, defs: Defs = {}): { name: string; schema: Schema; required: boolean }[] {
  const s = expandable(schema, doc, defs)
  if (!s) return []
  const req = new Set((s.required as string[] | undefined) ?? [])
  const props = { ...((s.properties ?? {}) as Record<string, Schema>) }
  for (const part of ((s.allOf ?? []) as Schema[])) Object.assign(props, (expandable(part, doc, defs)?.properties ?? {}) as Record<string, Schema>)
  const out = Object.entries(props).map(([name, schema]) => ({ name, schema, required: req.has(name) }))
  if (s.additionalProperties && typeof s.additionalProperties === 'object') out.push({ name: '<key>', schema: s.additionalProperties as Schema, required: false })
  return out
}
