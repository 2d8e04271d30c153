import type { NextFunction, Request, Response } from 'express'
import multer from 'multer'
import { randomUUID } from 'node:crypto'
import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import type { RouteDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route, type Routes } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { parseRequest } from '../http/parse-request.ts'
import { textLine } from '../../shared/schemas/text.ts'
import { intakeService } from '../services/intake.service.ts'
import { GalaxyPathSchema, IntakePathSchema, ListOf, ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import {
  GalaxyVersionSchema, IntakeCommittedSchema, IntakeDetailSchema, IntakeJobStartedSchema, IntakeOptionsSchema, IntakeReportSchema, IntakeUndoneSchema,
  StagedIntakeSchema,
} from '../../shared/schemas/intake.schema.ts'

/** The uploaded file's own name (multer decodes filename*= and %0A in it): stored and shown, so plain text. */
const FileNameSchema = textLine().min(1).max(255)
const CSV_TYPES = new Set(['text/csv', 'text/plain', 'text/tab-separated-values', 'application/csv', 'application/vnd.ms-excel', 'application/octet-stream'])

export function intakeRoutes(r: Routes, deps: RouteDeps) {
  const intake = intakeService(deps.galaxy, deps.config.dataDir, { maxRows: deps.config.intakeMaxRows, inlineRows: deps.config.intakeInlineRows })
  const dir = join(deps.config.dataDir, 'uploads')
  mkdirSync(dir, { recursive: true })
  const upload = multer({
    storage: multer.diskStorage({ destination: dir, filename: (_req, _file, cb) => cb(null, `${randomUUID()}.csv`) }),
    limits: { fileSize: deps.config.uploadLimitBytes, files: 1, fields: 10 },
    fileFilter: (_req, file, cb) => {
      try { parseRequest(FileNameSchema, file.originalname, ['file', 'filename']) } catch (err) { return cb(err as Error) }
      const okName = /\.(csv|tsv|txt)$/i.test(file.originalname)
      if (!okName && !CSV_TYPES.has(file.mimetype)) return cb(new HttpProblem(415, 'Unsupported Media Type', 'upload a CSV file (.csv, .tsv or .txt)', [{ path: '/file', message: `type ${file.mimetype} is not CSV` }]))
      if (/^(image|video|audio)\//.test(file.mimetype) || file.mimetype === 'application/zip' || file.mimetype === 'application/pdf') {
        return cb(new HttpProblem(415, 'Unsupported Media Type', 'upload a CSV file', [{ path: '/file', message: `type ${file.mimetype} is not CSV` }]))
      }
      cb(null, true)
    },
  }).single('file')
  const receive = (req: Request, res: Response, next: NextFunction) => {
    if (!req.is('multipart/form-data')) return next(new HttpProblem(415, 'Unsupported Media Type', 'send multipart/form-data with a "file" field'))
    const encoding = req.headers['content-encoding']
    if (encoding && encoding.toLowerCase() !== 'identity') return next(new HttpProblem(415, 'Unsupported Media Type', `uploads cannot be sent with Content-Encoding ${encoding}; send the form uncompressed`))
    upload(req, res, (err: unknown) => {
      if (!err) return next()
      const e = err as { code?: string; field?: string }
      if (e instanceof HttpProblem) return next(e)
      if (e.code === 'LIMIT_FILE_SIZE') return next(new HttpProblem(413, 'Content Too Large', `the file is larger than ${Math.round(deps.config.uploadLimitBytes / 1048576)} MB`, [{ path: '/file', message: 'too large' }]))
      if (e.code?.startsWith('LIMIT_')) return next(new HttpProblem(422, 'Unprocessable Content', `unexpected form data (${e.code})`, [{ path: `/${e.field ?? 'file'}`, message: e.code }]))
      next(new HttpProblem(400, 'Bad Request', 'the multipart body could not be read'))
    })
  }
  const tag = 'Intake'
  route(r, { method: 'post', path: '/projects/:projectId/intakes/csv', operationId: 'uploadIntakeCsv', tag, access: 'analyst', write: true, params: ProjectPathSchema,
    summary: 'Upload a CSV (multipart field "file"): stages it and answers a preview and a suggested column mapping',
    description: `Lines whose first non-blank character is \`#\` are comments and skipped. At most INTAKE_MAX_ROWS (default 1,000,000) data rows; a larger file answers 413.`,
    bodyContentType: 'multipart/form-data', before: [receive], responses: { 201: { description: 'staged', schema: StagedIntakeSchema }, 413: { description: 'too large, or more rows than one intake takes' }, 415: { description: 'not a CSV' } } },
  async (req, res, { params }) => {
    if (!req.file) throw new HttpProblem(422, 'Unprocessable Content', 'no file in the form', [{ path: '/file', message: 'required' }])
    res.status(201).json(await intake.stage(requireAuth(req), params.projectId, req.file))
  })

  route(r, { method: 'post', path: '/projects/:projectId/intakes/:intakeId/validate', operationId: 'validateIntake', tag, access: 'analyst', write: true, params: IntakePathSchema, body: IntakeOptionsSchema,
    summary: 'Check every row of a staged file with a mapping, and count the IDs the project already has (nothing is stored)',
    responses: { 200: { description: 'report with row and column numbers', schema: IntakeReportSchema } } },
  async (_req, res, { params, body }) => { res.json(await intake.validate(params.projectId, params.intakeId, body)) })

  route(r, { method: 'post', path: '/projects/:projectId/intakes/:intakeId/commit', operationId: 'commitIntake', tag, access: 'analyst', write: true, params: IntakePathSchema, body: IntakeOptionsSchema,
    summary: 'Store every row of a staged file in one transaction (all or nothing), as an `intake` job',
    description: 'IDs the project already has are left as they are unless `onExisting` says `replace` or `merge` (validate reports how many there are); replaced records stay retrievable and the intake can be undone. Files of up to INTAKE_INLINE_ROWS (default 10,000) rows are stored within the request (200); larger ones answer 202 with the job: poll `GET …/jobs/{jobId}`, then read the intake.',
    responses: {
      200: { description: 'committed', schema: IntakeCommittedSchema },
      202: { description: 'storing in the background: follow the job', schema: IntakeJobStartedSchema },
      409: { description: 'not staged (already committing, committed or expired)' }, 422: { description: 'problems; nothing stored' },
    } },
  async (req, res, { params, body }) => {
    const out = await intake.commit(requireAuth(req), params.projectId, params.intakeId, body)
    res.status(out.status).json(out.body)
  })

  route(r, { method: 'post', path: '/projects/:projectId/intakes/:intakeId/undo', operationId: 'undoIntake', tag, access: 'analyst', write: true, params: IntakePathSchema,
    summary: 'Undo a committed intake: restore the records it replaced, remove the galaxies it created, recompute their results',
    description: 'One transaction: all of it or nothing. Refused with 409 when a later intake changed any of the same galaxies (undo that one first), or when the intake is not committed.',
    responses: {
      200: { description: 'undone', schema: IntakeUndoneSchema },
      202: { description: 'an intake of more than INTAKE_INLINE_ROWS rows: undone by an `undo` job; follow it', schema: IntakeJobStartedSchema },
      409: { description: 'a later intake changed its galaxies, not committed, or an undo of it is running' },
    } },
  async (req, res, { params }) => {
    const out = await intake.undo(requireAuth(req), params.projectId, params.intakeId)
    res.status(out.status).json(out.body)
  })

  route(r, { method: 'get', path: '/projects/:projectId/galaxies/:galaxyId/versions', operationId: 'listGalaxyVersions', tag: 'Galaxies', access: 'viewer', params: GalaxyPathSchema,
    summary: 'Earlier records of a galaxy that intakes replaced or merged into, newest first',
    responses: { 200: { description: 'earlier records', schema: ListOf(GalaxyVersionSchema) } } },
  async (_req, res, { params }) => { res.json(await intake.versions(params.projectId, params.galaxyId)) })

  route(r, { method: 'get', path: '/projects/:projectId/intakes/:intakeId', operationId: 'getIntake', tag, access: 'viewer', params: IntakePathSchema,
    summary: 'One intake with its report', responses: { 200: { description: 'intake', schema: IntakeDetailSchema } } },
  async (_req, res, { params }) => { res.json(await intake.get(params.projectId, params.intakeId)) })
}
