import { classCode } from '../../shared/vocabulary/classes.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'

/** Bits of results.limits: which diagram coordinate is a limit, and which way. */
export const LIMIT_BITS = {
  niiHa: { upper: 1, lower: 2 }, siiHa: { upper: 4, lower: 8 }, oiHa: { upper: 16, lower: 32 }, oiiiHb: { upper: 64, lower: 128 },
} as const

type Num = number | null | undefined
const num = (v: Num) => (typeof v === 'number' && Number.isFinite(v) ? v : null)

const FLOAT4_MAX = 3.4028234663852886e38
const FLOAT4_MIN_NORMAL = 1.1754943508222875e-38
/**
 * A finite number as a `real` column can hold it. Derived values such as a star-formation rate or
 * a ratio error can leave float4's range (±3.4·10³⁸) while the result document (double) holds them
 * exactly; the column copy saturates at the largest float4 (so filters and sorting still put it
 * beyond every bound) and flushes magnitudes below the smallest normal float4 to 0.
 */
export function float4(v: Num): number | null {
  const n = num(v)
  if (n === null) return null
  if (Math.abs(n) > FLOAT4_MAX) return Math.sign(n) * FLOAT4_MAX
  if (Math.abs(n) < FLOAT4_MIN_NORMAL) return 0
  return n
}

// The result is the science library's GalaxyResult; read defensively, it is also what was stored.
// eslint-disable-next-line @typescript-eslint/no-explicit-any
type AnyResult = any

/** S/N of a detected line; 0 for a limit, null when not measured. */
function snr(g: GalaxyInputDto, id: 'halpha' | 'hbeta'): number | null {
  const v = g.lines[id]
  if (!v) return null
  if (v.upperLimit !== undefined) return 0
  return v.flux! / v.error!
}

/** The columns stored beside each result for filters, sorting and the diagram endpoint. */
export function resultColumns(g: GalaxyInputDto, r: AnyResult) {
  let limits = 0
  for (const [key, bits] of Object.entries(LIMIT_BITS)) {
    const dir = r.ratioLimits?.[key]
    if (dir === 'upper') limits |= bits.upper
    else if (dir === 'lower') limits |= bits.lower
  }
  const sa = snr(g, 'halpha'), sb = snr(g, 'hbeta')
  return {
    classOverall: classCode('overall', r.classes?.overall),
    classNii: classCode('nii', r.classes?.nii),
    classSii: classCode('sii', r.classes?.sii),
    classOi: classCode('oi', r.classes?.oi),
    classWhan: classCode('whan', r.classes?.whan),
    xNii: float4(r.ratios?.niiHa), xSii: float4(r.ratios?.siiHa), xOi: float4(r.ratios?.oiHa), yOiii: float4(r.ratios?.oiiiHb),
    xNiiErr: float4(r.ratioErrors?.niiHa), xSiiErr: float4(r.ratioErrors?.siiHa), xOiErr: float4(r.ratioErrors?.oiHa), yOiiiErr: float4(r.ratioErrors?.oiiiHb),
    limits,
    ewHalpha: float4(g.ew?.halpha),
    snrMin: sa === null || sb === null ? null : float4(Math.min(sa, sb)),
    ebv: float4(r.extinction?.ebv), ebvError: float4(r.extinction?.ebvError), av: float4(r.extinction?.av),
    neSii: float4(r.density?.sii?.ne), neOii: float4(r.density?.oii?.ne), teOiii: float4(r.temperature?.oiii?.te),
    n2Pp04: float4(r.metallicity?.n2Pp04), o3n2Pp04: float4(r.metallicity?.o3n2Pp04),
    sfrHalpha: float4(r.sfr?.sfrHalpha),
    flagCount: Array.isArray(r.flags) ? Math.min(r.flags.length, 32767) : 0,
  }
}
export type ResultColumns = ReturnType<typeof resultColumns>

/** One row for `upsertResults`: the galaxy, its filter columns under their SQL names, and the result. */
export function resultRow(galaxyId: number | undefined, g: GalaxyInputDto, result: unknown): Record<string, unknown> {
  const cols = resultColumns(g, result)
  const row: Record<string, unknown> = { galaxy_id: galaxyId, result }
  for (const [key, column] of RESULT_COLUMN_SQL) row[column] = cols[key]
  return row
}

/** Column name in SQL for each stored column, with its SQL type (for json_to_recordset). */
export const RESULT_COLUMN_SQL: Array<[keyof ResultColumns, string, string]> = [
  ['classOverall', 'class_overall', 'smallint'], ['classNii', 'class_nii', 'smallint'], ['classSii', 'class_sii', 'smallint'],
  ['classOi', 'class_oi', 'smallint'], ['classWhan', 'class_whan', 'smallint'],
  ['xNii', 'x_nii', 'real'], ['xSii', 'x_sii', 'real'], ['xOi', 'x_oi', 'real'], ['yOiii', 'y_oiii', 'real'],
  ['xNiiErr', 'x_nii_err', 'real'], ['xSiiErr', 'x_sii_err', 'real'], ['xOiErr', 'x_oi_err', 'real'], ['yOiiiErr', 'y_oiii_err', 'real'],
  ['limits', 'limits', 'smallint'], ['ewHalpha', 'ew_halpha', 'real'], ['snrMin', 'snr_min', 'real'],
  ['ebv', 'ebv', 'real'], ['ebvError', 'ebv_error', 'real'], ['av', 'av', 'real'],
  ['neSii', 'ne_sii', 'real'], ['neOii', 'ne_oii', 'real'], ['teOiii', 'te_oiii', 'real'],
  ['n2Pp04', 'n2_pp04', 'real'], ['o3n2Pp04', 'o3n2_pp04', 'real'], ['sfrHalpha', 'sfr_halpha', 'real'],
  ['flagCount', 'flag_count', 'smallint'],
]
