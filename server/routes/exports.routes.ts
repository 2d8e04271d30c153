import type { AppDeps } from '../app.ts'
import { route, type Routes } from '../http/route.ts'
import { exportsService, pickColumns } from '../services/exports.service.ts'
import { projectsService } from '../services/projects.service.ts'
import { GalaxyFilterSchema } from '../../shared/schemas/query.schema.ts'
import { ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import { textLine } from '../../shared/schemas/text.ts'

const ExportQuerySchema = GalaxyFilterSchema.extend({
  columns: textLine().max(20000).optional().transform((s) => s?.split(',').map((c) => c.trim()).filter(Boolean))
    .meta({ description: 'comma-separated column names (default: all); galaxy_id is always included' }),
}).strict()

export function exportRoutes(r: Routes, deps: AppDeps) {
  const exportsSvc = exportsService(deps.db)
  const projects = projectsService(deps.db)
  const tag = 'Exports'
  route(r, { method: 'get', path: '/projects/:projectId/exports/galaxies.csv', operationId: 'exportGalaxiesCsv', tag, access: 'viewer', params: ProjectPathSchema, query: ExportQuerySchema,
    summary: 'Dust-corrected fluxes and derived quantities as CSV (streamed, with a commented provenance header)',
    responses: { 200: { description: 'CSV', contentType: 'text/csv' } } },
  async (req, res, { params, query }) => {
    const { columns, ...filter } = query
    const p = await projects.get(params.projectId, req.projectRole!)
    await exportsSvc.csv(res, params.projectId, p.name, filter, pickColumns(columns))
  })
  route(r, { method: 'get', path: '/projects/:projectId/exports/galaxies.vot', operationId: 'exportGalaxiesVotable', tag, access: 'viewer', params: ProjectPathSchema, query: ExportQuerySchema,
    summary: 'The same as a VOTable 1.4 document (IVOA), with units and UCDs on every field',
    responses: { 200: { description: 'VOTable', contentType: 'application/x-votable+xml' } } },
  async (req, res, { params, query }) => {
    const { columns, ...filter } = query
    const p = await projects.get(params.projectId, req.projectRole!)
    await exportsSvc.votable(res, params.projectId, p.name, filter, pickColumns(columns))
  })
}
