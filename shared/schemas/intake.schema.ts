import { z } from 'zod'
import { LINE_IDS, type LineId } from '../vocabulary/lines.ts'
import { FluxUnitSchema } from './galaxy.schema.ts'
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
