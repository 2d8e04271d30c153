/**
 * zod schema of one diagnostics result (`GalaxyResult` in shared/diagnostics/types.ts), for the
 * OpenAPI document of POST /api/v1/diagnostics and the stored results. The science library itself
 * never imports zod; this file only describes its output.
 */
import { z } from 'zod'
import { LINE_IDS } from '../lines/index.ts'

const num = z.number()
const nullableNum = z.number().nullable()
const Percentiles = z.object({ p16: num, p50: num, p84: num }).meta({ description: 'Monte Carlo 16th/50th/84th percentiles (only when monteCarlo.draws > 0)' })
const pct = Percentiles.optional()
const flags = z.array(z.string())

/** Build an object schema where every listed numeric key also gets an optional `<key>Percentiles`. */
function withPercentiles<T extends z.ZodRawShape>(shape: T, valueKeys: readonly string[]) {
  const extra: Record<string, typeof pct> = {}
  for (const k of valueKeys) extra[`${k}Percentiles`] = pct
  return z.object({ ...shape, ...extra })
}

const ExtinctionSchema = withPercentiles({
  balmerDecrement: nullableNum, balmerDecrementError: nullableNum,
  ebv: nullableNum.meta({ description: 'E(B−V) in mag, clipped at 0 (flag balmer-below-intrinsic)' }),
  ebvError: nullableNum.meta({ description: 'error of the unclipped E(B−V) estimate, mag' }),
  av: nullableNum, avError: nullableNum,
  source: z.enum(['halpha-hbeta', 'hgamma-hbeta']).nullable(),
  flags,
}, ['balmerDecrement', 'ebv', 'av'])

const DereddenedLineSchema = z.union([
  withPercentiles({ flux: num, error: num, aLambda: nullableNum }, ['flux', 'aLambda']),
  withPercentiles({ upperLimit: num }, ['upperLimit']),
])

const RATIO_KEYS = ['niiHa', 'oiiiHb', 'siiHa', 'oiHa', 'siiDoublet', 'oiiDoublet'] as const
const ratioShape = Object.fromEntries(RATIO_KEYS.map((k) => [k, nullableNum])) as Record<(typeof RATIO_KEYS)[number], typeof nullableNum>

const NiiClass = z.enum(['star-forming', 'composite', 'agn', 'unclassified'])
const SiiOiClass = z.enum(['star-forming', 'seyfert', 'liner', 'unclassified'])
const WhanClass = z.enum(['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'])
const OverallClass = z.enum(['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'])
const probs = (e: z.ZodEnum) => z.record(e, num)

const ClassesSchema = z.object({
  nii: NiiClass, sii: SiiOiClass, oi: SiiOiClass, whan: WhanClass, overall: OverallClass,
  niiSubtype: z.enum(['seyfert', 'liner']).nullable(),
  classProbabilities: z.object({
    nii: probs(NiiClass), sii: probs(SiiOiClass), oi: probs(SiiOiClass), whan: probs(WhanClass), overall: probs(OverallClass),
  }).optional().meta({ description: 'fraction of Monte Carlo draws in each class, per diagram' }),
})

const NiiDistancesSchema = withPercentiles({
  ka03: num, ka03Error: num, ke01: num, ke01Error: num, s07: num, s07Error: num,
  nearest: z.enum(['ka03', 'ke01']), nearestDistance: num,
}, ['ka03', 'ke01', 's07', 'nearestDistance'])
const SeyfertLinerDistancesSchema = withPercentiles({
  ke01: num, ke01Error: num, ke06: num, ke06Error: num, nearest: z.literal('ke01'), nearestDistance: num,
}, ['ke01', 'ke06', 'nearestDistance'])

const DensitySchema = withPercentiles({
  ne: nullableNum.meta({ description: 'n_e in cm⁻³; null at a density limit (the bound is not reported)' }),
  neError: nullableNum, ratio: num, ratioError: nullableNum,
  flag: z.enum(['low-density-limit', 'high-density-limit']).nullable(),
}, ['ne', 'ratio'])

const TemperatureSchema = withPercentiles({ te: nullableNum, teError: nullableNum, neUsed: nullableNum, flags }, ['te', 'neUsed'])

const METALLICITY_KEYS = ['n2Pp04', 'n2Pp04Cubic', 'o3n2Pp04', 'n2M13', 'o3n2M13', 'n2s2haD16'] as const
const MetallicitySchema = withPercentiles({
  ...Object.fromEntries(METALLICITY_KEYS.flatMap((k) => [[k, nullableNum], [`${k}Error`, nullableNum]])),
  flags,
}, METALLICITY_KEYS)

const SfrSchema = withPercentiles({
  luminosityDistanceMpc: nullableNum, luminosityHalpha: nullableNum, luminosityHalphaError: nullableNum,
  sfrHalpha: nullableNum, sfrHalphaError: nullableNum, sfrK98: nullableNum, sfrK98Error: nullableNum,
  sfrKe12: nullableNum, sfrKe12Error: nullableNum, imf: z.enum(['salpeter', 'kroupa']), flags,
}, ['luminosityDistanceMpc', 'luminosityHalpha', 'sfrHalpha', 'sfrK98', 'sfrKe12'])

const BlackHoleSchema = withPercentiles({
  massSolar: num, log10Mass: num, log10MassError: num, luminosityBroadHalpha: num, fwhmKmPerS: num, flags,
}, ['massSolar', 'log10Mass', 'luminosityBroadHalpha'])

const dereddenedShape = Object.fromEntries(LINE_IDS.map((id) => [id, DereddenedLineSchema.optional()]))

/** One galaxy's diagnostics; see `GalaxyResult` (shared/diagnostics/types.ts) for every field's meaning. */
export const GalaxyResultSchema = z.object({
  id: z.string(),
  extinction: ExtinctionSchema,
  dereddened: z.object(dereddenedShape).meta({ description: 'every submitted line, dereddened; upper limits as { upperLimit }' }),
  ratios: withPercentiles(ratioShape, RATIO_KEYS).meta({ description: 'log10 of observed ratios; siiDoublet and oiiDoublet linear' }),
  ratioErrors: z.object(ratioShape),
  ratioLimits: z.object(Object.fromEntries(RATIO_KEYS.map((k) => [k, z.enum(['upper', 'lower']).optional()]))),
  classes: ClassesSchema,
  distances: z.object({ nii: NiiDistancesSchema.nullable(), sii: SeyfertLinerDistancesSchema.nullable(), oi: SeyfertLinerDistancesSchema.nullable() })
    .meta({ description: 'signed perpendicular distances (dex) to the demarcation curves, positive on the AGN/Seyfert side' }),
  density: z.object({ sii: DensitySchema.nullable(), oii: DensitySchema.nullable() }),
  temperature: z.object({ oiii: TemperatureSchema.nullable(), nii: TemperatureSchema.nullable() }),
  metallicity: MetallicitySchema,
  sfr: SfrSchema,
  blackHoleMass: BlackHoleSchema.nullable(),
  flags: flags.meta({ description: 'every flag of the galaxy, deduplicated' }),
}).meta({ description: 'Diagnostics of one galaxy nucleus; every number is finite or null' })

export type GalaxyResultDto = z.infer<typeof GalaxyResultSchema>
