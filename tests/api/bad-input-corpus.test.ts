import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import http from 'node:http'
import type { AddressInfo } from 'node:net'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { BAD_REQUESTS, type BadRequest, type MultipartPart } from '../fixtures/bad-input/corpus.ts'

/**
 * Sends every request of the bad-input corpus (tests/fixtures/bad-input/corpus.ts) to the real app
 * over a real socket, byte for byte, and checks the answer: a 4xx (never ≥ 500, never a reset
 * connection), an RFC 9457 problem document, and the JSON Pointer of the field at fault. Every
 * registered route must have entries, so a new route cannot be left out.
 */
let t: TestApp
let server: http.Server
let port: number
let owner: Awaited<ReturnType<typeof signedInAgent>>
let key: string
const fx: Record<string, string> = {}

const TABLES = ['users', 'projects', 'memberships', 'api_keys', 'invitations', 'galaxies', 'results', 'intakes', 'column_mappings', 'assumption_revisions', 'password_resets']
async function counts() {
  const out: Record<string, number> = {}
  for (const table of TABLES) out[table] = Number((await t.db.$client.query(`select count(*) from ${table}`)).rows[0].count)
  out.committed = Number((await t.db.$client.query("select count(*) from intakes where status <> 'staged'")).rows[0].count)
  return out
}
let before: Record<string, number>

beforeAll(async () => {
  t = await startTestApp()
  owner = await signedInAgent(t.app, 'corpus-owner@example.org') // the first account: also the site admin
  const o = owner
  fx.userId = o.userId
  fx.projectId = (await o.agent.post('/api/v1/projects').set('X-CSRF-Token', o.csrf).send({ name: 'corpus' })).body.id
  await o.agent.post(`/api/v1/projects/${fx.projectId}/galaxies/batch`).set('X-CSRF-Token', o.csrf).send({ galaxies: [galaxy('G-1'), galaxy('G-2'), galaxy('G-3')] })
  const created = (await o.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', o.csrf).send({ name: 'corpus', access: 'write' })).body
  key = created.key
  fx.keyId = created.id
  fx.galaxyId = 'G-1'
  fx.intakeId = (await o.agent.post(`/api/v1/projects/${fx.projectId}/intakes/csv`).set('X-CSRF-Token', o.csrf)
    .attach('file', Buffer.from('id,halpha_flux,halpha_err\nU-1,300,6\n'), { filename: 'staged.csv', contentType: 'text/csv' })).body.intake.id
  fx.invitationId = (await o.agent.post(`/api/v1/projects/${fx.projectId}/invitations`).set('X-CSRF-Token', o.csrf).send({ email: 'guest@example.org', role: 'viewer' })).body.id
  const mail = (await t.mails()).at(-1)!
  fx.token = /token=([A-Za-z0-9_-]+)/.exec(mail.text)![1]
  fx.outboxId = String(mail.id)
  fx.jobId = '00000000-0000-4000-8000-000000000000'
  for (const [k, v] of Object.entries(fx)) if (!v) throw new Error(`fixture ${k} missing`)
  server = t.app.listen(0, '127.0.0.1')
  await new Promise((ok) => server.once('listening', ok))
  port = (server.address() as AddressInfo).port
  before = await counts()
}, 120_000)
afterAll(async () => {
  await new Promise((ok) => server?.close(ok))
  await t.close()
})

function multipartBody(parts: MultipartPart[], boundary: string): string {
  return parts.map((p) => {
    const disposition = `form-data; name="${p.name}"${p.filename !== undefined ? `; filename="${p.filename}"` : ''}${p.disposition ? `; ${p.disposition}` : ''}`
    return `--${boundary}\r\nContent-Disposition: ${disposition}\r\n${p.contentType ? `Content-Type: ${p.contentType}\r\n` : ''}\r\n${p.content}\r\n`
  }).join('') + `--${boundary}--\r\n`
}

interface Answer { status: number; headers: http.IncomingHttpHeaders; body: string }

/** One raw request: the path goes out exactly as written, the body as given; a reset rejects. */
function send(e: BadRequest): Promise<Answer> {
  const path = '/api/v1' + e.path.replace(/\{([A-Za-z]+)\}/g, (_m, k: string) => fx[k] ?? `{${k}}`)
  const headers: Record<string, string> = {}
  if ((e.as ?? 'owner') === 'owner') { headers.cookie = owner.cookie; headers['x-csrf-token'] = owner.csrf }
  if (e.as === 'key') headers.authorization = `Bearer ${key}`
  let body: Buffer | undefined
  if (e.multipart) {
    const boundary = 'corpus-boundary-7d1f'
    headers['content-type'] = `multipart/form-data; boundary=${boundary}`
    body = Buffer.from(multipartBody(e.multipart, boundary), 'utf8')
  } else if (e.raw !== undefined) {
    body = Buffer.from(e.raw, 'utf8')
  } else if (e.json !== undefined) {
    headers['content-type'] = 'application/json'
    body = Buffer.from(JSON.stringify(e.json), 'utf8')
  }
  for (const [k, v] of Object.entries(e.headers ?? {})) headers[k.toLowerCase()] = v
  if (body) headers['content-length'] = String(body.length)
  return new Promise((resolve, reject) => {
    const req = http.request({ host: '127.0.0.1', port, method: e.method, path, headers }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }))
      res.on('error', reject) // e.g. a stream that started as 200 and was then cut off
    })
    req.on('error', reject)
    req.end(body)
  })
}

