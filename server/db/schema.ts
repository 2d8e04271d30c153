import { sql } from 'drizzle-orm'
import {
  bigint, bigserial, boolean, customType, doublePrecision, index, integer, json, jsonb, pgEnum, pgTable, primaryKey,
  real, smallint, smallserial, text, timestamp, uniqueIndex, uuid,
} from 'drizzle-orm/pg-core'
import { RESULTS_COLUMNS } from '../../shared/results/storage.ts'

/** Raw bytes (the spectra's arrays, little-endian). */
const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => 'bytea' })

const createdAt = () => timestamp({ withTimezone: true }).notNull().defaultNow()

export const projectRole = pgEnum('project_role', ['owner', 'analyst', 'viewer'])
export const keyAccess = pgEnum('key_access', ['read', 'write'])

export const users = pgTable('users', {
  id: uuid().primaryKey().defaultRandom(),
  email: text().notNull(),
  name: text().notNull(),
  passwordHash: text().notNull(),
  isSiteAdmin: boolean().notNull().default(false),
  disabledAt: timestamp({ withTimezone: true }),
  /** When the owner of the address proved it (a mailed link); keys and invitations need it. */
  emailVerifiedAt: timestamp({ withTimezone: true }),
  /** Sessions issued before this instant are void (sign-out, password reset, disable, e-mail change). */
  sessionsValidAfter: timestamp({ withTimezone: true }).notNull().defaultNow(),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('users_email_lower').on(sql`lower(${t.email})`)])

export const projects = pgTable('projects', {
  id: uuid().primaryKey().defaultRandom(),
  name: text().notNull(),
  description: text().notNull().default(''),
  /** Latest assumptions revision (new intakes are computed under it). */
  currentRevision: integer().notNull().default(1),
  /** Latest revision whose recompute is complete: what queries, diagrams and exports show. */
  resultsRevision: integer().notNull().default(1),
  /** Bumped by every write of results: the key of cached diagram data. */
  dataVersion: bigint({ mode: 'number' }).notNull().default(0),
  createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
})

export const memberships = pgTable('memberships', {
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  role: projectRole().notNull(),
  createdAt: createdAt(),
}, (t) => [primaryKey({ columns: [t.projectId, t.userId] }), index('memberships_user').on(t.userId)])

export const apiKeys = pgTable('api_keys', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  name: text().notNull(),
  prefix: text().notNull(),
  /** SHA-256 of the whole key, hex; the key itself is never stored. */
  keyHash: text().notNull(),
  projectId: uuid().references(() => projects.id, { onDelete: 'cascade' }),
  access: keyAccess().notNull(),
  expiresAt: timestamp({ withTimezone: true }),
  revokedAt: timestamp({ withTimezone: true }),
  lastUsedAt: timestamp({ withTimezone: true }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('api_keys_hash').on(t.keyHash), index('api_keys_user').on(t.userId)])

