import { apiUrl } from './http'
import { filterQuery } from './galaxies'
import { projectPath } from './projects'
import type { GalaxyFilters } from './types'

export type ExportFormat = 'csv' | 'vot'

/** A plain link: the browser streams the download itself, with the session cookie. */
export function exportUrl(projectId: string, format: ExportFormat, filters: GalaxyFilters, columns: string[]): string {
  return apiUrl(`${projectPath(projectId)}/exports/galaxies.${format}`, {
    ...filterQuery(filters),
    columns: columns.length ? columns.join(',') : undefined,
  })
}
