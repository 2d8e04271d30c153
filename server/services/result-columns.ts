import { classCode } from '../../shared/vocabulary/classes.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import { RESULT_FIELDS, type ResultField } from '../../shared/results/registry.ts'
import { RESULTS_COLUMNS } from '../../shared/results/storage.ts'
import { rawValue } from '../../shared/results/values.ts'
import { float4 } from '../../shared/results/document-map.ts'

export { float4 }

/** Bits of results.limits per ratio: which diagram coordinate is a limit, and which way (from the registry). */
export const LIMIT_BITS: Readonly<Record<string, { upper: number; lower: number }>> = Object.fromEntries(
  RESULT_FIELDS.filter((f) => f.stored?.bits).map((f) => [f.path[f.path.length - 1], f.stored!.bits!]))

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

/**
 * The copies of a result document's fields, by SQL name: the reference that the copies written from
 * the kernel row (shared/results/document-map.ts `copyColumnReaders`) are checked against.
 */
export function resultColumns(g: GalaxyInputDto, r: unknown): Record<string, number | null> {
  const out: Record<string, number | null> = {}
  for (const c of RESULTS_COLUMNS) {
    if (c.fields.length === 1) out[c.column] = storedValue(c.fields[0], g, r)
    // a bit field: one pair of bits per field
    else out[c.column] = c.fields.reduce((bits, f) => bits | (storedValue(f, g, r) ?? 0), 0)
  }
  return out
}
