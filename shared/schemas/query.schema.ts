import { z } from 'zod'
import { DIAGRAM_CLASSES } from '../vocabulary/classes.ts'
import { positiveInt4, textLine } from './text.ts'
import { CLASS_FILTERS, RANGE_KEYS, SORT_KEYS, type ClassParam } from '../results/registry.ts'

/** Query-string list: repeated parameter or comma-separated. */
const list = <const T extends readonly string[]>(values: T) =>
  z.preprocess((v) => (v === undefined ? undefined : (Array.isArray(v) ? v : [v]).flatMap((s) => String(s).split(',')).filter(Boolean)),
    z.array(z.enum(values)).optional())

const num = z.coerce.number().refine(Number.isFinite, 'must be a finite number')

/** `?range=` fields: the registry's fields with `range` (shared/results/registry.ts). */
export const RANGE_FIELD_NAMES = RANGE_KEYS

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/

const RangeSchema = textLine().max(200).transform((s, ctx) => {
  const parts = s.split(':')
  if (parts.length !== 3) {
    ctx.addIssue({ code: 'custom', message: `range must be field:min:max (three parts, either bound may be empty), got ${parts.length} part(s)` })
    return z.NEVER
  }
  const [field, min, max] = parts
  if (!(RANGE_FIELD_NAMES as readonly string[]).includes(field)) {
    ctx.addIssue({ code: 'custom', message: `unknown range field "${field}" (one of ${RANGE_FIELD_NAMES.join(', ')})` })
    return z.NEVER
  }
  const parse = (v: string) => (v === '' ? null : DECIMAL.test(v) ? Number(v) : NaN)
  const lo = parse(min), hi = parse(max)
  if ((lo !== null && !Number.isFinite(lo)) || (hi !== null && !Number.isFinite(hi))) {
    ctx.addIssue({ code: 'custom', message: 'range must be field:min:max with finite decimal numbers (either may be empty)' })
    return z.NEVER
  }
  return { field, min: lo, max: hi }
})

const classList = (names: readonly [string, ...string[]]) => list(names)
/** One list of class names per class field of the registry (`class`, `classNii`, …). */
const classFilters = Object.fromEntries(CLASS_FILTERS.map((c) => {
  const names = classList(DIAGRAM_CLASSES[c.diagram])
  return [c.param, c.param === 'class' ? names.meta({ description: 'overall class(es), comma-separated or repeated' }) : names]
})) as Record<ClassParam, ReturnType<typeof classList>>

export const GalaxyFilterSchema = z.object({
  ...classFilters,
  q: textLine().max(120).optional().meta({ description: 'text contained in the galaxy ID' }),
  zMin: num.optional(),
  zMax: num.optional(),
  minSnr: num.optional().meta({ description: 'minimum S/N of both Hα and Hβ' }),
  range: z.preprocess((v) => (v === undefined ? undefined : Array.isArray(v) ? v : [v]), z.array(RangeSchema).optional())
    .meta({ description: `field:min:max, repeatable; either bound may be empty. Fields: ${RANGE_FIELD_NAMES.join(', ')}` }),
  revision: positiveInt4().optional().meta({ description: 'assumptions revision (default: the latest complete one)' }),
})
export type GalaxyFilter = z.output<typeof GalaxyFilterSchema>

/** `?sort=` fields (and `-field` for descending): the registry's fields with `sort`. */
export const SORT_FIELD_NAMES = SORT_KEYS

export const GalaxyListQuerySchema = GalaxyFilterSchema.extend({
  limit: z.coerce.number().int().min(1).max(1000).default(50),
  cursor: textLine().max(1000).optional().meta({ description: 'nextCursor of the previous page, with the same sort' }),
  sort: z.enum([...SORT_FIELD_NAMES, ...SORT_FIELD_NAMES.map((s) => `-${s}` as const)]).default('id'),
}).strict()

export const DiagramQuerySchema = GalaxyFilterSchema.strict()
