/**
 * zod schema of one diagnostics result: the one definition of its shape. The OpenAPI document of
 * POST /api/v1/diagnostics and the stored results are described by it, and `GalaxyResult`
 * (shared/diagnostics/types.ts) and the dashboard's types are `z.infer` of it. The science library
 * imports only those types, never zod at run time.
 */
import { z } from 'zod'
import { IMFS, METALLICITY_KEYS, type MetallicityKey } from '../vocabulary/calibrations.ts'
import { DIAGRAM_CLASSES, NII_SUBTYPES } from '../vocabulary/classes.ts'
import type { DemarcationKey } from '../vocabulary/curves.ts'
import { DENSITY_LIMIT_FLAGS } from '../vocabulary/flags.ts'
import { LINE_IDS, type LineId } from '../vocabulary/lines.ts'
import { BALMER_DECREMENT_KEYS, LIMIT_KINDS, RATIO_KEYS, type RatioKey } from '../vocabulary/ratios.ts'

const num = z.number()
const nullableNum = z.number().nullable()
const Percentiles = z.object({ p16: num, p50: num, p84: num }).meta({ description: 'Monte Carlo 16th/50th/84th percentiles (only when monteCarlo.draws > 0)' })
const pct = Percentiles.optional()
const flags = z.array(z.string())

type PercentileShape<K extends string> = { [P in K as `${P}Percentiles`]: typeof pct }

/** Build an object schema where every listed numeric key also gets an optional `<key>Percentiles`. */
function withPercentiles<T extends z.ZodRawShape, K extends keyof T & string>(shape: T, valueKeys: readonly K[]) {
  const extra: Record<string, typeof pct> = {}
  for (const k of valueKeys) extra[`${k}Percentiles`] = pct
  return z.object({ ...shape, ...(extra as PercentileShape<K>) })
}

const ExtinctionSchema = withPercentiles({
  balmerDecrement: nullableNum, balmerDecrementError: nullableNum,
  ebv: nullableNum.meta({ description: 'E(B−V) in mag, clipped at 0 (flag balmer-below-intrinsic)' }),
  ebvError: nullableNum.meta({ description: 'error of the unclipped E(B−V) estimate, mag' }),
  av: nullableNum, avError: nullableNum,
  source: z.enum(BALMER_DECREMENT_KEYS).nullable(),
  flags,
}, ['balmerDecrement', 'ebv', 'av'])

const DereddenedLineSchema = z.union([
  withPercentiles({ flux: num, error: num, aLambda: nullableNum }, ['flux', 'aLambda']),
  withPercentiles({ upperLimit: num }, ['upperLimit']),
])

const ratioShape = Object.fromEntries(RATIO_KEYS.map((k) => [k, nullableNum])) as Record<RatioKey, typeof nullableNum>
const limitKind = () => z.enum(LIMIT_KINDS).optional()
const ratioLimitShape = Object.fromEntries(RATIO_KEYS.map((k) => [k, limitKind()])) as Record<RatioKey, ReturnType<typeof limitKind>>

const NiiClass = z.enum(DIAGRAM_CLASSES.nii)
const SiiOiClass = z.enum(DIAGRAM_CLASSES.sii)
const WhanClass = z.enum(DIAGRAM_CLASSES.whan)
const OverallClass = z.enum(DIAGRAM_CLASSES.overall)
const probs = <E extends z.ZodEnum>(e: E) => z.record(e, num)

const ClassesSchema = z.object({
  nii: NiiClass, sii: SiiOiClass, oi: SiiOiClass, whan: WhanClass, overall: OverallClass,
  niiSubtype: z.enum(NII_SUBTYPES).nullable(),
  classProbabilities: z.object({
    nii: probs(NiiClass), sii: probs(SiiOiClass), oi: probs(SiiOiClass), whan: probs(WhanClass), overall: probs(OverallClass),
  }).optional().meta({ description: 'fraction of Monte Carlo draws in each class, per diagram' }),
})

const NiiDistancesSchema = withPercentiles({
  ka03: num, ka03Error: num, ke01: num, ke01Error: num, s07: num, s07Error: num,
  nearest: z.enum(['ka03', 'ke01'] as const satisfies readonly DemarcationKey[]), nearestDistance: num,
}, ['ka03', 'ke01', 's07', 'nearestDistance'])
const SeyfertLinerDistancesSchema = withPercentiles({
  ke01: num, ke01Error: num, ke06: num, ke06Error: num, nearest: z.literal('ke01' satisfies DemarcationKey), nearestDistance: num,
}, ['ke01', 'ke06', 'nearestDistance'])

const DensitySchema = withPercentiles({
  ne: nullableNum.meta({ description: 'n_e in cm⁻³; null at a density limit (the bound is not reported)' }),
  neError: nullableNum, ratio: num, ratioError: nullableNum,
  flag: z.enum(DENSITY_LIMIT_FLAGS).nullable(),
}, ['ne', 'ratio'])

const TemperatureSchema = withPercentiles({ te: nullableNum, teError: nullableNum, neUsed: nullableNum, flags }, ['te', 'neUsed'])

const metallicityShape = Object.fromEntries(METALLICITY_KEYS.flatMap((k) => [[k, nullableNum], [`${k}Error`, nullableNum]])) as
  Record<MetallicityKey | `${MetallicityKey}Error`, typeof nullableNum>
const MetallicitySchema = withPercentiles({ ...metallicityShape, flags }, METALLICITY_KEYS)

