export interface FieldError { path: string; message: string }

/** An RFC 9457 problem that the error handler sends as application/problem+json. */
export class HttpProblem extends Error {
  constructor(
    public status: number,
    public title: string,
    public detail?: string,
    public errors?: FieldError[],
    public headers: Record<string, string> = {},
  ) {
    super(detail ?? title)
  }
  get type() { return `/problems/${this.status}` }
}

export const notFound = (what: string) => new HttpProblem(404, 'Not Found', `no such ${what}`)
export const forbidden = (detail: string) => new HttpProblem(403, 'Forbidden', detail)
export const unauthorized = (detail = 'sign in or send an API key') => new HttpProblem(401, 'Unauthorized', detail)
export const conflict = (detail: string) => new HttpProblem(409, 'Conflict', detail)
export const unavailable = (detail = 'the database is unavailable; try again shortly') =>
  new HttpProblem(503, 'Service Unavailable', detail, undefined, { 'Retry-After': '5' })

export const toJsonPointer = (path: readonly PropertyKey[]) => // RFC 6901: escape ~ then /
  path.map((p) => '/' + String(p).replaceAll('~', '~0').replaceAll('/', '~1')).join('')
