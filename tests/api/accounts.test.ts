import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { signedInAgent, startTestApp, tokenIn as linkIn, waitForMail, type TestApp } from '../helpers/app.ts'
import { startMailCatcher } from '../../server/lib/mail-catcher.ts'
import { queuedMailer, smtpDelivery } from '../../server/lib/mailer.ts'
import { forgetOldSignInFailures } from '../../server/services/sign-in-throttle.ts'

let t: TestApp
beforeAll(async () => { t = await startTestApp() })
afterAll(async () => { await t.close() })


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

  it('a taken e-mail answers exactly like a new one, and its owner is mailed a notice instead', async () => {
    const fresh = await request(t.app).post('/api/v1/auth/sign-up').send({ email: 'brand-new@example.org', password: 'another long one', name: 'X' })
    const dup = await request(t.app).post('/api/v1/auth/sign-up').send({ email: 'FIRST@example.org', password: 'another long one', name: 'X' })
    expect([fresh.status, dup.status]).toEqual([201, 201])
    expect(Object.keys(dup.body.user).sort()).toEqual(Object.keys(fresh.body.user).sort())
    // nothing of the existing account: not its id, name or age; and neither answer signs anyone in
    const first = (await t.db.$client.query("select id, name from users where email = 'first@example.org'")).rows[0]
    expect(dup.body.user).toMatchObject({ email: 'first@example.org', name: 'X', isSiteAdmin: false })
    expect(dup.body.user.id).not.toBe(first.id)
    expect(dup.body.user.id).toMatch(/^[0-9a-f-]{36}$/)
    expect(fresh.headers['set-cookie']).toBeUndefined()
    expect(dup.headers['set-cookie']).toBeUndefined()
    const mails = await t.mails()
    expect(mails.filter((m) => m.toAddress === 'first@example.org').at(-1)!.subject).toBe('Someone tried to create a Ratiograph account with your address')
    expect(mails.filter((m) => m.toAddress === 'brand-new@example.org').at(-1)!.subject).toBe('Confirm your e-mail address for Ratiograph')
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

  it('the hourly sweep, not a failed sign-in, removes counters idle for a day', async () => {
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'stale@example.org', password: 'wrong-password-x' })
    const rows = async () => (await t.db.$client.query("select email, ip from sign_in_failures where email in ('stale@example.org', 'fresh@example.org') order by email")).rows.map((r) => r.email)
    expect(await rows()).toEqual(['stale@example.org'])
    await t.db.$client.query("update sign_in_failures set last_failure_at = now() - interval '25 hours' where email = 'stale@example.org'")
    await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'fresh@example.org', password: 'wrong-password-x' })
    expect(await rows()).toEqual(['fresh@example.org', 'stale@example.org']) // a failure no longer sweeps the table
    await forgetOldSignInFailures(t.db)
    expect(await rows()).toEqual(['fresh@example.org'])
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

const mailTo = (address: string, subject: string) => waitForMail(t.mails, (m) => m.toAddress === address && m.subject === subject)
const VERIFY_SUBJECT = 'Confirm your e-mail address for Ratiograph'
const RESET_SUBJECT = 'Reset your Ratiograph password'

