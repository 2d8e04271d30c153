import type { z } from 'zod'
import type { DiagramColumnsJson } from '../../shared/diagram-columns.ts'
import type {
  ApiKeyCreatedSchema, ApiKeySchema, AuditEventSchema, EmailVerifiedSchema, IntakeSchema, InvitationAcceptedSchema, InvitationInfoSchema, InvitationSchema,
  JobSchema, MemberSchema, MeSchema, OutboxItemSchema, OutboxMessageSchema, ProjectSchema, RoleSchema, UserAnswerSchema,
} from '../../shared/schemas/api.schema.ts'
import type { AssumptionsChangedSchema, AssumptionsRevisionSchema, AssumptionsSchema } from '../../shared/schemas/assumptions.schema.ts'
import type { GalaxyResultSchema } from '../../shared/schemas/diagnostics-result.schema.ts'
import type { Settings as SettingsDto } from '../../shared/schemas/galaxy.schema.ts'
import type {
  ColumnMapping as ColumnMappingDto, GalaxyVersionSchema, IntakeCommittedSchema, IntakeCounts as IntakeCountsDto, IntakeDetailSchema, IntakeJobStartedSchema,
  IntakeProblemSchema, IntakeReportSchema, IntakeUndoneSchema, NonDetectionSchema, OnExisting as OnExistingDto, StagedIntakeSchema,
} from '../../shared/schemas/intake.schema.ts'
import type { GalaxyDetailSchema, GalaxyRevisionResultsSchema } from '../../shared/results/responses.ts'
import type { ClassParam } from '../../shared/results/registry.ts'
import type { LineValue } from '../../shared/diagnostics/types.ts'
import type { ClassDiagram, Diagram, LineId } from '../../shared/vocabulary/index.ts'
import type { Kinematics } from './spectra-types'

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

export type Project = z.infer<typeof ProjectSchema>

/** The project's assumptions, complete (the server fills the defaults). */
export type Settings = SettingsDto

/** One revision of the assumptions. */
export type Revision = z.infer<typeof AssumptionsRevisionSchema>

/** GET …/assumptions and the answer of PUT …/assumptions. */
export type Assumptions = z.infer<typeof AssumptionsSchema>
export type AssumptionsChanged = z.infer<typeof AssumptionsChangedSchema>

export type Job = z.infer<typeof JobSchema>

export type Intake = z.infer<typeof IntakeSchema>

/** One intake as `GET …/intakes/{id}` answers: with its report (counts, problems or the undo). */
export type IntakeDetail = z.infer<typeof IntakeDetailSchema>

/** `log`: the edges are log10 of the quantity (the server bins densities logarithmically). */
export interface Histogram { edges: number[]; counts: number[]; log?: boolean }

export interface ProjectOverview {
  project: Project
  /** the revision the shown results were computed under (a number; older servers sent an object) */
  revision: number | { revision: number; createdAt: string }
  classCounts: Record<ClassDiagram, Record<string, number>>
  histograms: { ebv: Histogram; neSii: Histogram }
  latestIntakes: Intake[]
  /** gas kinematics of the line fits (`fitted` 0 before any spectrum is fitted) */
  kinematics?: Kinematics | null
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

/**
 * Filters shared by the galaxies list, the diagram columns and the exports, as the screens hold them:
 * each class filter (the registry's `ClassParam`s) a comma-separated list of class names.
 */
export interface GalaxyFilters extends Partial<Record<ClassParam, string>> {
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

/** One galaxy: its stored inputs, its results under the shown revision (null before any), its intake history and revisions. */
export type GalaxyDetail = z.infer<typeof GalaxyDetailSchema>

export type GalaxyRevisionResults = z.infer<typeof GalaxyRevisionResultsSchema>

/** Columnar diagram data: one entry per galaxy in every array (GET …/diagram); one definition with the binary codec's. */
export type DiagramColumns = DiagramColumnsJson

export type ColumnMapping = ColumnMappingDto

export type NonDetection = z.infer<typeof NonDetectionSchema>

/** The answer of a CSV upload: the staged intake, a preview and a suggested mapping. */
export type CsvUpload = z.infer<typeof StagedIntakeSchema>

/** `field` is the file's column header, `column` its 1-based position. */
export type ValidationProblem = z.infer<typeof IntakeProblemSchema>

/** What an intake does with IDs the project already has. */
export type OnExisting = OnExistingDto

export type ValidationReport = z.infer<typeof IntakeReportSchema>

export type IntakeCounts = IntakeCountsDto

/** 200: stored within the request (counts); 202: a job to follow. */
export type CommitAnswer = z.infer<typeof IntakeCommittedSchema> | z.infer<typeof IntakeJobStartedSchema>

/** 200: undone within the request; 202: an `undo` job to follow. */
export type UndoAnswer = z.infer<typeof IntakeUndoneSchema> | z.infer<typeof IntakeJobStartedSchema>

/** A galaxy's record as it was before an intake replaced or merged into it. */
export type GalaxyVersion = z.infer<typeof GalaxyVersionSchema>

export type Member = z.infer<typeof MemberSchema>

export type Invitation = z.infer<typeof InvitationSchema>

/** An invitation as its link shows it. */
export type InvitationInfo = z.infer<typeof InvitationInfoSchema>

export type InvitationAccepted = z.infer<typeof InvitationAcceptedSchema>

/** One entry of a project's audit log (owners only). */
export type AuditEvent = z.infer<typeof AuditEventSchema>

/** Sign-up and sign-in answers. */
export type UserAnswer = z.infer<typeof UserAnswerSchema>

export type EmailVerified = z.infer<typeof EmailVerifiedSchema>

export type ApiKey = z.infer<typeof ApiKeySchema>

export type CreatedApiKey = z.infer<typeof ApiKeyCreatedSchema>

export type OutboxItem = z.infer<typeof OutboxItemSchema>

export type OutboxMessage = z.infer<typeof OutboxMessageSchema>

export interface ItemList<T> { items: T[] }
