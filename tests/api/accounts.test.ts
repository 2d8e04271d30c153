import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'

let t: TestApp
beforeAll(async () => { t = await startTestApp() })
afterAll(async () => { await t.close() })

const linkIn = (text: string, path: string) => new RegExp(`${path}\\?token=([A-Za-z0-9_-]+)`).exec(text)?.[1]

describe('sign-up and sign-in', () => {
  it('the first user becomes site admin, the second does not', async () => {
    const a = await signedInAgent(t.app, 'first@example.org')
    const b = await signedInAgent(t.app, 'second@example.org')
    expect((await a.agent.get('/api/v1/me')).body.isSiteAdmin).toBe(true)
    expect((await b.agent.get('/api/v1/me')).body.isSiteAdmin).toBe(false)
  })

  it('sets an httpOnly SameSite=Lax session cookie and a readable CSRF cookie', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'first@example.org', password: 'correct horse battery' })
    expect(res.status).toBe(200)
    const cookies = ([] as string[]).concat(res.headers['set-cookie'])
    const session = cookies.find((c) => c.startsWith('rg_session='))!
    expect(session).toMatch(/HttpOnly/i)
    expect(session).toMatch(/SameSite=Lax/i)
    expect(cookies.find((c) => c.startsWith('rg_csrf='))).not.toMatch(/HttpOnly/i)
  })

  it('answers "no such e-mail" and "wrong password" identically', async () => {
    const a = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'nobody@example.org', password: 'whatever-long' })
    const b = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'second@example.org', password: 'wrong-password-x' })
    expect(a.status).toBe(401)
    expect(b.status).toBe(401)
    expect(a.body).toEqual(b.body)
  })

  it('a taken e-mail is 409 and a short password 422 with the field path', async () => {
    const dup = await request(t.app).post('/api/v1/auth/sign-up').send({ email: 'FIRST@example.org', password: 'another long one', name: 'X' })
    expect(dup.status).toBe(409)
    const short = await request(t.app).post('/api/v1/auth/sign-up').send({ email: 'short@example.org', password: 'abc', name: 'X' })
    expect(short.status).toBe(422)
    expect(short.body.errors).toContainEqual(expect.objectContaining({ path: '/password' }))
  })

  it('backs off after repeated failures with 429 and Retry-After', async () => {
    await signedInAgent(t.app, 'lockme@example.org')
    let last
    for (let i = 0; i < 6; i++) last = await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'lockme@example.org', password: 'wrong-password-x' })
    expect(last!.status).toBe(429)
    expect(Number(last!.headers['retry-after'])).toBeGreaterThan(0)
  })

  it('sign-out voids the session', async () => {
    const a = await signedInAgent(t.app, 'leaver@example.org')
    expect((await a.agent.get('/api/v1/me')).status).toBe(200)
    expect((await a.agent.post('/api/v1/auth/sign-out').set('X-CSRF-Token', a.csrf)).status).toBe(204)
    expect((await a.agent.get('/api/v1/me')).status).toBe(401)
  })
})

describe('CSRF', () => {
  it('refuses a cookie-authenticated change without the CSRF header (a stolen cookie alone)', async () => {
    const a = await signedInAgent(t.app, 'csrf@example.org')
    const without = await a.agent.post('/api/v1/projects').send({ name: 'forged' })
    expect(without.status).toBe(403)
    const wrong = await a.agent.post('/api/v1/projects').set('X-CSRF-Token', 'nope').send({ name: 'forged' })
    expect(wrong.status).toBe(403)
    const right = await a.agent.post('/api/v1/projects').set('X-CSRF-Token', a.csrf).send({ name: 'mine' })
    expect(right.status).toBe(201)
  })
})

