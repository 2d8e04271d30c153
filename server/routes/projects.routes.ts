import type { AppDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { forbidden } from '../http/problem.ts'
import { accountsService } from '../services/accounts.service.ts'
import { projectsService } from '../services/projects.service.ts'
import { overview } from '../services/overview.service.ts'
import { ProjectOverviewSchema } from '../../shared/results/responses.ts'
import {
  AuditEventSchema, InvitationCreateSchema, InvitationPathSchema, InvitationSchema, IntakeSchema, ListOf, MemberPathSchema, MemberSchema,
  ProjectCreateSchema, ProjectPathSchema, ProjectSchema, ProjectUpdateSchema, RoleChangeSchema,
} from '../../shared/schemas/api.schema.ts'

export function projectsRoutes(r: Routes, deps: AppDeps) {
  const projects = projectsService(deps.db)
  const accounts = accountsService(deps.db, deps.mailer, deps.config.appUrl)
  const tag = 'Projects'
  const params = ProjectPathSchema

  route(r, { method: 'get', path: '/projects', operationId: 'listProjects', tag, summary: 'Your projects', access: 'user', responses: { 200: { description: 'projects', schema: ListOf(ProjectSchema) } } },
    async (req, res) => { res.json({ items: await projects.list(requireAuth(req)) }) })

  route(r, { method: 'post', path: '/projects', operationId: 'createProject', tag, summary: 'Create a project; you become its owner', access: 'user', write: true, body: ProjectCreateSchema,
    responses: { 201: { description: 'created', schema: ProjectSchema } } },
  async (req, res, { body }) => {
    const auth = requireAuth(req)
    if (auth.key) throw forbidden('create projects from the dashboard, not with an API key')
    res.status(201).json(await projects.create(auth, body))
  })

  route(r, { method: 'get', path: '/projects/:projectId', operationId: 'getProject', tag, summary: 'One project', access: 'viewer', params, responses: { 200: { description: 'project', schema: ProjectSchema } } },
    async (req, res, { params: p }) => { res.json(await projects.get(p.projectId, req.projectRole!)) })

  route(r, { method: 'patch', path: '/projects/:projectId', operationId: 'updateProject', tag, summary: 'Rename or describe a project', access: 'owner', write: true, params, body: ProjectUpdateSchema,
    responses: { 200: { description: 'updated', schema: ProjectSchema } } },
  async (req, res, { params: p, body }) => { res.json(await projects.update(requireAuth(req), p.projectId, req.projectRole!, body)) })

  route(r, { method: 'delete', path: '/projects/:projectId', operationId: 'deleteProject', tag, summary: 'Delete a project and all its data', access: 'owner', write: true, params,
    responses: { 204: { description: 'deleted' } } },
  async (req, res, { params: p }) => { await projects.remove(requireAuth(req), p.projectId); res.status(204).end() })

  route(r, { method: 'get', path: '/projects/:projectId/overview', operationId: 'getProjectOverview', tag, summary: 'Counts per class, histograms, latest intakes', access: 'viewer', params,
    responses: { 200: { description: 'overview', schema: ProjectOverviewSchema } } },
  async (req, res, { params: p }) => { res.json(await overview(deps.db, p.projectId, req.projectRole!)) })

  route(r, { method: 'get', path: '/projects/:projectId/intakes', operationId: 'listIntakes', tag: 'Intake', summary: 'Intake history', access: 'viewer', params,
    responses: { 200: { description: 'intakes', schema: ListOf(IntakeSchema) } } },
  async (_req, res, { params: p }) => { res.json({ items: await projects.intakes(p.projectId) }) })

  const team = 'Team'
  route(r, { method: 'get', path: '/projects/:projectId/members', operationId: 'listMembers', tag: team, summary: 'Members and roles', access: 'viewer', params,
    responses: { 200: { description: 'members', schema: ListOf(MemberSchema) } } },
  async (_req, res, { params: p }) => { res.json({ items: await projects.members(p.projectId) }) })

  route(r, { method: 'patch', path: '/projects/:projectId/members/:userId', operationId: 'changeMemberRole', tag: team, summary: 'Change a member\'s role', access: 'owner', write: true,
    params: MemberPathSchema, body: RoleChangeSchema, responses: { 204: { description: 'changed' } } },
  async (req, res, { params: p, body }) => { await projects.setRole(requireAuth(req), p.projectId, p.userId, body.role); res.status(204).end() })

  route(r, { method: 'delete', path: '/projects/:projectId/members/:userId', operationId: 'removeMember', tag: team, summary: 'Remove a member', access: 'owner', write: true,
    params: MemberPathSchema, responses: { 204: { description: 'removed' } } },
  async (req, res, { params: p }) => { await projects.removeMember(requireAuth(req), p.projectId, p.userId); res.status(204).end() })

  route(r, { method: 'get', path: '/projects/:projectId/invitations', operationId: 'listInvitations', tag: team, summary: 'Open and accepted invitations', access: 'owner', params,
    responses: { 200: { description: 'invitations', schema: ListOf(InvitationSchema) } } },
  async (_req, res, { params: p }) => { res.json({ items: await accounts.listInvitations(p.projectId) }) })

  route(r, { method: 'post', path: '/projects/:projectId/invitations', operationId: 'createInvitation', tag: team, summary: 'Invite someone by e-mail', access: 'owner', write: true,
    params, body: InvitationCreateSchema, responses: { 201: { description: 'sent', schema: InvitationSchema } } },
  async (req, res, { params: p, body }) => { res.status(201).json(await accounts.invite(requireAuth(req), p.projectId, body.email, body.role)) })

  route(r, { method: 'delete', path: '/projects/:projectId/invitations/:id', operationId: 'withdrawInvitation', tag: team, summary: 'Withdraw an invitation', access: 'owner', write: true,
    params: InvitationPathSchema, responses: { 204: { description: 'withdrawn' } } },
  async (req, res, { params: p }) => { await accounts.revokeInvitation(requireAuth(req), p.projectId, p.id); res.status(204).end() })

  route(r, { method: 'get', path: '/projects/:projectId/audit', operationId: 'listAuditEvents', tag, summary: 'Audit log of the project', access: 'owner', params,
    responses: { 200: { description: 'the newest 200 events: the project\'s own, and sign-ins and resets of its members', schema: ListOf(AuditEventSchema) } } },
  async (_req, res, { params: p }) => { res.json({ items: await projects.auditLog(p.projectId) }) })
}
