import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import jwt from 'jsonwebtoken'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { tinySpectrum } from '../helpers/spectra.ts'
import { galaxy } from '../helpers/fixtures.ts'
import { STAR_FORMING, syntheticCsv } from '../helpers/spectra.ts'

/**
 * Every route × every kind of caller, with the expected answer of each cell. The table of routes
 * below must cover every registered route exactly, so a new route cannot be left out.
 */
type Principal = 'anonymous' | 'viewer' | 'analyst' | 'owner' | 'otherMember' | 'siteAdmin' | 'readKey' | 'writeKey' | 'revokedKey' | 'expiredKey' | 'expiredSession'
const PRINCIPALS: Principal[] = ['anonymous', 'viewer', 'analyst', 'owner', 'otherMember', 'siteAdmin', 'readKey', 'writeKey', 'revokedKey', 'expiredKey', 'expiredSession']

type Level = 'public' | 'optional' | 'user' | 'userSession' | 'admin' | 'viewer' | 'analyst' | 'owner' | 'ownerSession'
interface Row { method: string; path: string; level: Level; body?: unknown; fresh?: boolean }

const RANK = { viewer: 1, analyst: 2, owner: 3 } as const
/** The role a principal acts with in the fixture project (keys: the lesser of scope and role). */
const ROLE_IN_PROJECT: Partial<Record<Principal, keyof typeof RANK>> = { viewer: 'viewer', analyst: 'analyst', owner: 'owner', readKey: 'viewer', writeKey: 'analyst' }

/** Expected status class: 'ok' means the handler ran (any answer but 401/403/404 from the gate). */
function expected(row: Row, p: Principal): 'ok' | 401 | 403 | 404 {
  if (row.level === 'public' || row.level === 'optional') return p === 'revokedKey' || p === 'expiredKey' ? 401 : 'ok'
  if (p === 'anonymous' || p === 'revokedKey' || p === 'expiredKey' || p === 'expiredSession') return 401
  const isKey = p === 'readKey' || p === 'writeKey'
  const writes = row.method !== 'get'
  if (row.level === 'user') return isKey && writes && p === 'readKey' ? 403 : 'ok'
  if (row.level === 'userSession') return isKey ? 403 : 'ok'
  if (row.level === 'admin') return p === 'siteAdmin' ? 'ok' : 403
  const role = ROLE_IN_PROJECT[p]
  if (!role) return 404 // not a member: as if the project did not exist
  if (isKey && writes && p === 'readKey') return 403
  const need = row.level === 'ownerSession' ? 'owner' : row.level
  if (row.level === 'ownerSession' && isKey) return 403
  return RANK[role] >= RANK[need] ? 'ok' : 403
}

