import { LIST_ORDER, type ResultField } from './registry.ts'
import { rawValue } from './values.ts'

/** The fields of a list item (GET …/galaxies), in list order. */
export const LIST_FIELDS: readonly ResultField[] = LIST_ORDER.filter((f) => f.list)

/** A field's value in a list item: numbers or null, class names, the number of flags. */
export function listValue(f: ResultField, row: { key: string; redshift: number | null; result: unknown }): unknown {
  const v = rawValue(f, { galaxy: { key: row.key, redshift: row.redshift }, result: row.result })
  if (f.kind === 'flags') return Array.isArray(v) ? v.length : 0
  if (f.kind === 'class') return v
  return v ?? null
}

/** One list item from a row of galaxies joined with results (`key`, `redshift`, `result`). */
export function galaxySummary(row: Record<string, unknown>): Record<string, unknown> {
  const r = row as { key: string; redshift: number | null; result: unknown }
  const out: Record<string, unknown> = {}
  for (const f of LIST_FIELDS) {
    const path = f.list!
    let node = out
    for (const k of path.slice(0, -1)) node = (node[k] ??= {}) as Record<string, unknown>
    node[path[path.length - 1]] = listValue(f, r)
  }
  return out
}