export const invitations = pgTable('invitations', {
  id: uuid().primaryKey().defaultRandom(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  email: text().notNull(),
  role: projectRole().notNull(),
  tokenHash: text().notNull(),
  invitedBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  expiresAt: timestamp({ withTimezone: true }).notNull(),
  acceptedAt: timestamp({ withTimezone: true }),
  revokedAt: timestamp({ withTimezone: true }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('invitations_token').on(t.tokenHash), index('invitations_project').on(t.projectId)])

export const passwordResets = pgTable('password_resets', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: text().notNull(),
  expiresAt: timestamp({ withTimezone: true }).notNull(),
  usedAt: timestamp({ withTimezone: true }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('password_resets_token').on(t.tokenHash)])

/** Single-use links that prove an address: the account's own (sign-up) or a new one (e-mail change). */
export const emailVerifications = pgTable('email_verifications', {
  id: uuid().primaryKey().defaultRandom(),
  userId: uuid().notNull().references(() => users.id, { onDelete: 'cascade' }),
  /** the address the link was mailed to; differs from users.email for an e-mail change */
  email: text().notNull(),
  tokenHash: text().notNull(),
  expiresAt: timestamp({ withTimezone: true }).notNull(),
  usedAt: timestamp({ withTimezone: true }),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('email_verifications_token').on(t.tokenHash), index('email_verifications_user').on(t.userId)])

/**
 * Failed sign-ins per (e-mail, client address) and per client address (email = ''). Keyed by the
 * e-mail as typed (normalised), so unknown and known addresses are throttled alike, and never per
 * account alone, so strangers elsewhere cannot lock the owner out.
 */
export const signInFailures = pgTable('sign_in_failures', {
  email: text().notNull(),
  ip: text().notNull(),
  failures: integer().notNull(),
  lastFailureAt: timestamp({ withTimezone: true }).notNull(),
  lockedUntil: timestamp({ withTimezone: true }),
}, (t) => [primaryKey({ columns: [t.email, t.ip] }), index('sign_in_failures_time').on(t.lastFailureAt)])

export const auditEvents = pgTable('audit_events', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  projectId: uuid().references(() => projects.id, { onDelete: 'cascade' }),
  actorUserId: uuid().references(() => users.id, { onDelete: 'set null' }),
  action: text().notNull(),
  target: text(),
  details: jsonb().notNull().default({}),
  ip: text(),
  createdAt: createdAt(),
}, (t) => [index('audit_project_time').on(t.projectId, t.createdAt)])

export const assumptionRevisions = pgTable('assumption_revisions', {
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  revision: integer().notNull(),
  settings: jsonb().notNull(),
  note: text().notNull().default(''),
  createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
}, (t) => [primaryKey({ columns: [t.projectId, t.revision] })])

export const intakes = pgTable('intakes', {
  id: uuid().primaryKey().defaultRandom(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  kind: text().notNull(), // 'api' | 'csv'
  status: text().notNull(), // 'staged' | 'committing' | 'committed' | 'undone' | 'rejected' | 'failed'
  userId: uuid().references(() => users.id, { onDelete: 'set null' }),
  apiKeyId: uuid().references(() => apiKeys.id, { onDelete: 'set null' }),
  fileName: text(),
  filePath: text(),
  rowsTotal: integer().notNull().default(0),
  rowsAccepted: integer().notNull().default(0),
  rowsRejected: integer().notNull().default(0),
  revision: integer(),
  report: jsonb(),
  idempotencyKey: text(),
  requestHash: text(),
  response: jsonb(),
  createdAt: createdAt(),
  finishedAt: timestamp({ withTimezone: true }),
}, (t) => [
  index('intakes_project_time').on(t.projectId, t.createdAt),
  uniqueIndex('intakes_idempotency').on(t.projectId, t.idempotencyKey),
])

export const columnMappings = pgTable('column_mappings', {
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  name: text().notNull(),
  mapping: jsonb().notNull(),
  createdAt: createdAt(),
}, (t) => [primaryKey({ columns: [t.projectId, t.name] })])

/** One nucleus of a project; `key` is the pipeline's own ID. Inputs are kept as the public API's JSON (GalaxyInputSchema). */
export const galaxies = pgTable('galaxies', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  key: text().notNull(),
  redshift: doublePrecision(),
  ra: doublePrecision(),
  dec: doublePrecision(),
  fluxUnit: doublePrecision().notNull().default(1),
  /** `json`, not `jsonb`: stored and returned as sent, never queried inside, and much cheaper to write. */
  input: json().notNull(),
  /**
   * Where the lines came from when not from an intake's rows: `{ source: 'line-fit', spectrumId,
   * revision }` for lines measured from the galaxy's spectrum under that assumptions revision.
   */
  provenance: jsonb(),
  lastIntakeId: uuid(),
  createdAt: createdAt(),
  updatedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
}, (t) => [uniqueIndex('galaxies_project_key').on(t.projectId, t.key)])

export const galaxyIntakes = pgTable('galaxy_intakes', {
  galaxyId: bigint({ mode: 'number' }).notNull().references(() => galaxies.id, { onDelete: 'cascade' }),
  intakeId: uuid().notNull().references(() => intakes.id, { onDelete: 'cascade' }),
  /** What the intake did to the galaxy: 'created' | 'replaced' | 'merged'; null before history was kept. */
  change: text(),
}, (t) => [primaryKey({ columns: [t.galaxyId, t.intakeId] }), index('galaxy_intakes_intake').on(t.intakeId, t.galaxyId)])

/**
 * A galaxy's record as it was before an intake replaced or merged into it: kept so that every
 * earlier record stays retrievable and an intake can be undone.
 */
export const galaxyVersions = pgTable('galaxy_versions', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  galaxyId: bigint({ mode: 'number' }).notNull().references(() => galaxies.id, { onDelete: 'cascade' }),
  /** The intake that superseded this record. */
  intakeId: uuid().notNull().references(() => intakes.id, { onDelete: 'cascade' }),
  /** The intake that had written it (null for records older than the history). */
  previousIntakeId: uuid(),
  redshift: doublePrecision(),
  ra: doublePrecision(),
  dec: doublePrecision(),
  fluxUnit: doublePrecision().notNull(),
  input: json().notNull(),
  provenance: jsonb(),
  /** When the superseded record had been written (its `updated_at`). */
  writtenAt: timestamp({ withTimezone: true }).notNull(),
  replacedAt: createdAt(),
}, (t) => [index('galaxy_versions_galaxy').on(t.galaxyId), index('galaxy_versions_intake').on(t.intakeId, t.galaxyId)])

