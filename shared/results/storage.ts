import { RESULT_FIELDS, type ResultField } from './registry.ts'

/** A column of the `results` table holding copies of result fields (the limit fields share `limits`). */
export interface ResultsColumn { column: string; type: 'real' | 'smallint'; notNull: boolean; fields: ResultField[] }

/** The `results` columns beside each result document, in registry order (server/db/schema.ts makes them). */
export const RESULTS_COLUMNS: readonly ResultsColumn[] = (() => {
  const out: ResultsColumn[] = []
  for (const f of RESULT_FIELDS) {
    const s = f.stored
    if (s?.table !== 'results') continue
    const known = out.find((c) => c.column === s.column)
    if (known) { known.fields.push(f); continue }
    out.push({ column: s.column, type: s.type as 'real' | 'smallint', notNull: !!s.notNull, fields: [f] })
  }
  return out
})()

/** The SQL expression of a field's stored copy in queries over `galaxies g join results r`. */
export function storedSql(f: ResultField): string {
  if (!f.stored) throw new Error(`result field "${f.key}" is not stored`)
  return `${f.stored.table === 'galaxies' ? 'g' : 'r'}.${f.stored.column}`
}
