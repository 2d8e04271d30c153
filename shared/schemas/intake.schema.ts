import { z } from 'zod'
import { LINE_IDS, type LineId } from '../vocabulary/lines.ts'
import { IntakeSchema, JobSchema } from './api.schema.ts'
import { FluxUnitSchema, GalaxyInputSchema } from './galaxy.schema.ts'
import { textLine } from './text.ts'

const header = textLine().min(1).max(200)
const perLine = <T extends z.ZodType>(v: T) =>
  z.object(Object.fromEntries(LINE_IDS.map((id) => [id, v.optional()])) as Record<LineId, z.ZodOptional<T>>).strict()

/** Which CSV column feeds which field. Values are header names of the uploaded file. */
export const ColumnMappingSchema = z.object({
  id: header,
  redshift: header.optional(),
  ra: header.optional(),
  dec: header.optional(),
  lines: perLine(z.object({ flux: header, error: header.optional(), limit: header.optional() }).strict()).default({}),
  ew: perLine(header).default({}),
  fwhm: perLine(header).default({}),
}).strict().meta({ id: 'ColumnMapping' })
export type ColumnMapping = z.output<typeof ColumnMappingSchema>

/**
 * How the file marks a non-detection:
 * - `limit-column`: a separate column per line holds the upper limit (flux left empty);
 * - `negative-error`: a negative error says the flux cell holds an upper limit;
 * - `snr-only`: no marker; lines below the project's minimum S/N become limits.
 */
export const NonDetectionSchema = z.enum(['limit-column', 'negative-error', 'snr-only'])

/**
 * What an intake does with a galaxy whose ID the project already has:
 * - `skip`: leave the stored galaxy as it is (the default for CSV files);
 * - `replace`: the new record replaces the stored one (the batch API's upsert);
 * - `merge`: keep the stored lines and overlay the new ones (also redshift, RA, Dec, EW, FWHM when given).
 * Replaced and merged records stay retrievable, and the intake can be undone.
 */
export const OnExistingSchema = z.enum(['skip', 'replace', 'merge']).meta({ id: 'OnExisting' })
export type OnExisting = z.output<typeof OnExistingSchema>

export const IntakeOptionsSchema = z.object({
  mapping: ColumnMappingSchema,
  fluxUnit: FluxUnitSchema.default(1).meta({ description: 'erg s⁻¹ cm⁻² per flux unit of the file' }),
  nonDetection: NonDetectionSchema.default('limit-column'),
  saveMappingAs: textLine().trim().min(1).max(120).optional(),
  onExisting: OnExistingSchema.default('skip').meta({ description: 'rows whose galaxy ID the project already has: skip (default), replace or merge; validate reports how many there are' }),
}).strict().meta({ id: 'IntakeOptions' })
export type IntakeOptions = z.output<typeof IntakeOptionsSchema>

export const IntakeProblemSchema = z.object({
  row: z.number().int().meta({ description: 'line of the file' }), column: z.number().int().nullable().meta({ description: '1-based column' }),
  field: z.string().nullable(), message: z.string(),
})
export type IntakeProblem = z.output<typeof IntakeProblemSchema>

/** The check of a staged file under a mapping: nothing is stored. */
export const IntakeReportSchema = z.object({
  rowsTotal: z.number().int(), rowsValid: z.number().int(), problemCount: z.number().int(),
  problems: z.array(IntakeProblemSchema).meta({ description: 'the first 500' }),
  existing: z.number().int().meta({ description: 'valid rows whose galaxy ID the project already has (what onExisting decides about)' }),
  onExisting: OnExistingSchema,
}).meta({ id: 'IntakeReport' })

/** Counts of a stored intake. `replaced` + `merged` records are kept as earlier versions. */
export const IntakeCountsSchema = z.object({
  inserted: z.number().int(), updated: z.number().int().meta({ description: 'replaced + merged' }),
  replaced: z.number().int(), merged: z.number().int(), skipped: z.number().int(),
})
export type IntakeCounts = z.output<typeof IntakeCountsSchema>

// ---- answers of the intake routes ----------------------------------------------------------------

/** POST …/intakes/csv: the staged file's preview and a suggested mapping. */
export const StagedIntakeSchema = z.object({
  intake: IntakeSchema, delimiter: z.string(), headers: z.array(z.string()), previewRows: z.array(z.array(z.string())), rowCount: z.number().int(),
  commentLines: z.number().int().meta({ description: '`#` comment lines skipped (before the header or between rows)' }),
  suggestedMapping: ColumnMappingSchema, savedMappings: z.array(z.object({ name: z.string(), mapping: ColumnMappingSchema })),
})

/** A commit stored within the request: the stored report's counts and options beside the intake and its job. */
export const IntakeCommittedSchema = z.object({ intake: IntakeSchema, job: JobSchema }).extend(IntakeCountsSchema.shape)
  .extend({ onExisting: OnExistingSchema, fluxUnit: z.number(), nonDetection: NonDetectionSchema, jobId: z.uuid() })

/** A commit or an undo left to a background job: follow the job, then read the intake. */
export const IntakeJobStartedSchema = z.object({ intake: IntakeSchema, job: JobSchema })

/** An undo done within the request. */
export const IntakeUndoneSchema = z.object({ intake: IntakeSchema, restored: z.number().int(), removed: z.number().int() })

/** What an intake row keeps of its commit (counts and options), of a failed commit (problems) and of its undo. */
export const StoredReportSchema = IntakeCountsSchema.partial().extend({
  onExisting: OnExistingSchema.optional(), fluxUnit: z.number().optional(), nonDetection: NonDetectionSchema.optional(),
  jobId: z.uuid().optional().meta({ description: 'the job that stored a CSV' }),
  problems: z.array(IntakeProblemSchema).optional().meta({ description: 'why the last commit was refused (nothing was stored)' }),
  problemCount: z.number().int().optional(), error: z.string().optional(),
  errors: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  undone: z.object({ at: z.string(), by: z.object({ id: z.uuid(), name: z.string().nullable() }), restored: z.number().int(), removed: z.number().int() }).optional(),
}).nullable().meta({ description: 'null until a commit; then what it stored, or why it was refused' })

/** GET …/intakes/{id}: one intake with its report. */
export const IntakeDetailSchema = IntakeSchema.extend({ report: StoredReportSchema })

/** A stored galaxy record, as an intake wrote it. */
export const GalaxyRecordSchema = z.object({
  id: z.string(), redshift: z.number().nullable(), fluxUnit: z.number(), ra: z.number().nullable(), dec: z.number().nullable(),
  lines: GalaxyInputSchema.shape.lines, ew: GalaxyInputSchema.shape.ew.unwrap().nullable(), fwhm: GalaxyInputSchema.shape.fwhm.unwrap().nullable(),
})

/** A galaxy's record as it was before an intake replaced or merged into it (GET …/galaxies/{id}/versions). */
export const GalaxyVersionSchema = z.object({
  writtenBy: z.string().nullable().meta({ description: 'the intake that had written the record' }), writtenAt: z.string(), replacedAt: z.string(),
  supersededBy: z.object({ intakeId: z.string(), kind: z.string(), fileName: z.string().nullable(), createdAt: z.string() }), record: GalaxyRecordSchema,
})
