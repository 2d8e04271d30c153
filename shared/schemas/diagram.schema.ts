import { z } from 'zod'
import { DIAGRAM_CLASSES as CLASS_NAMES } from '../vocabulary/classes.ts'
import type { DiagramColumnsJson } from '../diagram-columns.ts'

/**
 * The JSON form of GET …/diagram (the binary form carries the same columns: shared/diagram-columns.ts).
 * Every array has `count` entries, aligned by index.
 */
const values = (description: string) => z.array(z.number().nullable()).meta({ description })
const perDiagram = <T extends z.ZodType>(v: T) => z.object({ nii: v, sii: v, oi: v })
const perClassification = <T extends z.ZodType>(v: T) => z.object({ overall: v, nii: v, sii: v, oi: v, whan: v })
const limits = z.array(z.number().int().min(-1).max(1)).meta({ description: '0 measured, 1 upper limit, −1 lower limit' })

export const DiagramColumnsSchema = z.object({
  revision: z.number().int().meta({ description: 'the assumptions revision the results were computed under' }),
  count: z.number().int(),
  ids: z.array(z.string()),
  redshift: values('redshift'),
  class: perClassification(z.array(z.number().int().min(0)).meta({ description: 'codes: indexes into classNames' })),
  classNames: z.object({
    overall: z.array(z.enum(CLASS_NAMES.overall)), nii: z.array(z.enum(CLASS_NAMES.nii)), sii: z.array(z.enum(CLASS_NAMES.sii)),
    oi: z.array(z.enum(CLASS_NAMES.oi)), whan: z.array(z.enum(CLASS_NAMES.whan)),
  }).meta({ description: 'the class vocabulary of each classification, in code order' }),
  x: perDiagram(values('log10 [N II]/Hα, [S II]/Hα or [O I]/Hα (dex, 10⁻⁴ precision)')),
  y: values('log10 [O III]/Hβ (dex, 10⁻⁴ precision)'),
  xErr: perDiagram(values('1σ error of x (dex)')),
  yErr: values('1σ error of y (dex)'),
  xLimit: perDiagram(limits),
  yLimit: limits,
  ewHalpha: values('Hα equivalent width, Å (emission positive)'),
}).meta({ id: 'DiagramColumns' })

// the schema describes what the server builds and the dashboard decodes: the same fields, compatible types
type Doc = z.output<typeof DiagramColumnsSchema>
const _sameShape: Doc extends DiagramColumnsJson ? (keyof DiagramColumnsJson extends keyof Doc ? true : never) : never = true
void _sameShape
