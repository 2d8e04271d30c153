import { z } from 'zod'
import type { RouteDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { spectraService } from '../services/spectra.service.ts'
import { spectraReceiver, type UploadedFile } from '../services/spectra-upload.service.ts'
import { linesExportService } from '../services/lines-export.service.ts'
import { projectsService } from '../services/projects.service.ts'
import '../services/spectra-fit.service.ts' // registers the `fit` job and the recompute's refit
import { GalaxyPathSchema, JobSchema, ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import {
  GalaxySpectrumQuerySchema, GalaxySpectrumSchema, SPECTRA_PER_UPLOAD_MAX, SPECTRUM_FILE_EXTENSIONS, SPECTRUM_PIXELS_MAX, SpectraListQuerySchema,
  SpectraListSchema, SpectraUploadFormSchema, SpectrumUploadSchema, TrialFitSchema,
} from '../../shared/schemas/project-spectra.schema.ts'
import { positiveInt4 } from '../../shared/schemas/text.ts'

const RevisionQuerySchema = z.object({
  revision: positiveInt4().optional().meta({ description: 'assumptions revision (default: the one the project shows)' }),
}).strict()

export function spectraRoutes(r: Routes, deps: RouteDeps) {
  const spectra = spectraService(deps.galaxy, { fileLimitBytes: deps.config.spectrumFileLimitBytes })
  const lines = linesExportService(deps.db, spectra)
  const projects = projectsService(deps.db)
  const receive = spectraReceiver(deps.config.dataDir, deps.config.spectrumFileLimitBytes, SpectraUploadFormSchema)
  const tag = 'Spectra'
  const mb = Math.round(deps.config.spectrumFileLimitBytes / 1048576)

  route(r, { method: 'post', path: '/projects/:projectId/spectra', operationId: 'uploadSpectra', tag, access: 'analyst', write: true, params: ProjectPathSchema,
    summary: 'Upload 1-D spectra (multipart field "files": FITS, CSV/ASCII tables or zips of them); they are stored and fitted in the background',
    description: `Files: ${SPECTRUM_FILE_EXTENSIONS.join(' ')} or .zip. Limits (413, checked before the content): ${mb} MB a file or zip entry (SPECTRUM_FILE_LIMIT_MB), ${SPECTRA_PER_UPLOAD_MAX} spectra an upload, ${SPECTRUM_PIXELS_MAX.toLocaleString('en-US')} pixels a spectrum. `
      + 'Each spectrum belongs to the galaxy its file names (OBJECT, an ID column) or, failing that, to the file\'s name; its redshift comes from the file, the form\'s `defaults`, or the galaxy\'s redshift in the project. '
      + 'A file that cannot be read answers 422 with `/files/<i>` paths and nothing is stored, unless `skipInvalid=true`, which stores the others and reports it. '
      + 'The answer (202) has the upload\'s per-file report and the `fit` job: it fits the spectra in chunks (progress; it resumes after a restart) and writes each galaxy\'s lines from the fit, under an intake of kind `spectra`.',
    bodyContentType: 'multipart/form-data', body: SpectraUploadFormSchema, before: [receive],
    responses: {
      202: { description: 'stored; fitting in the background: follow the job', schema: z.object({ upload: SpectrumUploadSchema, job: JobSchema }) },
      413: { description: 'a file, a spectrum or the upload is too large' }, 415: { description: 'not a multipart form' }, 422: { description: 'bad files or form fields; nothing stored' },
    } },
  async (req, res, { params, body }) => {
    const files = (req.files as UploadedFile[] | undefined) ?? []
    res.status(202).json(await spectra.upload(requireAuth(req), params.projectId, files, body))
  })

  route(r, { method: 'get', path: '/projects/:projectId/spectra', operationId: 'listSpectra', tag, access: 'viewer', params: ProjectPathSchema, query: SpectraListQuerySchema,
    summary: 'The fit-quality table: every spectrum with its fit (χ²/dof, components, broad Hα, detections, flags)',
    description: 'The fit shown is the one under the revision the project shows, else the spectrum\'s newest; spectra not fitted yet have nulls.',
    responses: { 200: { description: 'one page of spectra', schema: SpectraListSchema } } },
  async (_req, res, { params, query }) => { res.json(await spectra.list(params.projectId, query)) })

  route(r, { method: 'get', path: '/projects/:projectId/galaxies/:galaxyId/spectrum', operationId: 'getGalaxySpectrum', tag, access: 'viewer', params: GalaxyPathSchema, query: GalaxySpectrumQuerySchema,
    summary: 'A galaxy\'s spectrum (arrays) with its fit and the model per pixel: continuum, total, each component',
    responses: { 200: { description: 'spectrum and fit (null until it is fitted)', schema: GalaxySpectrumSchema } } },
  async (_req, res, { params, query }) => { res.json(await spectra.galaxySpectrum(params.projectId, params.galaxyId, query.revision)) })

  route(r, { method: 'post', path: '/projects/:projectId/galaxies/:galaxyId/spectrum/fit', operationId: 'trialFitGalaxySpectrum', tag, access: 'analyst', write: true, params: GalaxyPathSchema, body: TrialFitSchema,
    summary: 'Fit the galaxy\'s spectrum with other fit settings and answer as GET …/spectrum does; nothing is stored',
    description: 'To keep such settings, change the assumptions (`settings.fit`): the new revision refits every spectrum and recomputes.',
    bodyExample: { fit: { components: 2, broadHalpha: 'on' } },
    responses: { 200: { description: 'the spectrum with the trial fit (revision null)', schema: GalaxySpectrumSchema } } },
  async (_req, res, { params, body }) => { res.json(await spectra.trialFit(params.projectId, params.galaxyId, body.fit)) })

  route(r, { method: 'get', path: '/projects/:projectId/galaxies/:galaxyId/spectrum/model.csv', operationId: 'exportSpectrumModelCsv', tag, access: 'viewer', params: GalaxyPathSchema, query: GalaxySpectrumQuerySchema,
    summary: 'The best-fit model of the galaxy\'s spectrum as CSV: wavelength, flux, error, continuum, model, one column per component, residual',
    responses: { 200: { description: 'CSV', contentType: 'text/csv' } } },
  async (_req, res, { params, query }) => { await lines.modelCsv(res, params.projectId, params.galaxyId, query.revision) })

  route(r, { method: 'get', path: '/projects/:projectId/exports/lines.csv', operationId: 'exportLinesCsv', tag: 'Exports', access: 'viewer', params: ProjectPathSchema, query: RevisionQuerySchema,
    summary: 'Line measurements of every fitted spectrum as CSV: per line flux, error, upper limit, S/N, EW, velocity and σ; Na I D (commented header with units)',
    responses: { 200: { description: 'CSV', contentType: 'text/csv' } } },
  async (req, res, { params, query }) => {
    const p = await projects.get(params.projectId, req.projectRole!)
    await lines.csv(res, params.projectId, p.name, query.revision)
  })

  route(r, { method: 'get', path: '/projects/:projectId/exports/lines.vot', operationId: 'exportLinesVotable', tag: 'Exports', access: 'viewer', params: ProjectPathSchema, query: RevisionQuerySchema,
    summary: 'The same line measurements as a VOTable 1.4 document, with units and UCDs on every field',
    responses: { 200: { description: 'VOTable', contentType: 'application/x-votable+xml' } } },
  async (req, res, { params, query }) => {
    const p = await projects.get(params.projectId, req.projectRole!)
    await lines.votable(res, params.projectId, p.name, query.revision)
  })
}
