import { http } from './http'
import { projectPath } from './projects'
import type { Invitation, ItemList, Member, Role } from './types'

export const teamApi = {
  members: (projectId: string) => http.get<ItemList<Member>>(`${projectPath(projectId)}/members`),
  setRole: (projectId: string, userId: string, role: Role) =>
    http.patch<Member>(`${projectPath(projectId)}/members/${encodeURIComponent(userId)}`, { role }),
  removeMember: (projectId: string, userId: string) => http.delete(`${projectPath(projectId)}/members/${encodeURIComponent(userId)}`),
  invitations: (projectId: string) => http.get<ItemList<Invitation>>(`${projectPath(projectId)}/invitations`),
  invite: (projectId: string, email: string, role: Role) => http.post<Invitation>(`${projectPath(projectId)}/invitations`, { email, role }),
  revokeInvitation: (projectId: string, id: string) => http.delete(`${projectPath(projectId)}/invitations/${encodeURIComponent(id)}`),
}

/** One entry of a project's audit log (owners only). */
export interface AuditEvent {
  id: number
  action: string
  target: string | null
  details: Record<string, unknown>
  createdAt: string
  actor: { id: string; name: string | null; email: string | null } | null
}

export const auditApi = {
  list: (projectId: string) => http.get<ItemList<AuditEvent>>(`${projectPath(projectId)}/audit`),
}
