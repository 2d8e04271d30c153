import { afterEach, describe, expect, it, vi } from 'vitest'
import { ApiProblem, http, toQueryString } from '../../../../src/api/http'

afterEach(() => {
  vi.unstubAllGlobals()
  document.cookie = 'rg_csrf=; expires=Thu, 01 Jan 1970 00:00:00 GMT; path=/'
})

async function failure(p: Promise<unknown>): Promise<ApiProblem> {
  try { await p } catch (e) { return e as ApiProblem }
  throw new Error('the request was expected to fail')
}

function jsonResponse(status: number, body: unknown, type = 'application/json') {
  return new Response(body === undefined ? null : JSON.stringify(body), { status, headers: { 'Content-Type': type } })
}

describe('toQueryString', () => {
  it('drops empty values and repeats array keys', () => {
    expect(toQueryString({ a: 1, b: '', c: null, d: undefined, range: ['ebv:0:1', 'redshift::0.1'] }))
      .toBe('?a=1&range=ebv%3A0%3A1&range=redshift%3A%3A0.1')
    expect(toQueryString({})).toBe('')
  })
})

describe('http', () => {
  it('echoes the rg_csrf cookie on non-GET requests only', async () => {
    document.cookie = 'rg_csrf=tok123; path=/'
    const fetchMock = vi.fn(async () => jsonResponse(200, { ok: true }))
    vi.stubGlobal('fetch', fetchMock)
    await http.post('/projects', { name: 'x' })
    await http.get('/projects')
    const [, postInit] = fetchMock.mock.calls[0] as unknown as [string, RequestInit]
    const [, getInit] = fetchMock.mock.calls[1] as unknown as [string, RequestInit]
    expect((postInit.headers as Record<string, string>)['X-CSRF-Token']).toBe('tok123')
    expect(postInit.credentials).toBe('same-origin')
    expect((getInit.headers as Record<string, string>)['X-CSRF-Token']).toBeUndefined()
  })

  it('turns a problem document into an ApiProblem with field errors by JSON pointer', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => jsonResponse(422, {
      type: 'about:blank', title: 'Unprocessable Content', status: 422, detail: 'the request has invalid values',
      errors: [{ path: '/email', message: 'invalid email' }, { path: '/email', message: 'too long' }, { path: '/password', message: 'at least 10 characters' }],
    }, 'application/problem+json')))
    const err = await failure(http.post('/auth/sign-up', {}))
    expect(err).toBeInstanceOf(ApiProblem)
    expect(err.status).toBe(422)
    expect(err.fieldErrors()).toEqual({ '/email': ['invalid email', 'too long'], '/password': ['at least 10 characters'] })
    expect(err.summary).toBe('the request has invalid values')
  })

  it('survives a non-JSON error body and a network failure', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => new Response('<html>bad gateway</html>', { status: 502, statusText: 'Bad Gateway' })))
    const e1 = await failure(http.get('/me'))
    expect(e1).toBeInstanceOf(ApiProblem)
    expect(e1.status).toBe(502)
    vi.stubGlobal('fetch', vi.fn(async () => { throw new TypeError('failed to fetch') }))
    const e2 = await failure(http.get('/me'))
    expect(e2.status).toBe(0)
    expect(e2.summary).toMatch(/could not be reached/)
  })

  it('returns undefined for 204', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => new Response(null, { status: 204 })))
    await expect(http.delete('/me/api-keys/1')).resolves.toBeUndefined()
  })
})