const JSON_POINTER = /^(\/([^~]|~[01])*)*$/

describe('bad-input corpus', () => {
  it('holds at least 150 requests, and entries for every registered route', () => {
    expect(BAD_REQUESTS.length).toBeGreaterThanOrEqual(150)
    const registered = new Set(t.app.routeRegistry.specs.map((r) => `${r.method} ${r.path}`))
    const covered = new Set(BAD_REQUESTS.map((e) => e.route))
    expect([...registered].filter((r) => !covered.has(r)), 'routes without a corpus entry').toEqual([])
    expect([...covered].filter((r) => r !== 'app' && !registered.has(r)), 'entries naming no registered route').toEqual([])
    expect(new Set(BAD_REQUESTS.map((e) => e.name)).size, 'entry names are unique').toBe(BAD_REQUESTS.length)
  })

  for (const e of BAD_REQUESTS) {
    it(`${e.name} → ${e.expect.status}`, async () => {
      const res = await send(e)
      const said = `${res.status} ${res.body.slice(0, 600)}`
      expect(res.status, said).toBeLessThan(500)
      expect(res.status, said).toBe(e.expect.status)
      expect(res.headers['content-type'], said).toMatch(/^application\/problem\+json/)
      const p = JSON.parse(res.body)
      expect(p, said).toMatchObject({ type: expect.any(String), title: expect.any(String), status: res.status, detail: expect.any(String) })
      expect(p.detail.length).toBeGreaterThan(0)
      expect(Array.isArray(p.errors), said).toBe(true)
      for (const err of p.errors) {
        expect(err.path, said).toMatch(JSON_POINTER)
        expect(typeof err.message).toBe('string')
      }
      if (res.status === 422) expect(p.errors.length, said).toBeGreaterThan(0)
      if (e.expect.path !== undefined) expect(p.errors.map((x: { path: string }) => x.path), said).toContain(e.expect.path)
    })
  }

  it('stored nothing and changed nothing', async () => {
    expect(await counts()).toEqual(before)
    const [p] = (await t.db.$client.query('select name, description from projects where id = $1', [fx.projectId])).rows
    expect(p).toEqual({ name: 'corpus', description: '' })
    const [i] = (await t.db.$client.query('select status from intakes where id = $1', [fx.intakeId])).rows
    expect(i.status).toBe('staged')
  })
})
