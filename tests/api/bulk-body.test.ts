import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { generateLanternSurvey } from '../../server/seed/lantern.ts'
import { BatchRequestSchema, DiagnosticsRequestSchema } from '../../shared/schemas/galaxy.schema.ts'
import { fieldErrors } from '../../server/http/parse-request.ts'
import { BULK_INLINE_BYTES, bulkValue } from '../../server/http/bulk-body.ts'
import { parseBodyTask } from '../../server/compute/parse-body.task.ts'
import { BATCH_HASHES } from '../../server/routes/galaxies.routes.ts'
import { requestHash } from '../../server/services/galaxy-ingest.service.ts'

/**
 * Bulk bodies (diagnostics, batch) above BULK_INLINE_BYTES are parsed, validated and hashed on a
 * compute thread (server/http/bulk-body.ts): the answers must be those of the event-loop path.
 */
let t: TestApp
let server: Server
let base: string
let projectId: string
let writeKey: string

beforeAll(async () => {
  t = await startTestApp({ COMPUTE_TIMEOUT_S: '600' })
  server = t.app.listen(0, '127.0.0.1')
  await new Promise((ok) => server.once('listening', ok))
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  const owner = await signedInAgent(t.app, 'bulk-owner@example.org')
  projectId = (await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'bulk' })).body.id
  writeKey = (await owner.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', owner.csrf).send({ name: 'pipe', projectId, access: 'write' })).body.key
})
afterAll(async () => {
  await new Promise((ok) => server.close(ok))
  await t.close()
})

const survey = (n: number, seed: number, prefix: string) => generateLanternSurvey(n, seed).map(({ population: _p, ...g }) => ({ ...g, id: prefix + g.id }))

/** A body with faults of several kinds, at galaxies 0, 7 and the last. */
function spoiled(n: number, prefix: string) {
  const galaxies: Array<Record<string, unknown>> = survey(n, 31, prefix)
  galaxies[0] = { ...galaxies[0], id: 'bad\u0000id' }
  galaxies[7] = { ...galaxies[7], lines: { ...(galaxies[7].lines as object), hbeta: { flux: 10 } }, colour: 'red' }
  galaxies[n - 1] = { ...galaxies[n - 1], redshift: -1 }
  return galaxies
}

