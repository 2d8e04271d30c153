import { z } from 'zod'
import { JobSchema } from './api.schema.ts'
import { SettingsSchema } from './galaxy.schema.ts'
import { textBlock } from './text.ts'

/** One revision of a project's assumptions: every result is computed under one. */
export const AssumptionsRevisionSchema = z.object({
  revision: z.number().int(), settings: SettingsSchema, note: z.string(), createdAt: z.string(),
  createdBy: z.object({ id: z.string().nullable(), name: z.string().nullable() }).nullable(),
}).meta({ id: 'AssumptionsRevision' })

/** GET …/assumptions: the current revision, the newest whose recompute finished, and all of them newest first. */
export const AssumptionsSchema = z.object({ current: AssumptionsRevisionSchema, resultsRevision: z.number().int(), revisions: z.array(AssumptionsRevisionSchema) })

/** PUT …/assumptions: the complete settings of the new revision and why. */
export const AssumptionsChangeSchema = z.object({ settings: SettingsSchema, note: textBlock().max(2000).default('') }).strict()

/** The new revision and the job recomputing every galaxy under it. */
export const AssumptionsChangedSchema = z.object({ revision: AssumptionsRevisionSchema, job: JobSchema })
