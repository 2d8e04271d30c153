import { ApiProblem, problemFromResponse } from './http'

/** The OpenAPI document lives outside /api/v1, so it does not go through `request`. */
export async function fetchOpenApi(): Promise<Record<string, unknown>> {
  let res: Response
  try {
    res = await fetch('/api/openapi.json', { credentials: 'same-origin', headers: { Accept: 'application/json' } })
  } catch {
    throw new ApiProblem({ status: 0, title: 'Network error' })
  }
  if (!res.ok) throw await problemFromResponse(res)
  return res.json()
}