describe('bulk bodies read on a compute thread', () => {
  it('answer a 10,000-galaxy batch with the same problem document as the event-loop path, and store nothing', async () => {
    const body = { galaxies: spoiled(10_000, 'V-') }
    expect(Buffer.byteLength(JSON.stringify(body))).toBeGreaterThan(BULK_INLINE_BYTES)
    const res = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${writeKey}`).send(body)
    expect(res.status).toBe(422)
    expect(res.type).toBe('application/problem+json')
    const expected = fieldErrors(BatchRequestSchema.safeParse(body).error!.issues)
    expect(res.body.errors).toEqual(expected)
    expect(res.body.errors).toEqual([
      { path: '/galaxies/0/id', message: 'must not contain control characters (such as NUL)' },
      { path: '/galaxies/7/lines/hbeta/error', message: 'error is required with flux' },
      { path: '/galaxies/7/colour', message: 'unknown field "colour"' },
      { path: '/galaxies/9999/redshift', message: 'Too small: expected number to be >=0' },
    ])
    expect(res.body.detail).toBe('the request has invalid values')
    // the same faults in a small body (parsed on the event loop) name the same fields
    const small = { galaxies: [body.galaxies[0], body.galaxies[7]] }
    const resSmall = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${writeKey}`).send(small)
    expect(resSmall.status).toBe(422)
    expect(resSmall.body.errors).toEqual(expected.slice(0, 3).map((e) => ({ ...e, path: e.path.replace('/galaxies/7/', '/galaxies/1/') })))
    expect(Number((await t.db.$client.query('select count(*) from galaxies where project_id = $1', [projectId])).rows[0].count)).toBe(0)
  }, 120_000)

  it('answer large diagnostics with the same field errors (anonymous)', async () => {
    const body = { settings: { minSnr: -1 }, galaxies: spoiled(400, 'D-') }
    expect(Buffer.byteLength(JSON.stringify(body))).toBeGreaterThan(BULK_INLINE_BYTES)
    const res = await request(t.app).post('/api/v1/diagnostics').send(body)
    expect(res.status).toBe(422)
    expect(res.body.errors).toEqual(fieldErrors(DiagnosticsRequestSchema.safeParse(body).error!.issues))
    expect(res.body.errors[0]).toEqual({ path: '/settings/minSnr', message: 'Too small: expected number to be >=0' })
  })

  it('keep 400 for a large body that is not JSON, and 413 for 10,001 galaxies', async () => {
    const text = JSON.stringify({ galaxies: survey(300, 32, 'J-') })
    const broken = await request(t.app).post('/api/v1/diagnostics').set('content-type', 'application/json').send(text.slice(0, -1))
    expect(broken.status).toBe(400)
    expect(broken.body.detail).toBe('the body is not valid JSON')
    const many = await request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch`).set('Authorization', `Bearer ${writeKey}`)
      .send({ galaxies: Array.from({ length: 10_001 }, () => ({})) })
    expect(many.status).toBe(413)
    expect(many.body.errors).toEqual([{ path: '/galaxies', message: 'at most 10000 items' }])
  })

  it('answers /api/health within 1 s while a 10,000-galaxy invalid batch is read', async () => {
    const body = JSON.stringify({ galaxies: spoiled(10_000, 'L-') })
    const pending = fetch(`${base}/api/v1/projects/${projectId}/galaxies/batch`, { method: 'POST', headers: { authorization: `Bearer ${writeKey}`, 'content-type': 'application/json' }, body })
    let settled = false
    void pending.finally(() => { settled = true }).catch(() => {})
    const latencies: number[] = []
    while (!settled) {
      const t0 = performance.now()
      const health = await fetch(`${base}/api/health`)
      await health.arrayBuffer()
      latencies.push(performance.now() - t0)
      expect(health.status).toBe(200)
      await new Promise((ok) => setTimeout(ok, 20))
    }
    expect((await pending).status).toBe(422)
    expect(latencies.length).toBeGreaterThanOrEqual(1)
    expect(Math.max(...latencies)).toBeLessThan(1000)
  }, 120_000)

  it('hash a stored batch as the event loop did, so a resend with the same Idempotency-Key replays', async () => {
    const body = { galaxies: survey(200, 33, 'H-') }
    for (const [o, [before, after]] of Object.entries(BATCH_HASHES)) {
      const out = parseBodyTask({ kind: 'parse-body', schema: 'batch', bytes: Buffer.from(JSON.stringify(body)), hashes: { [o]: [before, after] } })
      expect(out.failed).toBeUndefined()
      expect(out.failed === undefined && out.hashes[o]).toBe(requestHash(o === 'replace' ? body : { body, onExisting: o }))
    }
    const send = (b: unknown, onExisting = 'replace') => request(t.app).post(`/api/v1/projects/${projectId}/galaxies/batch?onExisting=${onExisting}`)
      .set('Authorization', `Bearer ${writeKey}`).set('Idempotency-Key', 'night-1').send(b as object)
    const first = await send(body)
    expect(first.status).toBe(200)
    expect(first.body.inserted).toBe(200)
    const again = await send(body)
    expect(again.status).toBe(200)
    expect(again.headers['idempotent-replayed']).toBe('true')
    expect(again.body).toEqual(first.body)
    expect((await send(body, 'merge')).status).toBe(409)
  })

  it('keep −0 through the hand-back (JSON would turn it into 0)', async () => {
    const g = { id: 'Z-1', lines: { halpha: { flux: -0, error: 1 } } }
    const out = parseBodyTask({ kind: 'parse-body', schema: 'batch', bytes: Buffer.from('{"galaxies":[{"id":"Z-1","lines":{"halpha":{"flux":-0,"error":1}}}]}') })
    const value = await bulkValue(out) as { galaxies: typeof g[] }
    expect(Object.is(value.galaxies[0].lines.halpha.flux, -0)).toBe(true)
    expect(value.galaxies).toEqual([g])
  })
})