describe('pre-registration takeover: a squatter signs up with someone else\'s address', () => {
  it('cannot make keys or join projects unverified, and the owner\'s password reset ends every session of the squatter', async () => {
    const victim = 'victim@example.org'
    const squatter = await signedInAgent(t.app, victim, 'squatter knows this one', 'Squatter', { verify: false })
    const me = await squatter.agent.get('/api/v1/me')
    expect([me.status, me.body.emailVerified]).toEqual([200, false]) // signed in, with a "verify" banner

    const key = await squatter.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', squatter.csrf).send({ name: 'stolen', access: 'write' })
    expect(key.status).toBe(403)
    expect(key.body.detail).toContain('verify your e-mail address')

    // the verification link went to the real owner; opening it without the squatter's session does nothing
    const verifyToken = linkIn((await mailTo(victim, VERIFY_SUBJECT)).text, '/verify-email')!
    expect((await request(t.app).post('/api/v1/auth/verify-email').send({ token: verifyToken })).status).toBe(401)
    const someoneElse = await signedInAgent(t.app, 'bystander@example.org')
    expect((await someoneElse.agent.post('/api/v1/auth/verify-email').set('X-CSRF-Token', someoneElse.csrf).send({ token: verifyToken })).status).toBe(403)

    // a project owner invites the real owner of the address
    const owner = await signedInAgent(t.app, 'takeover-owner@example.org')
    const p = await owner.agent.post('/api/v1/projects').set('X-CSRF-Token', owner.csrf).send({ name: 'guarded sample' })
    await owner.agent.post(`/api/v1/projects/${p.body.id}/invitations`).set('X-CSRF-Token', owner.csrf).send({ email: victim, role: 'analyst' })
    const inviteToken = linkIn((await mailTo(victim, 'You are invited to "guarded sample" on Ratiograph')).text, '/invite')!
    const squatAccept = await squatter.agent.post(`/api/v1/invitations/${inviteToken}/accept`).set('X-CSRF-Token', squatter.csrf).send({})
    expect(squatAccept.status).toBe(403)
    expect(squatAccept.body.detail).toContain('verify your e-mail address')
    expect((await owner.agent.get(`/api/v1/projects/${p.body.id}/members`)).body.items.map((m: { email: string }) => m.email)).not.toContain(victim)

    // the real owner cannot sign in (unknown password), so recovers the account through the mailed reset link
    expect((await request(t.app).post('/api/v1/auth/password-reset').send({ email: victim })).status).toBe(202)
    const resetToken = linkIn((await mailTo(victim, RESET_SUBJECT)).text, '/reset')!
    expect((await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token: resetToken, password: 'the owner chose this' })).status).toBe(204)

    // the squatter is out: session void, old password refused, the old verification link void
    expect((await squatter.agent.get('/api/v1/me')).status).toBe(401)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: victim, password: 'squatter knows this one' })).status).toBe(401)

    const real = request.agent(t.app)
    const signIn = await real.post('/api/v1/auth/sign-in').send({ email: victim, password: 'the owner chose this' })
    expect(signIn.status).toBe(200)
    const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(([] as string[]).concat(signIn.headers['set-cookie']).join(';'))![1])
    expect((await real.get('/api/v1/me')).body.emailVerified).toBe(true) // the reset link proved the mailbox
    expect((await real.post('/api/v1/auth/verify-email').set('X-CSRF-Token', csrf).send({ token: verifyToken })).status).toBe(400)
    expect((await real.post(`/api/v1/invitations/${inviteToken}/accept`).set('X-CSRF-Token', csrf).send({})).status).toBe(200)
    const realKey = await real.post('/api/v1/me/api-keys').set('X-CSRF-Token', csrf).send({ name: 'mine', projectId: p.body.id, access: 'write' })
    expect(realKey.status).toBe(201)
    expect((await request(t.app).get(`/api/v1/projects/${p.body.id}`).set('Authorization', `Bearer ${realKey.body.key}`)).status).toBe(200)
  })

  it('a key made by an account from before verification existed (counted as verified) dies with the owner\'s reset', async () => {
    const victim = 'early-victim@example.org'
    const squatter = await signedInAgent(t.app, victim, 'squatter knows this one', 'Squatter', { verify: false })
    await t.db.$client.query('update users set email_verified_at = created_at where email = $1', [victim]) // as the migration does for old accounts
    const other = request.agent(t.app) // a second session of the squatter
    expect((await other.post('/api/v1/auth/sign-in').send({ email: victim, password: 'squatter knows this one' })).status).toBe(200)
    const key = (await squatter.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', squatter.csrf).send({ name: 'stolen', access: 'write' })).body.key as string
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(200)

    await request(t.app).post('/api/v1/auth/password-reset').send({ email: victim })
    const resetToken = linkIn((await mailTo(victim, RESET_SUBJECT)).text, '/reset')!
    expect((await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token: resetToken, password: 'the owner chose this' })).status).toBe(204)

    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(401)
    expect((await squatter.agent.get('/api/v1/me')).status).toBe(401)
    expect((await other.get('/api/v1/me')).status).toBe(401)
    const { rows } = await t.db.$client.query('select count(*)::int as live from api_keys k join users u on u.id = k.user_id where u.email = $1 and k.revoked_at is null', [victim])
    expect(rows[0].live).toBe(0)
  })
})

