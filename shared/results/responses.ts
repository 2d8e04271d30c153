/**
 * zod schemas of the galaxy list, the galaxy detail and the project overview answers, for the
 * OpenAPI document. The list item and the overview's histograms are made from the registry.
 */
import { z } from 'zod'
import { DIAGRAM_CLASSES } from '../vocabulary/classes.ts'
import { GalaxyInputSchema } from '../schemas/galaxy.schema.ts'
import { GalaxyResultSchema } from '../schemas/diagnostics-result.schema.ts'
import { IntakeSchema, ProjectSchema } from '../schemas/api.schema.ts'
import { RESULT_FIELDS, type ResultField } from './registry.ts'
import { LIST_FIELDS } from './list.ts'

const described = (f: ResultField, s: z.ZodType) => s.meta({ description: f.kind === 'flags' ? 'number of flags' : f.unit ? `${f.description} (${f.unit})` : f.description })

/** A field's value in a list item (see `listValue`). */
function listSchema(f: ResultField): z.ZodType {
  switch (f.kind) {
    case 'text': return described(f, z.string())
    case 'class': return described(f, z.enum(DIAGRAM_CLASSES[f.diagram!]))
    case 'flags': return described(f, z.number().int().min(0))
    default: return described(f, z.number().nullable())
  }
}

type Shape = { [k: string]: z.ZodType | Shape }
const toObject = (shape: Shape): z.ZodObject => z.object(Object.fromEntries(Object.entries(shape)
  .map(([k, v]) => [k, v instanceof z.ZodType ? v : toObject(v)])))

/** One galaxy of the list: the registry's list fields at their places. */
export const GalaxySummarySchema = (() => {
  const shape: Shape = {}
  for (const f of LIST_FIELDS) {
    const path = f.list!
    let node = shape
    for (const k of path.slice(0, -1)) node = (node[k] ??= {}) as Shape
    node[path[path.length - 1]] = listSchema(f)
  }
  return toObject(shape).meta({ id: 'GalaxySummary' })
})()

export const GalaxyPageSchema = z.object({
  revision: z.number().int().meta({ description: 'the assumptions revision the results were computed under' }),
  total: z.number().int().meta({ description: 'galaxies matching the filters' }),
  items: z.array(GalaxySummarySchema),
  nextCursor: z.string().nullable().meta({ description: 'pass as cursor (with the same sort) for the next page; null on the last' }),
}).meta({ id: 'GalaxyPage' })


const line = GalaxyInputSchema.shape
const GalaxyResultsSchema = z.object({
  revision: z.number().int().nullable().meta({ description: 'null: no results yet' }),
  methodVersion: z.string().nullable(),
  computedAt: z.string().nullable(),
  results: GalaxyResultSchema.nullable(),
})

export const GalaxyDetailSchema = z.object({
  id: z.string(), redshift: z.number().nullable(), fluxUnit: z.number(), ra: z.number().nullable(), dec: z.number().nullable(),
  lines: line.lines.meta({ description: 'the lines as stored' }),
  ew: line.ew.unwrap().nullable(),
  fwhm: line.fwhm.unwrap().nullable(),
  provenance: z.object({ source: z.literal('line-fit'), spectrumId: z.number().int(), revision: z.number().int() }).nullable()
    .meta({ description: 'where the lines came from when not from an intake\'s rows: measured by the fit of the galaxy\'s spectrum under that assumptions revision' }),
  ...GalaxyResultsSchema.shape,
  history: z.array(z.object({
    intakeId: z.uuid(), kind: IntakeSchema.shape.kind, fileName: z.string().nullable(), createdAt: z.string(), by: z.string().nullable(),
    change: z.enum(['created', 'replaced', 'merged']).nullable().meta({ description: 'what the intake did to the galaxy; earlier records: GET …/versions' }),
  })),
  revisions: z.array(z.object({ revision: z.number().int(), methodVersion: z.string(), computedAt: z.string() })),
}).meta({ id: 'GalaxyDetail' })

/** A galaxy's results under one assumptions revision (GET …/galaxies/{id}/results/{revision}). */
export const GalaxyRevisionResultsSchema = z.object({ revision: z.number().int(), methodVersion: z.string(), computedAt: z.string(), results: GalaxyResultSchema })

export const HistogramSchema = z.object({
  edges: z.array(z.number()).meta({ description: 'bins + 1 edges; of log10 of the quantity when log' }),
  counts: z.array(z.number().int()),
  log: z.boolean(),
}).meta({ id: 'Histogram' })

const HISTOGRAM_FIELDS = RESULT_FIELDS.filter((f) => f.histogram)
export const ProjectOverviewSchema = z.object({
  project: ProjectSchema,
  revision: z.number().int().meta({ description: 'the revision the counts and histograms are of' }),
  classCounts: z.object(Object.fromEntries(RESULT_FIELDS.filter((f) => f.kind === 'class')
    .map((f) => [f.diagram!, z.record(z.enum(DIAGRAM_CLASSES[f.diagram!]), z.number().int())]))),
  histograms: z.object(Object.fromEntries(HISTOGRAM_FIELDS.map((f) => [f.key, HistogramSchema])))
    .meta({ description: HISTOGRAM_FIELDS.map((f) => `${f.key}: ${f.histogram!.log ? 'log10 of ' : ''}${f.description}${f.unit ? ` (${f.unit})` : ''}`).join('; ') }),
  latestIntakes: z.array(IntakeSchema),
  kinematics: z.object({
    fitted: z.number().int().meta({ description: 'spectra with a line fit under the revision' }),
    broadFraction: z.number().nullable().meta({ description: 'share of the fits with a broad Hα component (null: none fitted)' }),
    velocity: z.object({ bins: z.array(z.number()), counts: z.array(z.number().int()) }).meta({ description: 'narrow Hα (else [O III] 5007) velocity offsets from the redshift, km/s; bins are the edges' }),
    sigma: z.object({ bins: z.array(z.number()), counts: z.array(z.number().int()) }).meta({ description: 'their intrinsic σ, km/s' }),
  }),
}).meta({ id: 'ProjectOverview' })