const SfrSchema = withPercentiles({
  luminosityDistanceMpc: nullableNum, luminosityHalpha: nullableNum, luminosityHalphaError: nullableNum,
  sfrHalpha: nullableNum, sfrHalphaError: nullableNum, sfrK98: nullableNum, sfrK98Error: nullableNum,
  sfrKe12: nullableNum, sfrKe12Error: nullableNum, imf: z.enum(IMFS), flags,
}, ['luminosityDistanceMpc', 'luminosityHalpha', 'sfrHalpha', 'sfrK98', 'sfrKe12'])

const BlackHoleSchema = withPercentiles({
  massSolar: num, log10Mass: num, log10MassError: num, luminosityBroadHalpha: num, fwhmKmPerS: num, flags,
}, ['massSolar', 'log10Mass', 'luminosityBroadHalpha'])

const dereddenedShape = Object.fromEntries(LINE_IDS.map((id) => [id, DereddenedLineSchema.optional()])) as Record<LineId, z.ZodOptional<typeof DereddenedLineSchema>>

/**
 * Everything derived for one galaxy under one set of assumptions (the response item of
 * POST /api/v1/diagnostics). Every number is finite or null, never NaN or Infinity.
 *
 * - `extinction`: Balmer decrement (Hα/Hβ, or Hγ/Hβ with source 'hgamma-hbeta'), E(B−V) (clipped at 0
 *   with `balmer-below-intrinsic`; `ebvError` is the error of the unclipped estimate), A_V and errors.
 * - `dereddened`: every submitted line; detected lines `{ flux, error, aLambda }` (flux corrected by
 *   10^(0.4 k E); without a decrement the observed flux with `aLambda: null`); upper limits
 *   `{ upperLimit }` (corrected the same way). `halpha_broad` is corrected like Hα here, but the
 *   black-hole mass uses the observed broad flux.
 * - `ratios`: log10 of observed niiHa, oiiiHb, siiHa, oiHa; linear siiDoublet, oiiDoublet; null when
 *   not computable. A ratio with an upper limit in the numerator is an upper limit, in the denominator
 *   a lower limit: `ratioLimits[key]` says 'upper' or 'lower' and `flags` holds
 *   `ratio-limit:<key>:upper|lower`; `ratioErrors[key]` is null for limits.
 * - `classes`: per diagram and overall (Kewley et al. 2006 with shared/science/README.md §2.4 conventions), WHAN,
 *   S07 subtype of an [N II] AGN; every `unclassified` comes with a flag saying why
 *   (`missing-line:<diagram>`, `limit-not-decisive:<diagram>`, `whan-needs-ew-halpha`, `overall-needs-nii`…).
 * - `distances`: signed perpendicular distances (dex) to each curve, positive on the AGN (or Seyfert)
 *   side, with first-order errors; null unless both ratios of the diagram are measured.
 * - `density`: [S II] and [O II] n_e (cm⁻³) at `settings.electronTemperature`; `ne: null` with
 *   `flag` 'low-density-limit' | 'high-density-limit' at the ends of the fit (the bound is not reported).
 * - `temperature`: [O III] and [N II] T_e (K) from dereddened fluxes, iterated with the [S II] density.
 * - `metallicity`: 12 + log(O/H) of six calibrations, for star-forming nuclei only.
 * - `sfr`: D_L (Mpc), L(Hα) (erg s⁻¹), SFR (M☉ yr⁻¹) Kennicutt 1998 and Kennicutt & Evans 2012.
 * - `blackHoleMass`: Greene & Ho 2005 virial mass from `halpha_broad` and `fwhm.halpha_broad`; null
 *   when no broad Hα was given or when it cannot be computed (with a flag).
 * - `flags`: every flag of the galaxy, deduplicated, including `below-min-snr:<line>`.
 * - With `monteCarlo.draws > 0`, every measured number `x` (not the `…Error` fields) gains
 *   `xPercentiles: { p16, p50, p84 }` over the finite draws, and `classes.classProbabilities` gives,
 *   per diagram, the fraction of draws in each class (including `unclassified`).
 */
export const GalaxyResultSchema = z.object({
  id: z.string(),
  extinction: ExtinctionSchema,
  dereddened: z.object(dereddenedShape).meta({ description: 'every submitted line, dereddened; upper limits as { upperLimit }' }),
  ratios: withPercentiles(ratioShape, RATIO_KEYS).meta({ description: 'log10 of observed ratios; siiDoublet and oiiDoublet linear' }),
  ratioErrors: z.object(ratioShape),
  ratioLimits: z.object(ratioLimitShape),
  classes: ClassesSchema,
  distances: z.object({ nii: NiiDistancesSchema.nullable(), sii: SeyfertLinerDistancesSchema.nullable(), oi: SeyfertLinerDistancesSchema.nullable() })
    .meta({ description: 'signed perpendicular distances (dex) to the demarcation curves, positive on the AGN/Seyfert side' }),
  density: z.object({ sii: DensitySchema.nullable(), oii: DensitySchema.nullable() }),
  temperature: z.object({ oiii: TemperatureSchema.nullable(), nii: TemperatureSchema.nullable() }),
  metallicity: MetallicitySchema,
  sfr: SfrSchema,
  blackHoleMass: BlackHoleSchema.nullable(),
  flags: flags.meta({ description: 'every flag of the galaxy, deduplicated' }),
}).meta({ id: 'GalaxyResult', description: 'Diagnostics of one galaxy nucleus; every number is finite or null' })

