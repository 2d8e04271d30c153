import { http } from './http'
import type { Assumptions, AssumptionsChanged, ItemList, Job, Project, ProjectOverview, Settings } from './types'

const p = (projectId: string) => `/projects/${encodeURIComponent(projectId)}`

export const projectsApi = {
  list: () => http.get<ItemList<Project>>('/projects'),
  create: (body: { name: string; description?: string }) => http.post<Project>('/projects', body),
  get: (projectId: string) => http.get<Project>(p(projectId)),
  overview: (projectId: string) => http.get<ProjectOverview>(`${p(projectId)}/overview`),
  assumptions: (projectId: string) => http.get<Assumptions>(`${p(projectId)}/assumptions`),
  saveAssumptions: (projectId: string, settings: Partial<Settings>, note?: string) =>
    http.put<AssumptionsChanged>(`${p(projectId)}/assumptions`, { settings, note }),
  job: (projectId: string, jobId: string) => http.get<Job>(`${p(projectId)}/jobs/${encodeURIComponent(jobId)}`),
  jobs: (projectId: string) => http.get<ItemList<Job>>(`${p(projectId)}/jobs`),
}

export const projectPath = p
