import type { RouteDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { assumptionsService } from '../services/assumptions.service.ts'
import { getJob, listJobs } from '../services/jobs.service.ts'
import { JobPathSchema, JobSchema, ListOf, ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import { AssumptionsChangedSchema, AssumptionsChangeSchema, AssumptionsSchema } from '../../shared/schemas/assumptions.schema.ts'

export function assumptionsRoutes(r: Routes, deps: RouteDeps) {
  const assumptions = assumptionsService(deps.galaxy, deps.jobs)
  const tag = 'Assumptions'
  route(r, { method: 'get', path: '/projects/:projectId/assumptions', operationId: 'getAssumptions', tag, summary: 'Current assumptions and every revision', access: 'viewer', params: ProjectPathSchema,
    responses: { 200: { description: 'revisions, newest first', schema: AssumptionsSchema } } },
  async (_req, res, { params }) => { res.json(await assumptions.list(params.projectId)) })

  route(r, { method: 'put', path: '/projects/:projectId/assumptions', operationId: 'changeAssumptions', tag, access: 'analyst', write: true, params: ProjectPathSchema,
    summary: 'Change the assumptions: makes a new revision and recomputes every galaxy in the background',
    body: AssumptionsChangeSchema,
    bodyExample: { settings: { extinctionLaw: 'calzetti00', intrinsicBalmer: 2.86, minSnr: 3 }, note: 'switch to Calzetti 2000 for the dusty nuclei' },
    responses: { 201: { description: 'the new revision and its recompute job', schema: AssumptionsChangedSchema } } },
  async (req, res, { params, body }) => { res.status(201).json(await assumptions.change(requireAuth(req), params.projectId, body.settings, body.note)) })

  route(r, { method: 'get', path: '/projects/:projectId/jobs', operationId: 'listJobs', tag: 'Jobs', summary: 'Background jobs of the project, newest first', access: 'viewer', params: ProjectPathSchema,
    responses: { 200: { description: 'jobs', schema: ListOf(JobSchema) } } },
  async (_req, res, { params }) => { res.json({ items: await listJobs(deps.db, params.projectId) }) })

  route(r, { method: 'get', path: '/projects/:projectId/jobs/:jobId', operationId: 'getJob', tag: 'Jobs', summary: 'One job with its progress (poll this)', access: 'viewer', params: JobPathSchema,
    responses: { 200: { description: 'job', schema: JobSchema } } },
  async (_req, res, { params }) => { res.json(await getJob(deps.db, params.projectId, params.jobId)) })
}
