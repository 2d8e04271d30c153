import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { spawn, spawnSync } from 'node:child_process'
import { existsSync, readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { PROJECT_ROOT, loadConfig } from '../../server/config.ts'
import { freePort } from '../../server/db/embedded-postgres.ts'
import { freshDatabaseUrl } from '../helpers/db.ts'
import jwt from 'jsonwebtoken'
import { connect } from '../../server/db/client.ts'
import { registerMailbox, signedInAgent, startTestApp, type TestApp } from '../helpers/app.ts'
import { galaxy } from '../helpers/fixtures.ts'

let t: TestApp
beforeAll(async () => { t = await startTestApp() })
afterAll(async () => { await t.close() })

describe('security', () => {
  it('refuses to start in production without JWT_SECRET', () => {
    expect(() => loadConfig({ NODE_ENV: 'production' })).toThrow(/JWT_SECRET/)
    const r = spawnSync(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'server', 'cli', 'start.ts')], {
      env: { ...process.env, NODE_ENV: 'production', JWT_SECRET: '', DATABASE_URL: 'postgres://unused@127.0.0.1:1/x', BUILD_CLIENT: '0' }, encoding: 'utf8', timeout: 30_000,
    })
    expect(r.status).not.toBe(0)
    expect(r.stderr + r.stdout).toMatch(/JWT_SECRET must be set/)
  })

  it('rate-limits sign-in per address with 429 and Retry-After', async () => {
    const limited = await startTestApp({ AUTH_RATE_LIMIT: '5' })
    let res
    for (let i = 0; i < 7; i++) res = await request(limited.app).post('/api/v1/auth/sign-in').send({ email: `nobody${i}@example.org`, password: 'whatever-long' })
    expect(res!.status).toBe(429)
    expect(Number(res!.headers['retry-after'])).toBeGreaterThan(0)
    expect(res!.type).toBe('application/problem+json')
    await limited.close()
  })

  it('keeps user text out of SQL: injection attempts are plain values', async () => {
    const a = await signedInAgent(t.app, 'sql@example.org')
    const p = (await a.agent.post('/api/v1/projects').set('X-CSRF-Token', a.csrf).send({ name: 'inject' })).body.id
    const evil = "x'); drop table galaxies; --"
    const res = await a.agent.post(`/api/v1/projects/${p}/galaxies/batch`).set('X-CSRF-Token', a.csrf).send({ galaxies: [galaxy(evil), galaxy('plain')] })
    expect(res.status).toBe(200)
    const one = await a.agent.get(`/api/v1/projects/${p}/galaxies/${encodeURIComponent(evil)}`)
    expect(one.body.id).toBe(evil)
    const q = await a.agent.get(`/api/v1/projects/${p}/galaxies`).query({ q: "' or 1=1 --" })
    expect([q.status, q.body.total]).toEqual([200, 0])
    const pct = await a.agent.get(`/api/v1/projects/${p}/galaxies`).query({ q: '%' })
    expect(pct.body.total).toBe(0) // % is a literal character, not a wildcard
    expect((await a.agent.get(`/api/v1/projects/${p}/galaxies`).query({ range: 'ebv;drop:0:1' })).status).toBe(422)
  })

  it('cross-project ID guessing answers 404 for projects, galaxies, intakes and jobs', async () => {
    const a = await signedInAgent(t.app, 'guess-a@example.org')
    const b = await signedInAgent(t.app, 'guess-b@example.org')
    const p = (await a.agent.post('/api/v1/projects').set('X-CSRF-Token', a.csrf).send({ name: 'private' })).body.id
    const up = await a.agent.post(`/api/v1/projects/${p}/galaxies/batch`).set('X-CSRF-Token', a.csrf).send({ galaxies: [galaxy('G-1')] })
    for (const path of ['', '/galaxies', '/galaxies/G-1', `/intakes/${up.body.intake.id}`, '/diagram', '/exports/galaxies.csv', '/assumptions', '/members']) {
      const res = await b.agent.get(`/api/v1/projects/${p}${path}`)
      expect(res.status, path).toBe(404)
      expect(res.body.detail).toBe('no such project')
    }
    // the same answer as a project that does not exist at all
    const none = await b.agent.get('/api/v1/projects/6f1c1b64-52a0-4d3e-9a43-7c1e0f2b9a11')
    expect(none.body).toEqual((await b.agent.get(`/api/v1/projects/${p}`)).body)
  })

  it('the client bundle carries no server secret or connection string', () => {
    const dir = join(PROJECT_ROOT, 'dist', 'assets')
    if (!existsSync(dir)) return // built by the e2e setup; checked there too
    const secret = loadConfig({ ...process.env, JWT_SECRET: undefined, DATA_DIR: join(PROJECT_ROOT, '.data') }).jwtSecret
    for (const f of readdirSync(dir).filter((n) => n.endsWith('.js'))) {
      const text = readFileSync(join(dir, f), 'utf8')
      expect(text).not.toContain(secret)
      expect(text).not.toMatch(/postgres(ql)?:\/\/[^`'"]*@/)
      expect(text).not.toMatch(/JWT_SECRET|DATABASE_URL|SMTP_URL/)
    }
  })

  it('never logs passwords or API keys, even at debug level', async () => {
    const port = await freePort()
    const databaseUrl = await freshDatabaseUrl()
    const child = spawn(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'server', 'cli', 'start.ts')], {
      env: { ...process.env, DATABASE_URL: databaseUrl, PORT: String(port), SEED_DEMO: '0', BUILD_CLIENT: '0', JWT_SECRET: 'log-test', LOG_LEVEL: 'debug' },
    })
    const outboxDb = connect(databaseUrl, 2) // the server's own mail catcher stores what it sends here
    let out = ''
    child.stdout.on('data', (d) => { out += d }); child.stderr.on('data', (d) => { out += d })
    const base = `http://127.0.0.1:${port}`
    registerMailbox(base, outboxDb)
    for (let i = 0; i < 100; i++) { try { if ((await fetch(`${base}/api/health`)).ok) break } catch { /* starting */ } await new Promise((ok) => setTimeout(ok, 200)) }
    const password = 'Pa55word-that-must-not-leak'
    let key = ''
    try {
      const a = await signedInAgent(base as never, 'logs@example.org', password)
      key = (await a.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', a.csrf).send({ name: 'k', access: 'read' })).body.key as string
      await request(base).get('/api/v1/me').set('Authorization', `Bearer ${key}`)
      await request(base).post('/api/v1/auth/sign-in').send({ email: 'logs@example.org', password: 'wrong-' + password })
      await request(base).get('/api/v1/me').set('Authorization', `Bearer ${key}x`)
    } finally { // never leave the server running when a step fails
      child.kill('SIGTERM')
      await new Promise((ok) => child.once('exit', ok))
      await outboxDb.$client.end()
    }
    expect(key).toMatch(/^rg_/)
    expect(out).toMatch(/request/) // debug request lines were written
    expect(out).not.toContain(password)
    expect(out).not.toContain(key)
    expect(out).not.toContain(key.slice(12))
  }, 60_000)

  it('a signed session token must carry every claim: a non-UUID subject or no expiry is no session (401, never 500)', async () => {
    const a = await signedInAgent(t.app, 'claims@example.org')
    const sign = (claims: object, opts: jwt.SignOptions = {}) => jwt.sign(claims, 'test-secret-not-for-production', { algorithm: 'HS256', ...opts })
    const asCookie = (token: string) => request(t.app).get('/api/v1/me').set('Cookie', `rg_session=${token}`)
    const good = sign({ sub: a.userId, csrf: 'c', t: Date.now() }, { expiresIn: 60 })
    expect((await asCookie(good)).status).toBe(200)
    const notUuid = await asCookie(sign({ sub: "1' or '1'='1", csrf: 'c', t: Date.now() }, { expiresIn: 60 }))
    expect(notUuid.status).toBe(401)
    expect(notUuid.type).toBe('application/problem+json')
    expect((await asCookie(sign({ sub: a.userId, csrf: 'c', t: Date.now() }))).status).toBe(401) // no exp: would never expire
    expect((await asCookie(sign({ sub: a.userId, t: Date.now() }, { expiresIn: 60 }))).status).toBe(401) // no CSRF secret
    expect((await asCookie(sign({ sub: a.userId, csrf: 'c' }, { expiresIn: 60 }))).status).toBe(401) // no issue time: sign-out could not void it
  })

  it('answers for a signed-in caller or a key are never cached (Cache-Control: no-store)', async () => {
    const a = await signedInAgent(t.app, 'cache@example.org')
    const key = (await a.agent.post('/api/v1/me/api-keys').set('X-CSRF-Token', a.csrf).send({ name: 'k', access: 'read' })).body.key as string
    const answers = {
      me: await a.agent.get('/api/v1/me'), projects: await a.agent.get('/api/v1/projects'),
      meByKey: await request(t.app).get('/api/v1/me').set('Authorization', `Bearer ${key}`),
      signIn: await request(t.app).post('/api/v1/auth/sign-in').send({ email: 'cache@example.org', password: 'correct horse battery' }),
    }
    for (const [name, res] of Object.entries(answers)) expect(res.headers['cache-control'], name).toBe('no-store')
  })

  it('account routes refuse a large body before parsing it: 413 for 1 MB at sign-in', async () => {
    const big = { email: 'x@example.org', password: 'p'.repeat(1024 * 1024) }
    for (const path of ['/api/v1/auth/sign-in', '/api/v1/auth/sign-up', '/api/v1/auth/password-reset', '/api/v1/invitations/some-token-here/accept']) {
      const res = await request(t.app).post(path).send(big)
      expect(res.status, path).toBe(413)
      expect(res.type).toBe('application/problem+json')
      expect(res.body).toMatchObject({ status: 413, title: 'Content Too Large' })
    }
    // a signed-in batch may still be large
    const a = await signedInAgent(t.app, 'big-batch@example.org')
    const p = (await a.agent.post('/api/v1/projects').set('X-CSRF-Token', a.csrf).send({ name: 'big' })).body.id
    const many = Array.from({ length: 400 }, (_, i) => galaxy(`B-${i}`))
    expect(JSON.stringify({ galaxies: many }).length).toBeGreaterThan(16 * 1024)
    expect((await a.agent.post(`/api/v1/projects/${p}/galaxies/batch`).set('X-CSRF-Token', a.csrf).send({ galaxies: many })).status).toBe(200)
  })

  it('behind a trusted proxy that says https: Secure cookies and HSTS; an untrusted X-Forwarded-Proto changes nothing', async () => {
    const proxied = await startTestApp({ TRUST_PROXY: 'loopback' })
    try {
      await request(proxied.app).post('/api/v1/auth/sign-up').send({ email: 'tls@example.org', password: 'correct horse battery', name: 'T' })
      const body = { email: 'tls@example.org', password: 'correct horse battery' }
      const overTls = await request(proxied.app).post('/api/v1/auth/sign-in').set('X-Forwarded-Proto', 'https').send(body)
      expect(overTls.status).toBe(200)
      const cookies = ([] as string[]).concat(overTls.headers['set-cookie'])
      expect(cookies).toHaveLength(2)
      for (const c of cookies) expect(c).toMatch(/;\s*Secure/i)
      expect(overTls.headers['strict-transport-security']).toBe('max-age=31536000; includeSubDomains')
      const plain = await request(proxied.app).post('/api/v1/auth/sign-in').send(body)
      expect(([] as string[]).concat(plain.headers['set-cookie']).some((c) => /Secure/i.test(c))).toBe(false)
      expect(plain.headers['strict-transport-security']).toBeUndefined()
    } finally { await proxied.close() }
    await request(t.app).post('/api/v1/auth/sign-up').send({ email: 'tls@example.org', password: 'correct horse battery', name: 'T' })
    const untrusted = await request(t.app).post('/api/v1/auth/sign-in').set('X-Forwarded-Proto', 'https').send({ email: 'tls@example.org', password: 'correct horse battery' })
    expect(untrusted.status).toBe(200)
    expect(([] as string[]).concat(untrusted.headers['set-cookie']).some((c) => /Secure/i.test(c))).toBe(false)
    expect(untrusted.headers['strict-transport-security']).toBeUndefined()
  })

  it('without TRUST_PROXY a rotated X-Forwarded-For does not escape the per-address sign-in limit', async () => {
    const limited = await startTestApp({ AUTH_RATE_LIMIT: '5' })
    try {
      const statuses: number[] = []
      for (let i = 0; i < 7; i++) {
        statuses.push((await request(limited.app).post('/api/v1/auth/sign-in').set('X-Forwarded-For', `198.51.100.${i + 1}`).send({ email: `n${i}@example.org`, password: 'whatever-long' })).status)
      }
      expect(statuses).toEqual([401, 401, 401, 401, 401, 429, 429])
    } finally { await limited.close() }
    expect(loadConfig({ ...process.env, TRUST_PROXY: '' }).trustProxy).toBe(false)
    expect(loadConfig({ ...process.env, TRUST_PROXY: '1' }).trustProxy).toBe(1)
    expect(loadConfig({ ...process.env, TRUST_PROXY: 'loopback, 10.0.0.0/8' }).trustProxy).toEqual(['loopback', '10.0.0.0/8'])
    expect(() => loadConfig({ ...process.env, TRUST_PROXY: 'true' })).toThrow(/TRUST_PROXY/)
  })
})