const P = '/projects/:projectId'
const TABLE: Row[] = [
  { method: 'post', path: '/auth/sign-up', level: 'public', body: { email: 'x', password: 'y', name: '' } },
  { method: 'post', path: '/auth/sign-in', level: 'public', body: { email: 'm-viewer@example.org', password: 'correct horse battery' } },
  { method: 'post', path: '/auth/password-reset', level: 'public', body: { email: 'nobody@example.org' } },
  { method: 'post', path: '/auth/password-reset/confirm', level: 'public', body: { token: 'not-a-real-token', password: 'long enough password' } },
  { method: 'post', path: '/auth/verify-email', level: 'userSession', body: { token: 'not-a-real-token' } },
  { method: 'post', path: '/auth/verify-email/resend', level: 'userSession' },
  { method: 'post', path: '/me/email', level: 'userSession', body: { email: 'matrix-new-address@example.org', password: 'correct horse battery' } },
  { method: 'get', path: '/invitations/:token', level: 'public' },
  { method: 'post', path: '/invitations/:token/accept', level: 'optional', body: {} },
  { method: 'get', path: '/me', level: 'user' },
  { method: 'get', path: '/me/api-keys', level: 'user' },
  { method: 'post', path: '/me/api-keys', level: 'userSession', body: { name: 'k', access: 'read' } },
  { method: 'delete', path: '/me/api-keys/:id', level: 'user' },
  { method: 'get', path: '/projects', level: 'user' },
  { method: 'post', path: '/projects', level: 'userSession', body: { name: 'new one' } },
  { method: 'get', path: P, level: 'viewer' },
  { method: 'patch', path: P, level: 'owner', body: { description: 'd' } },
  { method: 'delete', path: P, level: 'owner', fresh: true },
  { method: 'get', path: `${P}/overview`, level: 'viewer' },
  { method: 'get', path: `${P}/intakes`, level: 'viewer' },
  { method: 'get', path: `${P}/members`, level: 'viewer' },
  { method: 'patch', path: `${P}/members/:userId`, level: 'owner', body: { role: 'viewer' }, fresh: true },
  { method: 'delete', path: `${P}/members/:userId`, level: 'owner', fresh: true },
  { method: 'get', path: `${P}/invitations`, level: 'owner' },
  { method: 'post', path: `${P}/invitations`, level: 'owner', body: { email: 'someone-new@example.org', role: 'viewer' } },
  { method: 'delete', path: `${P}/invitations/:id`, level: 'owner' },
  { method: 'get', path: `${P}/audit`, level: 'owner' },
  { method: 'post', path: `${P}/galaxies/batch`, level: 'analyst', body: { galaxies: [galaxy('M-1')] } },
  { method: 'get', path: `${P}/galaxies`, level: 'viewer' },
  { method: 'get', path: `${P}/galaxies/:galaxyId`, level: 'viewer' },
  { method: 'get', path: `${P}/galaxies/:galaxyId/results/:revision`, level: 'viewer' },
  { method: 'get', path: `${P}/diagram`, level: 'viewer' },
  { method: 'post', path: '/diagnostics', level: 'optional', body: { galaxies: [galaxy('M-1')] } },
  { method: 'post', path: '/spectra/fit', level: 'optional', body: { spectra: [tinySpectrum()] } },
  { method: 'get', path: `${P}/assumptions`, level: 'viewer' },
  { method: 'put', path: `${P}/assumptions`, level: 'analyst', body: { settings: {} } },
  { method: 'get', path: `${P}/jobs`, level: 'viewer' },
  { method: 'get', path: `${P}/jobs/:jobId`, level: 'viewer' },
  { method: 'post', path: `${P}/intakes/csv`, level: 'analyst' },
  { method: 'post', path: `${P}/intakes/:intakeId/validate`, level: 'analyst', body: { mapping: { id: 'id' } } },
  { method: 'post', path: `${P}/intakes/:intakeId/commit`, level: 'analyst', body: { mapping: { id: 'nope' } } },
  { method: 'get', path: `${P}/intakes/:intakeId`, level: 'viewer' },
  { method: 'post', path: `${P}/intakes/:intakeId/undo`, level: 'analyst', fresh: true },
  { method: 'get', path: `${P}/galaxies/:galaxyId/versions`, level: 'viewer' },
  { method: 'get', path: `${P}/exports/galaxies.csv`, level: 'viewer' },
  { method: 'get', path: `${P}/exports/galaxies.vot`, level: 'viewer' },
  { method: 'post', path: `${P}/spectra`, level: 'analyst' },
  { method: 'get', path: `${P}/spectra`, level: 'viewer' },
  { method: 'get', path: `${P}/galaxies/:galaxyId/spectrum`, level: 'viewer' },
  { method: 'post', path: `${P}/galaxies/:galaxyId/spectrum/fit`, level: 'analyst', body: { fit: { components: 1 } } },
  { method: 'get', path: `${P}/galaxies/:galaxyId/spectrum/model.csv`, level: 'viewer' },
  { method: 'get', path: `${P}/exports/lines.csv`, level: 'viewer' },
  { method: 'get', path: `${P}/exports/lines.vot`, level: 'viewer' },
  { method: 'get', path: '/admin/users', level: 'admin' },
  { method: 'patch', path: '/admin/users/:userId', level: 'admin', body: { disabled: false } },
  { method: 'get', path: '/admin/outbox', level: 'admin' },
  { method: 'get', path: '/admin/outbox/:id', level: 'admin' },
  // last: signing out voids the owner's sessions
  { method: 'post', path: '/auth/sign-out', level: 'optional' },
]

