import { classCode } from '../../shared/vocabulary/classes.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import { RESULT_FIELDS, type ResultField } from '../../shared/results/registry.ts'
import { RESULTS_COLUMNS } from '../../shared/results/storage.ts'
import { finite, rawValue } from '../../shared/results/values.ts'

/** Bits of results.limits per ratio: which diagram coordinate is a limit, and which way (from the registry). */
export const LIMIT_BITS: Readonly<Record<string, { upper: number; lower: number }>> = Object.fromEntries(
  RESULT_FIELDS.filter((f) => f.stored?.bits).map((f) => [f.path[f.path.length - 1], f.stored!.bits!]))

const FLOAT4_MAX = 3.4028234663852886e38
const FLOAT4_MIN_NORMAL = 1.1754943508222875e-38
/**
 * A finite number as a `real` column can hold it. Derived values such as a star-formation rate or
 * a ratio error can leave float4's range (±3.4·10³⁸) while the result document (double) holds them
 * exactly; the column copy saturates at the largest float4 (so filters and sorting still put it
 * beyond every bound) and flushes magnitudes below the smallest normal float4 to 0.
 */
export function float4(v: number | null | undefined): number | null {
  const n = finite(v)
  if (n === null) return null
  if (Math.abs(n) > FLOAT4_MAX) return Math.sign(n) * FLOAT4_MAX
  if (Math.abs(n) < FLOAT4_MIN_NORMAL) return 0
  return n
}

/** The stored copy of one field: float4 numbers, class codes, flag counts (smallint), limit bits. */
function storedValue(f: ResultField, g: GalaxyInputDto, r: unknown): number | null {
  const v = rawValue(f, { input: g, result: r })
  switch (f.kind) {
    case 'class': return classCode(f.diagram!, v as string | undefined)
    case 'flags': return Array.isArray(v) ? Math.min(v.length, 32767) : 0
    case 'limit': return v === 'upper' ? f.stored!.bits!.upper : v === 'lower' ? f.stored!.bits!.lower : 0
    default: return float4(v as number | null | undefined)
  }
}

/** The columns stored beside each result for filters, sorting and the diagram endpoint, by SQL name. */
export function resultColumns(g: GalaxyInputDto, r: unknown): Record<string, number | null> {
  const out: Record<string, number | null> = {}
  for (const c of RESULTS_COLUMNS) {
    if (c.fields.length === 1) out[c.column] = storedValue(c.fields[0], g, r)
    // a bit field: one pair of bits per field
    else out[c.column] = c.fields.reduce((bits, f) => bits | (storedValue(f, g, r) ?? 0), 0)
  }
  return out
}

/** One row for `upsertResults`: the galaxy, its filter columns under their SQL names, and the result. */
export function resultRow(galaxyId: number | undefined, g: GalaxyInputDto, result: unknown): Record<string, unknown> {
  return { galaxy_id: galaxyId, result, ...resultColumns(g, result) }
}

/** SQL name and type of each stored column (for json_to_recordset). */
export const RESULT_COLUMN_SQL: ReadonlyArray<readonly [string, 'real' | 'smallint']> = RESULTS_COLUMNS.map((c) => [c.column, c.type] as const)
