import type { DiagramColumnsJson } from '../../shared/diagram-columns.ts'
/**
 * What the dashboard reads and sends, as described in server/API-DESIGN.md and the team's API
 * contract. Kept here rather than imported from the server so the client states what it relies on.
 */

export const LINE_IDS = [
  'halpha', 'hbeta', 'hgamma', 'hdelta', 'oiii_5007', 'oiii_4959', 'oiii_4363', 'nii_6584', 'nii_6548',
  'nii_5755', 'sii_6717', 'sii_6731', 'oi_6300', 'oii_3726', 'oii_3729', 'halpha_broad',
] as const
export type LineId = (typeof LINE_IDS)[number]

export type Role = 'owner' | 'analyst' | 'viewer'
export type DiagramKey = 'nii' | 'sii' | 'oi' | 'whan'
export type ClassDiagram = DiagramKey | 'overall'

export type LineValue = { flux: number; error: number } | { upperLimit: number }

export interface ProjectRoleRef { id: string; name: string; role: Role }

export interface Me {
  id: string
  email: string
  name: string
  isSiteAdmin: boolean
  /** API keys and joining projects need a verified address */
  emailVerified: boolean
  projects: ProjectRoleRef[]
}

export interface UserRef { id: string; name: string; email?: string }

export interface Project {
  id: string
  name: string
  description: string | null
  role: Role
  createdAt: string
  galaxyCount: number
  currentRevision: number
}

export interface Settings {
  extinctionLaw: 'ccm89' | 'odonnell94' | 'calzetti00' | 'fitzpatrick99'
  rv: number
  intrinsicBalmer: number
  electronTemperature: number
  minSnr: number
  allowNegative?: boolean
  sfrCalibration?: 'kennicutt98' | 'kennicuttEvans12'
  cosmology: { h0: number; omegaM: number }
  monteCarlo: { draws: number; seed: number }
  [extra: string]: unknown
}

export interface Revision {
  revision: number
  settings: Settings
  note: string | null
  createdAt: string
  createdBy: UserRef | null
}

export interface Job {
  id: string
  kind: 'recompute' | 'intake' | 'undo'
  status: 'queued' | 'running' | 'done' | 'failed'
  total: number
  done: number
  error: string | null
  createdAt: string
  finishedAt: string | null
  /** the intake an `intake` job stores */
  intakeId?: string | null
  heartbeatAt?: string | null
  /** set when the job's worker had gone (a crash, a restart) and it was taken up again */
  resumedAt?: string | null
  resumeCount?: number
  /** how far it had come: a recompute continues from there, an intake (all or nothing) starts again */
  resumedFrom?: number | null
}

export interface Intake {
  id: string
  kind: 'api' | 'csv'
  status: 'staged' | 'committing' | 'committed' | 'undone' | 'rejected' | 'failed'
  fileName: string | null
  createdAt: string
  finishedAt: string | null
  by: UserRef | null
  rowsTotal: number
  rowsAccepted: number
  rowsRejected: number
  report?: unknown
}

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
export interface GalaxyResult {
  id?: string
  extinction?: { balmerDecrement: number | null; ebv: number | null; ebvError: number | null; av: number | null; flags: string[] } | null
  dereddened?: Partial<Record<LineId, { flux: number | null; error: number | null } | { upperLimit: number }>> | null
  ratios?: Record<string, number | null> | null
  ratioErrors?: Record<string, number | null> | null
  ratioLimits?: Record<string, 'upper' | 'lower'> | null
  classes?: Partial<Record<ClassDiagram, string>> & { classProbabilities?: unknown }
  density?: Record<string, { ne: number | null; neError: number | null; flag: string | null } | null> | null
  temperature?: Record<string, unknown> | null
  metallicity?: Record<string, unknown> | null
  sfr?: Record<string, unknown> | null
  blackHoleMass?: unknown
  flags?: string[]
  [extra: string]: unknown
}

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

export interface ColumnMapping {
  id: string
  redshift?: string
  ra?: string
  dec?: string
  lines: Partial<Record<LineId, { flux: string; error?: string; limit?: string }>>
  ew: Partial<Record<LineId, string>>
  fwhm: Partial<Record<LineId, string>>
}

export type NonDetection = 'limit-column' | 'negative-error' | 'snr-only'

export interface CsvUpload {
  intake: Intake
  headers: string[]
  previewRows: string[][]
  rowCount: number
  suggestedMapping: ColumnMapping
  savedMappings: { name: string; mapping: ColumnMapping }[]
}

/** `field` is the file's column header, `column` its 1-based position (or a name on older servers). */
export interface ValidationProblem { row: number; column: number | string | null; field: string | null; message: string }

/** What an intake does with IDs the project already has. */
export type OnExisting = 'skip' | 'replace' | 'merge'

export interface ValidationReport {
  rowsTotal: number
  rowsValid: number
  problems: ValidationProblem[]
  problemCount?: number
  /** valid rows whose galaxy ID the project already has */
  existing?: number
  onExisting?: OnExisting
}

export interface IntakeCounts { inserted: number; updated: number; replaced: number; merged: number; skipped: number }

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

export interface ApiKey {
  id: string
  name: string
  prefix: string
  projectId: string | null
  access: 'read' | 'write'
  expiresAt: string | null
  createdAt: string
  lastUsedAt: string | null
  revokedAt: string | null
}

export interface CreatedApiKey extends ApiKey { key: string }

export interface OutboxItem { id: string; to: string; subject: string; receivedAt: string }

export interface OutboxMessage extends OutboxItem { from: string; text: string | null; html: string | null }

export interface ItemList<T> { items: T[] }
