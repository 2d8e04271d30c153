import { z } from 'zod'
import { FluxUnitSchema, LINE_ID_LIST } from './galaxy.schema.ts'
import { textLine } from './text.ts'

const header = textLine().min(1).max(200)
const perLine = <T extends z.ZodType>(v: T) =>
  z.object(Object.fromEntries(LINE_ID_LIST.map((id) => [id, v.optional()])) as Record<(typeof LINE_ID_LIST)[number], z.ZodOptional<T>>).strict()

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

export const IntakeOptionsSchema = z.object({
  mapping: ColumnMappingSchema,
  fluxUnit: FluxUnitSchema.default(1).meta({ description: 'erg s⁻¹ cm⁻² per flux unit of the file' }),
  nonDetection: NonDetectionSchema.default('limit-column'),
  saveMappingAs: textLine().trim().min(1).max(120).optional(),
}).strict().meta({ id: 'IntakeOptions' })
export type IntakeOptions = z.output<typeof IntakeOptionsSchema>

export interface IntakeProblem { row: number; column: number | null; field: string | null; message: string }