/**
 * The copies of result fields beside each result (class codes, ratios, limit bits, …): one column
 * per stored field of shared/results/registry.ts (the limit fields share the `limits` bit field).
 */
const resultCopies = Object.fromEntries(RESULTS_COLUMNS.map((c) => {
  const column = c.type === 'real' ? real(c.column) : smallint(c.column)
  return [c.column, c.notNull ? column.notNull().default(0) : column]
})) as Record<string, ReturnType<typeof real> | ReturnType<typeof smallint>>

/**
 * The element names of a stored result layout (shared/results/stored-row.ts `StoredLayout`): rows
 * written by an older layout are read by name.
 */
export const resultLayouts = pgTable('result_layouts', {
  id: smallserial().primaryKey(),
  fingerprint: text().notNull().unique(),
  spec: jsonb().notNull(),
  createdAt: createdAt(),
})

/**
 * Everything derived for a galaxy under one assumptions revision and one method version, as typed
 * columns: the kernel's numbers (`measures`), codes and flags (`codes`), the Monte Carlo summary,
 * named by `layout`; the document is rebuilt from them on read (server/services/stored-results.ts).
 * The copies beside them serve filters, sorting and the diagram endpoint. `result` holds the document
 * of rows stored before the typed columns that could not be turned into them (another method version).
 */
export const results = pgTable('results', {
  galaxyId: bigint({ mode: 'number' }).notNull().references(() => galaxies.id, { onDelete: 'cascade' }),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  revision: integer().notNull(),
  methodVersion: text().notNull(),
  computedAt: createdAt(),
  ...resultCopies,
  layout: smallint(),
  measures: real().array(),
  /** `measures` as doubles, only for a row with a number a real cannot hold (beyond ±3.4·10³⁸, or a non-zero below 1.2·10⁻³⁸) */
  measuresExact: doublePrecision().array(),
  codes: bytea(),
  mcPercentiles: real().array(),
  mcClasses: real().array(),
  /** the document of a row stored before the typed columns (lz4-compressed by migration 0001) */
  result: json(),
}, (t) => [
  primaryKey({ columns: [t.galaxyId, t.revision] }),
  index('results_project_revision').on(t.projectId, t.revision),
])