describe('revocation', () => {
  it('a password reset voids every older reset link of the account', async () => {
    await signedInAgent(t.app, 'two-links@example.org')
    await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'two-links@example.org' })
    await request(t.app).post('/api/v1/auth/password-reset').send({ email: 'two-links@example.org' })
    const links = (await t.mails()).filter((m) => m.toAddress === 'two-links@example.org' && m.subject === RESET_SUBJECT).map((m) => linkIn(m.text, '/reset')!)
    expect(links).toHaveLength(2)
    expect((await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token: links[1], password: 'the second link won' })).status).toBe(204)
    const older = await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token: links[0], password: 'the first link too late' })
    expect(older.status).toBe(400)
    expect(older.body.errors).toEqual([{ path: '/token', message: 'invalid, used or expired' }])
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'two-links@example.org', password: 'the second link won' })).status).toBe(200)
  })

  it('disabling an account ends its sessions and keys, and enabling it again revives neither', async () => {
    const admin = await signedInAgent(t.app, 'first@example.org')
    const u = await signedInAgent(t.app, 'disable-me@example.org')
    const key = (await u.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', u.csrf).send({ name: 'k', access: 'read' })).body.key as string
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(200)
    expect((await admin.agent.patch(`/api/v1/admin/users/${u.userId}`).set('X-CSRF-Token', admin.csrf).send({ disabled: true })).status).toBe(200)
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(401)
    expect((await admin.agent.patch(`/api/v1/admin/users/${u.userId}`).set('X-CSRF-Token', admin.csrf).send({ disabled: false })).status).toBe(200)
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(401)
    expect((await u.agent.get('/api/v1/me')).status).toBe(401)
    const again = request.agent(t.app)
    expect((await again.post('/api/v1/auth/sign-in').send({ email: 'disable-me@example.org', password: 'correct horse battery' })).status).toBe(200)
    const keys = (await again.get('/api/v1/me/api-keys')).body.items
    expect(keys).toHaveLength(1)
    expect(keys[0].revokedAt).not.toBeNull()
  })

  it('an e-mail change needs the password and the new mailbox, then ends every other session and every key', async () => {
    const a = await signedInAgent(t.app, 'mover@example.org')
    const elsewhere = request.agent(t.app)
    await elsewhere.post('/api/v1/auth/sign-in').send({ email: 'mover@example.org', password: 'correct horse battery' })
    const key = (await a.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', a.csrf).send({ name: 'k', access: 'read' })).body.key as string

    const wrong = await a.agent.post('/api/v1/me/email').set('X-CSRF-Token', a.csrf).send({ email: 'moved@example.org', password: 'not my password' })
    expect(wrong.status).toBe(403)
    expect(wrong.body.errors).toEqual([{ path: '/password', message: 'wrong password' }])
    // an address that is taken gets the same answer; its owner a notice, no link
    const taken = await a.agent.post('/api/v1/me/email').set('X-CSRF-Token', a.csrf).send({ email: 'first@example.org', password: 'correct horse battery' })
    const ok = await a.agent.post('/api/v1/me/email').set('X-CSRF-Token', a.csrf).send({ email: 'Moved@example.org', password: 'correct horse battery' })
    expect([taken.status, ok.status]).toEqual([202, 202])
    expect(taken.body).toEqual(ok.body)
    expect((await mailTo('first@example.org', 'Someone tried to move a Ratiograph account to your address')).text).not.toContain('token=')
    await mailTo('mover@example.org', 'Your Ratiograph account asked to change its e-mail address')

    // nothing changes until the link is opened
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).body.email).toBe('mover@example.org')
    const token = linkIn((await mailTo('moved@example.org', 'Confirm your new e-mail address for Ratiograph')).text, '/verify-email')!
    const done = await a.agent.post('/api/v1/auth/verify-email').set('X-CSRF-Token', a.csrf).send({ token })
    expect(done.status).toBe(200)
    expect(done.body).toEqual({ email: 'moved@example.org', changed: true })
    const csrf = decodeURIComponent(/rg_csrf=([^;]+)/.exec(([] as string[]).concat(done.headers['set-cookie']).join(';'))![1])

    expect((await a.agent.get('/api/v1/me')).body).toMatchObject({ email: 'moved@example.org', emailVerified: true }) // signed in again
    expect((await elsewhere.get('/api/v1/me')).status).toBe(401)
    expect((await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`)).status).toBe(401)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'mover@example.org', password: 'correct horse battery' })).status).toBe(401)
    expect((await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'moved@example.org', password: 'correct horse battery' })).status).toBe(200)
    await mailTo('mover@example.org', 'Your Ratiograph account has a new e-mail address')
    expect((await a.agent.post('/api/v1/auth/verify-email').set('X-CSRF-Token', csrf).send({ token })).status).toBe(400) // once
  })
})

describe('enumeration', () => {
  it('a reset answers the same for known and unknown addresses, before any mail is handed over', async () => {
    let release!: () => void
    const held = new Promise<void>((ok) => { release = ok })
    const gated = await startTestApp({}, { delivery: (smtp) => async (m) => { await held; await smtp(m) } })
    try {
      const sign = await request(gated.app).post('/api/v1/auth/sign-up').send({ email: 'known@example.org', password: 'correct horse battery', name: 'K' })
      expect(sign.status).toBe(201)
      const known = await request(gated.app).post('/api/v1/auth/password-reset').send({ email: 'known@example.org' })
      const unknown = await request(gated.app).post('/api/v1/auth/password-reset').send({ email: 'unknown@example.org' })
      expect([known.status, unknown.status]).toEqual([202, 202])
      expect(known.body).toEqual(unknown.body)
      expect(known.headers['content-type']).toBe(unknown.headers['content-type'])
      // the answer came while delivery was still held back: nothing has reached the catcher yet
      expect((await gated.db.$client.query('select count(*)::int as n from outbox_messages')).rows[0].n).toBe(0)
      release()
      const mails = await gated.mails()
      expect(mails.map((m) => [m.toAddress, m.subject])).toEqual([['known@example.org', VERIFY_SUBJECT], ['known@example.org', RESET_SUBJECT]])
    } finally {
      release()
      await gated.close()
    }
  })
})

describe('the mail queue', () => {
  it('retries a message the relay refused, in order, and idle() waits for the delivery', async () => {
    const catcher = await startMailCatcher(t.db)
    const smtp = smtpDelivery(catcher.url)
    let refusals = 2
    const mailer = queuedMailer(async (m) => { if (m.to === 'retry-1@example.org' && refusals-- > 0) throw new Error('relay busy'); await smtp.deliver(m) }, { backoffMs: 20, onClose: smtp.close })
    try {
      await mailer.send({ to: 'retry-1@example.org', subject: 'first', text: 'one' })
      await mailer.send({ to: 'retry-2@example.org', subject: 'second', text: 'two' })
      await mailer.idle()
      const got = (await t.db.$client.query("select to_address, subject from outbox_messages where to_address like 'retry-%' order by id")).rows
      expect(got).toEqual([{ to_address: 'retry-1@example.org', subject: 'first' }, { to_address: 'retry-2@example.org', subject: 'second' }])
      expect(refusals).toBe(-1) // two refusals, then the third try went through
    } finally { mailer.close(); await catcher.close() }
  })
})

describe('sign-in throttling per (e-mail, address) and per address', () => {
  let p: TestApp
  beforeAll(async () => { p = await startTestApp({ TRUST_PROXY: 'loopback' }) })
  afterAll(async () => { await p.close() })
  const signIn = (email: string, password: string, from: string) =>
    request(p.app).post('/api/v1/auth/sign-in').set('X-Forwarded-For', from).send({ email, password })

  it('strangers failing from their address do not lock the owner out of theirs', async () => {
    await request(p.app).post('/api/v1/auth/sign-up').send({ email: 'target@example.org', password: 'correct horse battery', name: 'T' })
    const attacker = '203.0.113.9', home = '198.51.100.4'
    for (let i = 0; i < 5; i++) expect((await signIn('target@example.org', 'wrong password ' + i, attacker)).status).toBe(401)
    const blocked = await signIn('target@example.org', 'correct horse battery', attacker)
    expect(blocked.status).toBe(429)
    expect(Number(blocked.headers['retry-after'])).toBeGreaterThan(0)
    expect((await signIn('target@example.org', 'correct horse battery', home)).status).toBe(200)

    // an address nobody registered backs off the same way, with the same answer
    for (let i = 0; i < 5; i++) expect((await signIn('ghost@example.org', 'wrong password ' + i, attacker)).status).toBe(401)
    const ghost = await signIn('ghost@example.org', 'whatever password', attacker)
    expect(ghost.status).toBe(429)
    expect(ghost.body).toEqual(blocked.body)
  })

  it('one address spraying many e-mails backs off for all of them; other addresses are not affected', async () => {
    const sprayer = '192.0.2.77'
    for (let i = 0; i < 30; i++) expect((await signIn(`spray${i}@example.org`, 'password spray', sprayer)).status).toBe(401)
    expect((await signIn('spray-next@example.org', 'password spray', sprayer)).status).toBe(429)
    expect((await signIn('target@example.org', 'correct horse battery', '198.51.100.5')).status).toBe(200)
  }, 60_000)
})

describe('new passwords', () => {
  const signUp = (email: string, password: string) => request(t.app).post('/api/v1/auth/sign-up').send({ email, password, name: 'P' })
  const p72 = 'Seventy-two bytes of ASCII: 0123456789 abcdefghijklmnopqrstuvwxyz ABCDEF'

  it('refuses common ones, repetitions and more than bcrypt\'s 72 bytes, naming /password', async () => {
    expect(new TextEncoder().encode(p72).length).toBe(72)
    for (const [password, message] of [
      ['Password123', 'this is one of the most common passwords; choose another'],
      ['qwertyuiop', 'this is one of the most common passwords; choose another'],
      ['aaaaaaaaaaaa', 'a character or short group repeated is too easy to guess'],
      ['abababababab', 'a character or short group repeated is too easy to guess'],
      [p72 + 'G', 'use at most 72 bytes (this one has 73); longer passwords would be cut silently'],
      ['ü'.repeat(30) + 'abcdefghijklmn', 'use at most 72 bytes (this one has 74); longer passwords would be cut silently'],
    ]) {
      const res = await signUp('weak@example.org', password)
      expect(res.status, password).toBe(422)
      expect(res.body.errors, password).toEqual([{ path: '/password', message }])
    }
    expect((await signUp('strong72@example.org', p72)).status).toBe(201)
  })

  it('the same rule holds for a reset and for an account made from an invitation', async () => {
    const reset = await request(t.app).post('/api/v1/auth/password-reset/confirm').send({ token: 'whatever-token', password: 'password123' })
    expect(reset.status).toBe(422)
    expect(reset.body.errors).toEqual([{ path: '/password', message: 'this is one of the most common passwords; choose another' }])
    const accept = await request(t.app).post('/api/v1/invitations/whatever-token/accept').send({ name: 'N', password: 'x'.repeat(12) })
    expect(accept.status).toBe(422)
    expect(accept.body.errors).toEqual([{ path: '/password', message: 'a character or short group repeated is too easy to guess' }])
  })
})
