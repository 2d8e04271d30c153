import type { z } from 'zod'
import type { DiagramColumnsJson } from '../../shared/diagram-columns.ts'
import type {
  ApiKeyCreatedSchema, ApiKeySchema, IntakeSchema, JobSchema, MeSchema, ProjectSchema, RoleSchema,
} from '../../shared/schemas/api.schema.ts'
import type { GalaxyResultSchema } from '../../shared/schemas/diagnostics-result.schema.ts'
import type { Settings as SettingsDto } from '../../shared/schemas/galaxy.schema.ts'
import type {
  ColumnMapping as ColumnMappingDto, IntakeCounts as IntakeCountsDto, IntakeProblemSchema, IntakeReportSchema, NonDetectionSchema,
  OnExisting as OnExistingDto,
} from '../../shared/schemas/intake.schema.ts'
import type { LineValue } from '../../shared/diagnostics/types.ts'
import type { ClassDiagram, Diagram, LineId } from '../../shared/vocabulary/index.ts'

/**
 * What the dashboard reads and sends. Where the shared zod schemas (shared/schemas/) describe a
 * request or an answer, the type is `z.infer` of that schema, so the client and the server cannot
 * drift apart; the shapes typed here are those only the server's routes describe.
 */

export type { ClassDiagram, LineId, LineValue }

/** The four diagram panels (the three BPT diagrams and WHAN). */
export type DiagramKey = Diagram

export type Role = z.infer<typeof RoleSchema>

export type Me = z.infer<typeof MeSchema>

export interface UserRef { id: string; name: string; email?: string }

export type Project = z.infer<typeof ProjectSchema>

/** The project's assumptions, complete (the server fills the defaults). */
export type Settings = SettingsDto

export interface Revision {
  revision: number
  settings: Settings
  note: string | null
  createdAt: string
  createdBy: UserRef | null
}

export type Job = z.infer<typeof JobSchema>

export type Intake = z.infer<typeof IntakeSchema>

/** One intake as `GET …/intakes/{id}` answers: with its report (counts, problems or the undo). */
export type IntakeDetail = Intake & { report?: unknown }

/** `log`: the edges are log10 of the quantity (the server bins densities logarithmically). */
export interface Histogram { edges: number[]; counts: number[]; log?: boolean }

export interface ProjectOverview {
  project: Project
  /** the revision the shown results were computed under (a number; older servers sent an object) */
  revision: number | { revision: number; createdAt: string }
  classCounts: Record<ClassDiagram, Record<string, number>>
  histograms: { ebv: Histogram; neSii: Histogram }
  latestIntakes: Intake[]
}

export interface GalaxySummary {
  id: string
  redshift: number | null
  classes: Record<ClassDiagram, string>
  ebv: number | null
  ebvError: number | null
  av: number | null
  neSii: number | null
  teOiii: number | null
  n2Pp04: number | null
  o3n2Pp04: number | null
  sfrHalpha: number | null
  ratios: { niiHa: number | null; oiiiHb: number | null; siiHa: number | null; oiHa: number | null }
  flagCount: number
}

export interface GalaxyPage { items: GalaxySummary[]; nextCursor: string | null; total: number }

/** Filters shared by the galaxies list, the diagram columns and the exports. */
export interface GalaxyFilters {
  class?: string
  classNii?: string
  classSii?: string
  classOi?: string
  classWhan?: string
  q?: string
  zMin?: number | null
  zMax?: number | null
  minSnr?: number | null
  range?: string[]
}

export interface GalaxyQuery extends GalaxyFilters {
  limit?: number
  cursor?: string | null
  sort?: string
}

/** Results for one galaxy under one revision; the shape of one POST /diagnostics result. */
export type GalaxyResult = z.infer<typeof GalaxyResultSchema>

export interface GalaxyDetail {
  id: string
  redshift: number | null
  fluxUnit: number | null
  ra: number | null
  dec: number | null
  lines: Partial<Record<LineId, LineValue>>
  ew: Partial<Record<LineId, number>> | null
  fwhm: Partial<Record<LineId, number>> | null
  revision: number
  methodVersion: string
  computedAt: string
  results: GalaxyResult
  history: { intakeId: string; kind: 'api' | 'csv'; fileName: string | null; createdAt: string; by: UserRef | string | null; change?: 'created' | 'replaced' | 'merged' | null }[]
  revisions: { revision: number; methodVersion: string; computedAt: string }[]
}

export interface GalaxyRevisionResults {
  revision: number
  methodVersion: string
  computedAt: string
  results: GalaxyResult
}

/** Columnar diagram data: one entry per galaxy in every array (see API-DESIGN.md); one definition with the binary codec's. */
export type DiagramColumns = DiagramColumnsJson

export type ColumnMapping = ColumnMappingDto

export type NonDetection = z.infer<typeof NonDetectionSchema>

export interface CsvUpload {
  intake: Intake
  headers: string[]
  previewRows: string[][]
  rowCount: number
  suggestedMapping: ColumnMapping
  savedMappings: { name: string; mapping: ColumnMapping }[]
}

/** `field` is the file's column header, `column` its 1-based position. */
export type ValidationProblem = z.infer<typeof IntakeProblemSchema>

/** What an intake does with IDs the project already has. */
export type OnExisting = OnExistingDto

export type ValidationReport = z.infer<typeof IntakeReportSchema>

export type IntakeCounts = IntakeCountsDto

/** 200: stored within the request (counts); 202: a job to follow. */
export interface CommitAnswer extends Partial<IntakeCounts> { intake: Intake; job: Job }

/** A galaxy's record as it was before an intake replaced or merged into it. */
export interface GalaxyVersion {
  writtenBy: string | null
  writtenAt: string
  replacedAt: string
  supersededBy: { intakeId: string; kind: 'api' | 'csv'; fileName: string | null; createdAt: string }
  record: { id: string; redshift: number | null; fluxUnit: number; ra: number | null; dec: number | null; lines: Record<string, { flux?: number; error?: number; upperLimit?: number }>; ew: Record<string, number> | null; fwhm: Record<string, number> | null }
}

export interface Member { userId: string; email: string; name: string; role: Role; joinedAt: string }

export interface Invitation { id: string; email: string; role: Role; expiresAt: string; acceptedAt: string | null; createdAt: string }

export interface InvitationInfo { projectName: string; email: string; role: Role; expiresAt: string; accountExists: boolean }

export type ApiKey = z.infer<typeof ApiKeySchema>

export type CreatedApiKey = z.infer<typeof ApiKeyCreatedSchema>

export interface OutboxItem { id: string; to: string; subject: string; receivedAt: string }

export interface OutboxMessage extends OutboxItem { from: string; text: string | null; html: string | null }

export interface ItemList<T> { items: T[] }
