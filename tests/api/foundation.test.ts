import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { startTestApp, type TestApp } from '../helpers/app.ts'

let t: TestApp
beforeAll(async () => { t = await startTestApp() })
afterAll(async () => { await t.close() })

describe('GET /api/health', () => {
  it('answers 200 with db ok and the version', async () => {
    const res = await request(t.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ status: 'ok', db: 'ok' })
    expect(res.body.version).toMatch(/^\d+\.\d+\.\d+/)
  })
})

describe('problem documents', () => {
  it('an unknown API route is a 404 problem', async () => {
    const res = await request(t.app).get('/api/v1/no-such-thing')
    expect([res.status, res.type]).toEqual([404, 'application/problem+json'])
    expect(res.body).toMatchObject({ status: 404, title: 'Not Found', errors: [] })
  })
  it('malformed JSON is a 400 problem, not a 500', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').set('content-type', 'application/json').send('{"email": ')
    expect([res.status, res.type]).toEqual([400, 'application/problem+json'])
  })
  it('a wrong media type is a 415', async () => {
    const res = await request(t.app).post('/api/v1/auth/sign-in').set('content-type', 'text/plain').send('email=a')
    expect(res.status).toBe(415)
  })
})

describe('security headers', () => {
  it('sends a Content-Security-Policy without inline scripts', async () => {
    const res = await request(t.app).get('/api/health')
    const csp = res.headers['content-security-policy'] as string
    expect(csp).toMatch(/script-src 'self'/)
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/)
    expect(res.headers['x-powered-by']).toBeUndefined()
  })
})
