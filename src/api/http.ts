/**
 * The only place that talks to the server. Every call is same-origin with the session cookie; every
 * non-GET echoes the readable `rg_csrf` cookie in `X-CSRF-Token` (double-submit CSRF defence, see
 * server/API-DESIGN.md). Failures become an `ApiProblem` carrying the RFC 9457 document.
 */

export const API_BASE = '/api/v1'

export interface ProblemFieldError {
  path: string
  message: string
}

export interface ProblemDocument {
  type?: string
  title?: string
  status: number
  detail?: string
  errors?: ProblemFieldError[]
}

export class ApiProblem extends Error {
  readonly status: number
  readonly title: string
  readonly detail?: string
  readonly errors: ProblemFieldError[]

  constructor(doc: ProblemDocument) {
    super(doc.detail || doc.title || `request failed with status ${doc.status}`)
    this.name = 'ApiProblem'
    this.status = doc.status
    this.title = doc.title ?? 'Request failed'
    this.detail = doc.detail
    this.errors = Array.isArray(doc.errors) ? doc.errors : []
  }

  /** Messages grouped by JSON-pointer path (`/email`, `/galaxies/3/lines/hbeta/flux`), for `error-messages`. */
  fieldErrors(): Record<string, string[]> {
    const out: Record<string, string[]> = {}
    for (const e of this.errors) (out[e.path] ??= []).push(e.message)
    return out
  }

  /** A sentence for an alert: the detail when the server gave one, else a plain reading of the status. */
  get summary(): string {
    if (this.detail) return this.detail
    return STATUS_WORDS[this.status] ?? this.title
  }
}

const STATUS_WORDS: Record<number, string> = {
  0: 'The server could not be reached. Check your connection and try again.',
  400: 'The request was malformed.',
  401: 'You are not signed in, or your session has expired.',
  403: 'Your role in this project does not allow this.',
  404: 'Not found, or not shared with you.',
  409: 'This conflicts with something that already exists.',
  413: 'That is too large for the server to accept.',
  415: 'The server does not accept this kind of file.',
  422: 'Some values are not valid.',
  429: 'Too many requests. Wait a moment and try again.',
  500: 'The server ran into an error. Try again later.',
  502: 'The server is not responding.',
  503: 'The service is temporarily unavailable.',
}

/** Value of a readable cookie, or undefined. */
export function readCookie(name: string): string | undefined {
  if (typeof document === 'undefined') return undefined
  for (const part of document.cookie.split(';')) {
    const [k, ...v] = part.trim().split('=')
    if (k === name) return decodeURIComponent(v.join('='))
  }
  return undefined
}

export function csrfHeaders(method: string): Record<string, string> {
  if (method === 'GET' || method === 'HEAD') return {}
  const token = readCookie('rg_csrf')
  return token ? { 'X-CSRF-Token': token } : {}
}

export type QueryValue = string | number | boolean | null | undefined | Array<string | number>
export type Query = Record<string, QueryValue>

/** Query string without empty values; arrays repeat the key (`range=a&range=b`). */
export function toQueryString(query?: Query): string {
  if (!query) return ''
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(query)) {
    if (value === undefined || value === null || value === '') continue
    if (Array.isArray(value)) for (const v of value) params.append(key, String(v))
    else params.append(key, String(value))
  }
  const s = params.toString()
  return s ? `?${s}` : ''
}

export function apiUrl(path: string, query?: Query): string {
  return `${API_BASE}${path}${toQueryString(query)}`
}

/** Turn a non-OK response into an ApiProblem, tolerating bodies that are not problem documents. */
export async function problemFromResponse(res: Response): Promise<ApiProblem> {
  let doc: ProblemDocument = { status: res.status, title: res.statusText }
  try {
    const body = await res.json()
    if (body && typeof body === 'object') doc = { ...doc, ...body, status: res.status }
  } catch {
    // not JSON (a proxy page, an empty body): keep the status line
  }
  return new ApiProblem(doc)
}

export interface RequestOptions {
  query?: Query
  body?: unknown
  signal?: AbortSignal
  headers?: Record<string, string>
}

export async function request<T>(method: string, path: string, options: RequestOptions = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: 'application/json', ...csrfHeaders(method), ...options.headers }
  let body: BodyInit | undefined
  if (options.body !== undefined) {
    headers['Content-Type'] = 'application/json'
    body = JSON.stringify(options.body)
  }
  let res: Response
  try {
    res = await fetch(apiUrl(path, options.query), {
      method, headers, body, credentials: 'same-origin', signal: options.signal,
    })
  } catch (e) {
    if (e instanceof DOMException && e.name === 'AbortError') throw e
    throw new ApiProblem({ status: 0, title: 'Network error' })
  }
  if (!res.ok) throw await problemFromResponse(res)
  if (res.status === 204) return undefined as T
  const text = await res.text()
  return (text ? JSON.parse(text) : undefined) as T
}

export const http = {
  get: <T>(path: string, options?: RequestOptions) => request<T>('GET', path, options),
  post: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('POST', path, { ...options, body }),
  put: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PUT', path, { ...options, body }),
  patch: <T>(path: string, body?: unknown, options?: RequestOptions) => request<T>('PATCH', path, { ...options, body }),
  delete: <T = void>(path: string, options?: RequestOptions) => request<T>('DELETE', path, options),
}

/**
 * POST a multipart form with XMLHttpRequest rather than fetch: fetch reports no upload progress, and
 * a survey table or a zip of spectra can take a while on a slow link. Same cookies, CSRF header and
 * problem documents as `request`.
 */
export function postForm<T>(path: string, form: FormData, onProgress: (fraction: number) => void): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', apiUrl(path))
    xhr.withCredentials = true
    xhr.setRequestHeader('Accept', 'application/json')
    for (const [k, v] of Object.entries(csrfHeaders('POST'))) xhr.setRequestHeader(k, v)
    xhr.upload.onprogress = (e) => { if (e.lengthComputable) onProgress(e.loaded / e.total) }
    xhr.onerror = () => reject(new ApiProblem({ status: 0, title: 'Network error' }))
    xhr.onload = () => {
      let body: unknown
      try { body = xhr.responseText ? JSON.parse(xhr.responseText) : undefined } catch { body = undefined }
      if (xhr.status >= 200 && xhr.status < 300) { onProgress(1); resolve(body as T); return }
      const doc = body && typeof body === 'object' ? body : {}
      reject(new ApiProblem({ title: xhr.statusText, ...doc, status: xhr.status }))
    }
    xhr.send(form)
  })
}
