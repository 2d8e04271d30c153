import { decodeDiagramColumns, DIAGRAM_COLUMNS_TYPE } from '../../shared/diagram-columns.ts'
import { prepareDiagramArrays, prepareTypedColumns, type DiagramArrays } from '../lib/diagrams/diagram-arrays'
import { filterQuery } from './galaxies'
import { ApiProblem, apiUrl, problemFromResponse } from './http'
import { projectPath } from './projects'
import type { DiagramColumns, GalaxyFilters } from './types'

/**
 * A project's diagram columns as the panels draw them. The binary form is asked for first: it is
 * half the bytes of the JSON and decodes into typed arrays without parsing a million numbers, which
 * for 10⁵ galaxies is the difference between a fraction of a second and over a second here.
 */
export async function loadDiagramArrays(projectId: string, filters: GalaxyFilters, signal?: AbortSignal): Promise<DiagramArrays> {
  let res: Response
  try {
    res = await fetch(apiUrl(`${projectPath(projectId)}/diagram`, filterQuery(filters)), {
      headers: { Accept: `${DIAGRAM_COLUMNS_TYPE}, application/json;q=0.5` }, credentials: 'same-origin', signal,
    })
  } catch (e) {
    if (e instanceof DOMException && e.name === 'AbortError') throw e
    throw new ApiProblem({ status: 0, title: 'Network error' })
  }
  if (!res.ok) throw await problemFromResponse(res)
  if (res.headers.get('content-type')?.startsWith(DIAGRAM_COLUMNS_TYPE)) {
    try {
      return prepareTypedColumns(decodeDiagramColumns(await res.arrayBuffer()))
    } catch (e) {
      if (e instanceof DOMException && e.name === 'AbortError') throw e
      throw new ApiProblem({ status: 0, title: 'The diagram data could not be read', detail: e instanceof Error ? e.message : undefined })
    }
  }
  return prepareDiagramArrays((await res.json()) as DiagramColumns)
}
