import { http, type Query } from './http'
import { projectPath } from './projects'
import { CLASS_FILTERS } from '../../shared/results/registry.ts'
import type { DiagramColumns, GalaxyDetail, GalaxyFilters, GalaxyPage, GalaxyQuery, GalaxyRevisionResults } from './types'

/** Filters as query parameters; shared with the export links so a download matches what is on screen. */
export function filterQuery(filters: GalaxyFilters): Query {
  return {
    ...Object.fromEntries(CLASS_FILTERS.map(({ param }) => [param, filters[param]])),
    q: filters.q, zMin: filters.zMin, zMax: filters.zMax, minSnr: filters.minSnr, range: filters.range,
  }
}

export const galaxiesApi = {
  list: (projectId: string, query: GalaxyQuery, signal?: AbortSignal) =>
    http.get<GalaxyPage>(`${projectPath(projectId)}/galaxies`, {
      query: { ...filterQuery(query), limit: query.limit, cursor: query.cursor, sort: query.sort }, signal,
    }),
  get: (projectId: string, galaxyId: string) =>
    http.get<GalaxyDetail>(`${projectPath(projectId)}/galaxies/${encodeURIComponent(galaxyId)}`),
  resultsAt: (projectId: string, galaxyId: string, revision: number) =>
    http.get<GalaxyRevisionResults>(`${projectPath(projectId)}/galaxies/${encodeURIComponent(galaxyId)}/results/${revision}`),
  diagram: (projectId: string, filters: GalaxyFilters, signal?: AbortSignal) =>
    http.get<DiagramColumns>(`${projectPath(projectId)}/diagram`, { query: filterQuery(filters), signal }),
}
