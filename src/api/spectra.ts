import { apiUrl, http, postForm } from './http'
import { projectPath } from './projects'
import type {
  FitQualityPage, FitQualityQuery, FitSettings, GalaxySpectrum, SpectrumUploadAnswer, SpectrumUploadDefaults,
} from './spectra-types'

export type * from './spectra-types'

const galaxyPath = (projectId: string, galaxyId: string) => `${projectPath(projectId)}/galaxies/${encodeURIComponent(galaxyId)}`

export interface SpectrumUploadOptions {
  defaults?: SpectrumUploadDefaults
  onExisting?: 'skip' | 'replace'
  skipInvalid?: boolean
}

/**
 * Many spectra in one multipart request (`files` repeated), with upload progress; the server reads
 * every file and answers with the fit job to follow.
 */
function upload(projectId: string, files: readonly File[], options: SpectrumUploadOptions, onProgress: (fraction: number) => void): Promise<SpectrumUploadAnswer> {
  const form = new FormData()
  // the fields before the files: a streaming reader on the server knows them before the first file
  if (options.defaults && Object.keys(options.defaults).length) form.append('defaults', JSON.stringify(options.defaults))
  if (options.onExisting) form.append('onExisting', options.onExisting)
  if (options.skipInvalid) form.append('skipInvalid', 'true')
  for (const f of files) form.append('files', f, f.name)
  return postForm<SpectrumUploadAnswer>(`${projectPath(projectId)}/spectra`, form, onProgress)
}

export const spectraApi = {
  upload,
  /** The fit-quality table of the project. */
  list: (projectId: string, query: FitQualityQuery, signal?: AbortSignal) =>
    http.get<FitQualityPage>(`${projectPath(projectId)}/spectra`, { query: { ...query }, signal }),
  /** A galaxy's spectrum with its line fit under the shown revision; 404 when it has none. */
  get: (projectId: string, galaxyId: string) => http.get<GalaxySpectrum>(`${galaxyPath(projectId, galaxyId)}/spectrum`),
  /** A trial refit with other fit settings: the same answer as `get`, nothing stored. */
  refit: (projectId: string, galaxyId: string, fit: Partial<FitSettings>) =>
    http.post<GalaxySpectrum>(`${galaxyPath(projectId, galaxyId)}/spectrum/fit`, { fit }),
  modelCsvUrl: (projectId: string, galaxyId: string) => apiUrl(`${galaxyPath(projectId, galaxyId)}/spectrum/model.csv`),
  linesExportUrl: (projectId: string, format: 'csv' | 'vot') => apiUrl(`${projectPath(projectId)}/exports/lines.${format}`),
}
