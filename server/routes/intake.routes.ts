import type { NextFunction, Request, Response, Router } from 'express'
import multer from 'multer'
import { randomUUID } from 'node:crypto'
import { mkdirSync } from 'node:fs'
import { join } from 'node:path'
import { z } from 'zod'
import type { AppDeps } from '../app.ts'
import { requireAuth } from '../http/auth.ts'
import { route } from '../http/route.ts'
import { HttpProblem } from '../http/problem.ts'
import { parseRequest } from '../http/parse-request.ts'
import { textLine } from '../../shared/schemas/text.ts'
import { intakeService } from '../services/intake.service.ts'
import { IntakePathSchema, IntakeSchema, ProjectPathSchema } from '../../shared/schemas/api.schema.ts'
import { ColumnMappingSchema, IntakeOptionsSchema } from '../../shared/schemas/intake.schema.ts'
import { writingGalaxies } from '../services/galaxies.service.ts'
import type { Guard } from './index.ts'

/** The uploaded file's own name (multer decodes filename*= and %0A in it): stored and shown, so plain text. */
const FileNameSchema = textLine().min(1).max(255)
const CSV_TYPES = new Set(['text/csv', 'text/plain', 'text/tab-separated-values', 'application/csv', 'application/vnd.ms-excel', 'application/octet-stream'])

export function intakeRoutes(r: Router, deps: AppDeps, guard: Guard) {
  const intake = intakeService(deps.db, deps.mailer, deps.config.dataDir, deps.config.appUrl, deps.config.largeIntakeRows)
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
  const StagedSchema = z.object({
    intake: IntakeSchema, delimiter: z.string(), headers: z.array(z.string()), previewRows: z.array(z.array(z.string())), rowCount: z.number().int(),
    suggestedMapping: ColumnMappingSchema, savedMappings: z.array(z.object({ name: z.string(), mapping: z.unknown() })),
  })
  route(r, { method: 'post', path: '/projects/:projectId/intakes/csv', tag, access: 'analyst', write: true, params: ProjectPathSchema,
    summary: 'Upload a CSV (multipart field "file"): stages it and answers a preview and a suggested column mapping',
    bodyContentType: 'multipart/form-data', responses: { 201: { description: 'staged', schema: StagedSchema }, 413: { description: 'too large' }, 415: { description: 'not a CSV' } } },
  (spec) => { const g = guard(spec); return (req, res, next) => g(req, res, (e?: unknown) => (e ? next(e) : receive(req, res, next))) },
  async (req, res, { params }) => {
    if (!req.file) throw new HttpProblem(422, 'Unprocessable Content', 'no file in the form', [{ path: '/file', message: 'required' }])
    res.status(201).json(await intake.stage(requireAuth(req), params.projectId, req.file))
  })

  const ReportSchema = z.object({ rowsTotal: z.number().int(), rowsValid: z.number().int(), problemCount: z.number().int(),
    problems: z.array(z.object({ row: z.number().int(), column: z.number().int().nullable(), field: z.string().nullable(), message: z.string() })) })
  route(r, { method: 'post', path: '/projects/:projectId/intakes/:intakeId/validate', tag, access: 'analyst', write: true, params: IntakePathSchema, body: IntakeOptionsSchema,
    summary: 'Check every row of a staged file with a mapping (nothing is stored)', responses: { 200: { description: 'report with row and column numbers', schema: ReportSchema } } },
  guard, async (_req, res, { params, body }) => { res.json(await intake.validate(params.projectId, params.intakeId, body)) })

  route(r, { method: 'post', path: '/projects/:projectId/intakes/:intakeId/commit', tag, access: 'analyst', write: true, params: IntakePathSchema, body: IntakeOptionsSchema,
    summary: 'Store every row of a staged file in one transaction (all or nothing)',
    responses: { 200: { description: 'committed', schema: z.object({ intake: IntakeSchema, inserted: z.number().int(), updated: z.number().int() }) }, 422: { description: 'problems; nothing stored' } } },
  guard, async (req, res, { params, body }) => {
    res.json(await writingGalaxies(deps.db, params.projectId, () => intake.commit(requireAuth(req), params.projectId, params.intakeId, body)))
  })

  route(r, { method: 'get', path: '/projects/:projectId/intakes/:intakeId', tag, access: 'viewer', params: IntakePathSchema,
    summary: 'One intake with its report', responses: { 200: { description: 'intake', schema: IntakeSchema.extend({ report: z.unknown() }) } } },
  guard, async (_req, res, { params }) => { res.json(await intake.get(params.projectId, params.intakeId)) })
}