let t: TestApp
const auth: Partial<Record<Principal, (r: request.Test) => request.Test>> = {}
const fx: Record<string, string> = {}
type Agent = Awaited<ReturnType<typeof signedInAgent>>
let people: Record<'owner' | 'analyst' | 'viewer' | 'otherMember' | 'siteAdmin', Agent>

async function makeProject(name: string) {
  const o = people.owner
  const id = (await o.agent.post('/api/v1/projects').set('X-CSRF-Token', o.csrf).send({ name })).body.id as string
  for (const role of ['analyst', 'viewer'] as const) {
    await t.db.$client.query('insert into memberships (project_id, user_id, role) values ($1, $2, $3)', [id, people[role].userId, role])
  }
  return id
}

beforeAll(async () => {
  t = await startTestApp()
  people = {
    siteAdmin: await signedInAgent(t.app, 'admin@example.org'), // first user: site admin, member of nothing
    owner: await signedInAgent(t.app, 'm-owner@example.org'),
    analyst: await signedInAgent(t.app, 'm-analyst@example.org'),
    viewer: await signedInAgent(t.app, 'm-viewer@example.org'),
    otherMember: await signedInAgent(t.app, 'm-other@example.org'),
  }
  fx.projectId = await makeProject('matrix')
  const o = people.owner
  await people.otherMember.agent.post('/api/v1/projects').set('X-CSRF-Token', people.otherMember.csrf).send({ name: 'elsewhere' })
  await o.agent.post(`/api/v1/projects/${fx.projectId}/galaxies/batch`).set('X-CSRF-Token', o.csrf).send({ galaxies: [galaxy('M-1')] })
  // M-1's spectrum (its lines come from the fit; the fit job runs in this process)
  const spectrum = await o.agent.post(`/api/v1/projects/${fx.projectId}/spectra`).set('X-CSRF-Token', o.csrf)
    .attach('files', Buffer.from(syntheticCsv({ redshift: 0.05, lines: STAR_FORMING })), { filename: 'M-1.csv' })
  for (let i = 0; i < 500 && (await o.agent.get(`/api/v1/projects/${fx.projectId}/jobs/${spectrum.body.job.id}`)).body.status !== 'done'; i++) await new Promise((ok) => setTimeout(ok, 20))
  const key = async (access: 'read' | 'write', expiresAt?: string) =>
    (await o.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', o.csrf).send({ name: access, access, ...(expiresAt ? { expiresAt } : {}) })).body
  const read = await key('read'), write = await key('write'), revoked = await key('write'), expiring = await key('write', new Date(Date.now() + 1000).toISOString())
  await o.agent.delete(`/api/v1/me/api-keys/${revoked.id}`).set('X-CSRF-Token', o.csrf)
  fx.apiKeyId = (await key('read')).id
  const inv = await o.agent.post(`/api/v1/projects/${fx.projectId}/invitations`).set('X-CSRF-Token', o.csrf).send({ email: 'invitee@example.org', role: 'viewer' })
  fx.invitationId = inv.body.id
  fx.token = /token=([A-Za-z0-9_-]+)/.exec((await t.mails()).at(-1)!.text)![1]
  fx.galaxyId = 'M-1'
  fx.revision = '1'
  fx.jobId = (await o.agent.get(`/api/v1/projects/${fx.projectId}/jobs`)).body.items[0]?.id ?? '00000000-0000-4000-8000-000000000000'
  fx.intakeId = (await o.agent.get(`/api/v1/projects/${fx.projectId}/intakes`)).body.items.find((i: { kind: string }) => i.kind === 'api').id
  fx.userId = people.viewer.userId
  fx.id = fx.apiKeyId
  fx.outboxId = String((await t.mails())[0].id)
  const expiredJwt = jwt.sign({ sub: o.userId, csrf: o.csrf, t: Date.now() - 8 * 86400e3, iat: Math.floor(Date.now() / 1000) - 8 * 86400, exp: Math.floor(Date.now() / 1000) - 86400 }, 'test-secret-not-for-production')
  await new Promise((ok) => setTimeout(ok, 1100)) // let the expiring key expire
  const bearer = (k: string) => (r: request.Test) => r.set('Authorization', `Bearer ${k}`)
  const session = (a: Agent) => (r: request.Test) => r.set('Cookie', a.cookie).set('X-CSRF-Token', a.csrf)
  Object.assign(auth, {
    anonymous: (r: request.Test) => r,
    owner: session(people.owner), analyst: session(people.analyst), viewer: session(people.viewer),
    otherMember: session(people.otherMember), siteAdmin: session(people.siteAdmin),
    readKey: bearer(read.key), writeKey: bearer(write.key), revokedKey: bearer(revoked.key), expiredKey: bearer(expiring.key),
    expiredSession: (r: request.Test) => r.set('Cookie', `rg_session=${expiredJwt}; rg_csrf=${o.csrf}`).set('X-CSRF-Token', o.csrf),
  })
}, 120_000)
afterAll(async () => { await t.close() })

describe('authorization matrix', () => {
  it('covers every registered route exactly', () => {
    const registered = t.app.routeRegistry.specs.map((r) => `${r.method} ${r.path}`).sort()
    expect(TABLE.map((r) => `${r.method} ${r.path}`).sort()).toEqual(registered)
  })

  for (const row of TABLE) {
    for (const p of PRINCIPALS) {
      const want = expected(row, p)
      it(`${row.method.toUpperCase()} ${row.path} as ${p} → ${want}`, async () => {
        const projectId = row.fresh && want === 'ok' ? await makeProject(`fresh ${p}`) : fx.projectId
        const values: Record<string, string> = { ...fx, projectId, id: row.path.includes('invitations/:id') ? fx.invitationId : row.path.includes('outbox') ? fx.outboxId : fx.apiKeyId }
        if (row.path === '/me/api-keys/:id' && want === 'ok') values.id = '00000000-0000-4000-8000-000000000000'
        if (row.path === '/admin/users/:userId') values.userId = people.viewer.userId
        const url = '/api/v1' + row.path.replace(/:([A-Za-z]+)/g, (_m, k: string) => encodeURIComponent(values[k]))
        let req = (request(t.app) as unknown as Record<string, (u: string) => request.Test>)[row.method](url)
        req = auth[p]!(req)
        // a spectrum without a redshift: refused (422) after the gate, so nothing is stored
        const res = row.path.endsWith('/intakes/csv')
          ? await req.attach('file', Buffer.from('id,z\nA,0.1\n'), { filename: 'a.csv', contentType: 'text/csv' })
          : row.path.endsWith('/spectra') && row.method === 'post' ? await req.attach('files', Buffer.from(syntheticCsv({ redshift: 0.05, lines: STAR_FORMING })), { filename: 'NOZ.csv' })
          : row.body !== undefined ? await req.send(row.body as object) : await req
        if (want === 'ok') {
          expect(res.status, JSON.stringify(res.body)).not.toBe(401)
          expect(res.status, JSON.stringify(res.body)).not.toBe(403)
          if (row.path.startsWith(P)) expect(res.body?.detail ?? '').not.toBe('no such project')
          expect(res.status).toBeLessThan(500)
        } else {
          expect(res.status, JSON.stringify(res.body)).toBe(want)
        }
      })
    }
  }
})
