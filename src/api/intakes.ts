import { ApiProblem, apiUrl, csrfHeaders, http } from './http'
import { projectPath } from './projects'
import type { ColumnMapping, CommitAnswer, CsvUpload, GalaxyVersion, Intake, IntakeDetail, ItemList, NonDetection, OnExisting, UndoAnswer, ValidationReport } from './types'

export interface CommitOptions { mapping: ColumnMapping; fluxUnit: number; nonDetection: NonDetection; saveMappingAs?: string; onExisting?: OnExisting }

/**
 * Upload a CSV with XMLHttpRequest rather than fetch: fetch gives no upload progress, and a large
 * survey table can take a while on a slow link.
 */
function uploadCsv(projectId: string, file: File, onProgress: (fraction: number) => void): Promise<CsvUpload> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', apiUrl(`${projectPath(projectId)}/intakes/csv`))
    xhr.withCredentials = true
    xhr.setRequestHeader('Accept', 'application/json')
    for (const [k, v] of Object.entries(csrfHeaders('POST'))) xhr.setRequestHeader(k, v)
    xhr.upload.onprogress = (e) => { if (e.lengthComputable) onProgress(e.loaded / e.total) }
    xhr.onerror = () => reject(new ApiProblem({ status: 0, title: 'Network error' }))
    xhr.onload = () => {
      let body: unknown
      try { body = xhr.responseText ? JSON.parse(xhr.responseText) : undefined } catch { body = undefined }
      if (xhr.status >= 200 && xhr.status < 300) { onProgress(1); resolve(body as CsvUpload); return }
      const doc = body && typeof body === 'object' ? body : {}
      reject(new ApiProblem({ title: xhr.statusText, ...doc, status: xhr.status }))
    }
    const form = new FormData()
    form.append('file', file)
    xhr.send(form)
  })
}

export const intakesApi = {
  list: (projectId: string) => http.get<ItemList<Intake>>(`${projectPath(projectId)}/intakes`),
  get: (projectId: string, intakeId: string) => http.get<IntakeDetail>(`${projectPath(projectId)}/intakes/${encodeURIComponent(intakeId)}`),
  uploadCsv,
  validate: (projectId: string, intakeId: string, options: CommitOptions) =>
    http.post<ValidationReport>(`${projectPath(projectId)}/intakes/${encodeURIComponent(intakeId)}/validate`, options),
  /** Small files are stored within the request; larger ones answer with a running `intake` job to follow. */
  commit: (projectId: string, intakeId: string, options: CommitOptions) =>
    http.post<CommitAnswer>(`${projectPath(projectId)}/intakes/${encodeURIComponent(intakeId)}/commit`, options),
  undo: (projectId: string, intakeId: string) =>
    http.post<UndoAnswer>(`${projectPath(projectId)}/intakes/${encodeURIComponent(intakeId)}/undo`, {}),
  versions: (projectId: string, galaxyId: string) =>
    http.get<ItemList<GalaxyVersion>>(`${projectPath(projectId)}/galaxies/${encodeURIComponent(galaxyId)}/versions`),
}
