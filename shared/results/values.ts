import type { GalaxyInputDto } from '../schemas/galaxy.schema.ts'
import type { ResultField } from './registry.ts'

/** A galaxy's own record, as the exports read it. */
export interface GalaxyRecord { key: string; redshift: number | null; ra: number | null; dec: number | null; fluxUnit: number }

/** Where a field's value is read from (each place has what it needs of these). */
export interface FieldSource {
  galaxy?: Partial<GalaxyRecord>
  input?: GalaxyInputDto
  /** the result document (shared/science.ts GalaxyResult, or what was stored) */
  result?: unknown
}

/** The value at a path of nested objects; undefined where a step is missing. */
export function at(value: unknown, path: readonly string[]): unknown {
  let v = value
  for (const k of path) v = v === null || v === undefined ? undefined : (v as Record<string, unknown>)[k]
  return v
}

/** A finite number, else null. */
export const finite = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null)

/** The field's value as it is at its source (before a place turns it into a cell, a column or a list value). */
export function rawValue(f: ResultField, src: FieldSource): unknown {
  if (f.compute) return src.input ? f.compute(src.input) : undefined
  return at(f.from === 'galaxy' ? src.galaxy : f.from === 'input' ? src.input : src.result, f.path)
}