describe('API keys', () => {
  it('is shown once, stored as a hash, works at once and stops at once when revoked', async () => {
    const a = await signedInAgent(t.app, 'keys@example.org')
    const p = await a.agent.post('/api/v1/projects').set('X-CSRF-Token', a.csrf).send({ name: 'keyed' })
    const created = await a.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', a.csrf).send({ name: 'pipeline', projectId: p.body.id, access: 'read' })
    expect(created.status).toBe(201)
    expect(created.body.key).toMatch(/^rg_/)
    expect(created.body.key.startsWith(created.body.prefix)).toBe(true)
    const { rows } = await t.db.$client.query('select key_hash from api_keys where id = $1', [created.body.id])
    expect(rows[0].key_hash).toMatch(/^[0-9a-f]{64}$/)
    expect(rows[0].key_hash).not.toContain(created.body.key)
    const listed = await a.agent.get('/api/v1/me/api-keys')
    expect(JSON.stringify(listed.body)).not.toContain(created.body.key)

    const key = created.body.key as string
    const me = await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)
    expect(me.status).toBe(200)
    expect(me.body.projects).toEqual([expect.objectContaining({ id: p.body.id, role: 'viewer' })])
    const used = await a.agent.get('/api/v1/me/api-keys')
    expect(used.body.items[0].lastUsedAt).not.toBeNull()

    const write = await request(t.app).post(`/api/v1/projects/${p.body.id}/galaxies/batch`).set('Authorization', `Bearer ${key}`).send({ galaxies: [] })
    expect(write.status).toBe(403)

    expect((await a.agent.delete(`/api/v1/me/api-keys/${created.body.id}`).set('X-CSRF-Token', a.csrf)).status).toBe(204)
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(401)
  })

  it('an expired key is refused', async () => {
    const a = await signedInAgent(t.app, 'expiry@example.org')
    const created = await a.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', a.csrf).send({ name: 'short', access: 'read', expiresAt: new Date(Date.now() + 1500).toISOString() })
    expect(created.status).toBe(201)
    await new Promise((ok) => setTimeout(ok, 1700))
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${created.body.key}`)).status).toBe(401)
  })
})

describe('invitations and password reset through the captured mail', () => {
  it('invites a new person, who creates an account from the link and joins as viewer', async () => {
    const owner = await signedInAgent(t.app, 'inviter@example.org')
    const p = await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'shared sample' })
    const inv = await owner.agent.post(`/api/v1/projects/${p.body.id}/invitations`).set('X-CSRF-Token', owner.csrf).send({ email: 'newcomer@example.org', role: 'viewer' })
    expect(inv.status).toBe(201)
    const mail = (await t.mails()).find((m) => m.toAddress === 'newcomer@example.org')!
    expect(mail.subject).toContain('shared sample')
    const token = linkIn(mail.text, '/invite')!
    const look = await request(t.app).get(`/api/v1/invitations/${token}`)
    expect(look.body).toMatchObject({ projectName: 'shared sample', email: 'newcomer@example.org', role: 'viewer', accountExists: false })
    const agent = request.agent(t.app)
    const acc = await agent.post(`/api/v1/invitations/${token}/accept`).send({ name: 'New Comer', password: 'a long enough password' })
    expect(acc.status).toBe(200)
    const me = await agent.get('/api/v1/me')
    expect(me.body.projects).toEqual([expect.objectContaining({ id: p.body.id, role: 'viewer' })])
    expect((await request(t.app).post(`/api/v1/invitations/${token}/accept`).send({ name: 'x', password: 'another long password' })).status).toBe(404)
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'inviter@example.org', password: 'correct horse battery' })
    const audit = await owner.agent.get(`/api/v1/projects/${p.body.id}/audit`)
    expect(audit.body.items.map((e: { action: string }) => e.action)).toEqual(expect.arrayContaining(['invitation-sent', 'member-added', 'project-created', 'sign-in']))
    // the owner sees members' sign-ins, not those of other accounts
    expect(audit.body.items.filter((e: { action: string; target: string }) => e.action === 'sign-in').map((e: { target: string }) => e.target))
      .not.toContain('second@example.org')
  })

  it('an existing account accepts after signing in', async () => {
    const owner = await signedInAgent(t.app, 'inviter2@example.org')
    const guest = await signedInAgent(t.app, 'existing@example.org')
    const p = await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'second sample' })
    await owner.agent.post(`/api/v1/projects/${p.body.id}/invitations`).set('X-CSRF-Token', owner.csrf).send({ email: 'existing@example.org', role: 'analyst' })
    const token = linkIn((await t.mails()).filter((m) => m.toAddress === 'existing@example.org').at(-1)!.text, '/invite')!
    expect((await request(t.app).post(`/api/v1/invitations/${token}/accept`).send({})).status).toBe(401)
    expect((await guest.agent.post(`/api/v1/invitations/${token}/accept`).set('X-CSRF-Token', guest.csrf).send({})).status).toBe(200)
    expect((await guest.agent.get(`/api/v1/projects/${p.body.id}`)).body.role).toBe('analyst')
  })

  it('resets a password with a single-use link', async () => {
    await signedInAgent(t.app, 'forgetful@example.org', 'the old password')
    expect((await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'forgetful@example.org' })).status).toBe(202)
    expect((await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'nobody-here@example.org' })).status).toBe(202)
    const mail = (await t.mails()).filter((m) => m.toAddress === 'forgetful@example.org').at(-1)!
    const token = linkIn(mail.text, '/reset')!
    expect((await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token, password: 'the new password' })).status).toBe(204)
    expect((await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token, password: 'a third password' })).status).toBe(400)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'forgetful@example.org', password: 'the old password' })).status).toBe(401)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'forgetful@example.org', password: 'the new password' })).status).toBe(200)
  })
})

describe('site admin', () => {
  it('reads the outbox and disables accounts; others get 403', async () => {
    const admin = await signedInAgent(t.app, 'first@example.org')
    const other = await signedInAgent(t.app, 'second@example.org')
    const outbox = await admin.agent.get('/api/v1/admin/outbox')
    expect(outbox.status).toBe(200)
    expect(outbox.body.items.length).toBeGreaterThan(0)
    expect((await other.agent.get('/api/v1/admin/outbox')).status).toBe(403)
    const dis = await admin.agent.patch(`/api/v1/admin/users/${other.userId}`).set('X-CSRF-Token', admin.csrf).send({ disabled: true })
    expect(dis.status).toBe(200)
    expect((await other.agent.get('/api/v1/me')).status).toBe(401)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'second@example.org', password: 'correct horse battery' })).status).toBe(401)
  })
})