export const jobs = pgTable('jobs', {
  id: uuid().primaryKey().defaultRandom(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  kind: text().notNull(),
  status: text().notNull().default('queued'),
  revision: integer(),
  total: integer().notNull().default(0),
  done: integer().notNull().default(0),
  error: text(),
  /** What the job works on (an intake job: `{ intakeId, options }`). */
  params: jsonb(),
  /** Keyset cursor of the last committed chunk (galaxy id): a resumed recompute continues after it. */
  lastId: bigint({ mode: 'number' }).notNull().default(0),
  /** Last progress of the worker holding the job's lease (the lease itself is an advisory lock). */
  heartbeatAt: timestamp({ withTimezone: true }),
  /** Set when a job whose worker was gone was taken up again, with how far it had come. */
  resumedAt: timestamp({ withTimezone: true }),
  resumeCount: integer().notNull().default(0),
  resumedFrom: integer(),
  createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  finishedAt: timestamp({ withTimezone: true }),
}, (t) => [index('jobs_project_time').on(t.projectId, t.createdAt), index('jobs_unfinished').on(t.status).where(sql`status in ('queued', 'running')`)])

/** One upload of spectra files: what each file held, or why it was refused (`skipInvalid`). */
export const spectrumUploads = pgTable('spectrum_uploads', {
  id: uuid().primaryKey().defaultRandom(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  createdBy: uuid().references(() => users.id, { onDelete: 'set null' }),
  createdAt: createdAt(),
  fileCount: integer().notNull(),
  spectrumCount: integer().notNull(),
  /** the intake under which the fit writes the galaxies' lines (their earlier records go to galaxy_versions with it) */
  intakeId: uuid().references(() => intakes.id, { onDelete: 'set null' }),
  /** per file: name, size, spectra [{ galaxyId, pixels, source, spectrumId, stored }] or error { message, line? } */
  report: jsonb().notNull(),
}, (t) => [index('spectrum_uploads_project_time').on(t.projectId, t.createdAt)])

/**
 * The current 1-D spectrum of a galaxy (one per galaxy and project), its arrays as stored bytes:
 * wavelength Float64 LE (observed Å), flux and noise Float32 LE (a bad pixel: ivar 0 or error NaN).
 */
export const spectra = pgTable('spectra', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  /** the galaxy's public ID (galaxies.key) */
  galaxyId: text().notNull(),
  uploadId: uuid().notNull().references(() => spectrumUploads.id, { onDelete: 'cascade' }),
  fileName: text().notNull(),
  /** where in the file the arrays came from (HDU, columns) */
  source: text().notNull(),
  redshift: doublePrecision().notNull(),
  wavelengthMedium: text().notNull(), // 'air' | 'vacuum'
  /** erg s⁻¹ cm⁻² Å⁻¹ per flux unit */
  fluxUnit: doublePrecision().notNull().default(1),
  /** neither the file nor the upload's defaults gave a flux unit: 1 was assumed (the fits carry flux-unit-assumed) */
  fluxUnitAssumed: boolean().notNull().default(false),
  /** the instrument's line-spread FWHM: { fwhmAngstrom } | { fwhmKmPerS } | { resolvingPower } */
  resolution: jsonb(),
  pixels: integer().notNull(),
  /** the first and last wavelengths (observed Å), for the fit-quality table */
  wavelengthMin: doublePrecision().notNull(),
  wavelengthMax: doublePrecision().notNull(),
  wavelength: bytea().notNull(),
  flux: bytea().notNull(),
  noiseKind: text().notNull(), // 'error' | 'ivar'
  noise: bytea().notNull(),
  /** SHA-256 of the three arrays' bytes, hex */
  sha256: text().notNull(),
  createdAt: createdAt(),
}, (t) => [uniqueIndex('spectra_project_galaxy').on(t.projectId, t.galaxyId), index('spectra_upload').on(t.uploadId, t.id)])

/** The line fit of one spectrum under one assumptions revision (its fit settings). */
export const lineFits = pgTable('line_fits', {
  spectrumId: bigint({ mode: 'number' }).notNull().references(() => spectra.id, { onDelete: 'cascade' }),
  revision: integer().notNull(),
  projectId: uuid().notNull().references(() => projects.id, { onDelete: 'cascade' }),
  /** the fit settings as resolved (every default filled) and the detection threshold */
  settings: jsonb().notNull(),
  /** lines, absorption, fit statistics, measurements and flags, as the fit returned them */
  result: jsonb().notNull(),
  chi2: doublePrecision(),
  dof: integer(),
  detections: smallint().notNull().default(0),
  flags: text().array().notNull().default(sql`'{}'::text[]`),
  methodVersion: text().notNull(),
  createdAt: createdAt(),
}, (t) => [primaryKey({ columns: [t.spectrumId, t.revision] }), index('line_fits_project_revision').on(t.projectId, t.revision)])

/** Mail received by the local catcher (development and tests); site admins read it on the Outbox. */
export const outboxMessages = pgTable('outbox_messages', {
  id: bigserial({ mode: 'number' }).primaryKey(),
  toAddress: text().notNull(),
  fromAddress: text().notNull(),
  subject: text().notNull(),
  text: text().notNull(),
  html: text(),
  receivedAt: createdAt(),
})

/** Demo seed bookkeeping: makes the seed run once per database. */
export const seedRuns = pgTable('seed_runs', {
  name: text().primaryKey(),
  createdAt: createdAt(),
})
