import { http } from './http'
import { projectPath } from './projects'
import type { AuditEvent, Invitation, ItemList, Member, Role } from './types'

export type { AuditEvent }

export const teamApi = {
  members: (projectId: string) => http.get<ItemList<Member>>(`${projectPath(projectId)}/members`),
  setRole: (projectId: string, userId: string, role: Role) =>
    http.patch<void>(`${projectPath(projectId)}/members/${encodeURIComponent(userId)}`, { role }),
  removeMember: (projectId: string, userId: string) => http.delete(`${projectPath(projectId)}/members/${encodeURIComponent(userId)}`),
  invitations: (projectId: string) => http.get<ItemList<Invitation>>(`${projectPath(projectId)}/invitations`),
  invite: (projectId: string, email: string, role: Role) => http.post<Invitation>(`${projectPath(projectId)}/invitations`, { email, role }),
  revokeInvitation: (projectId: string, id: string) => http.delete(`${projectPath(projectId)}/invitations/${encodeURIComponent(id)}`),
}

export const auditApi = {
  list: (projectId: string) => http.get<ItemList<AuditEvent>>(`${projectPath(projectId)}/audit`),
}
