import { http, postForm } from './http'
import { projectPath } from './projects'
import type { ColumnMapping, CommitAnswer, CsvUpload, GalaxyVersion, Intake, IntakeDetail, ItemList, NonDetection, OnExisting, UndoAnswer, ValidationReport } from './types'

export interface CommitOptions { mapping: ColumnMapping; fluxUnit: number; nonDetection: NonDetection; saveMappingAs?: string; onExisting?: OnExisting }

/** Upload a CSV, with progress (a large survey table can take a while on a slow link). */
function uploadCsv(projectId: string, file: File, onProgress: (fraction: number) => void): Promise<CsvUpload> {
  const form = new FormData()
  form.append('file', file)
  return postForm<CsvUpload>(`${projectPath(projectId)}/intakes/csv`, form, onProgress)
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
