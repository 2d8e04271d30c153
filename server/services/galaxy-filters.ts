import { eq, sql, type SQL } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { projects } from '../db/schema.ts'
import { notFound } from '../http/problem.ts'
import { classCode } from '../../shared/vocabulary/classes.ts'
import type { GalaxyFilter } from '../../shared/schemas/query.schema.ts'
import { CLASS_FILTERS, RESULT_FIELDS, resultField } from '../../shared/results/registry.ts'
import { storedSql } from '../../shared/results/storage.ts'

// The SQL of the galaxy filters, shared by the list, the diagram and the exports. Every column comes
// from the registry (shared/results/registry.ts); queries read `galaxies g join results r`.

const column = (key: string) => sql.raw(storedSql(resultField(key)))

/** The column of each `?sort=` field. */
export const SORT_FIELDS: Readonly<Record<string, SQL>> = Object.fromEntries(RESULT_FIELDS.filter((f) => f.sort).map((f) => [f.key, column(f.key)]))

/** The column of each `?range=` field. */
export const RANGE_FIELDS: Readonly<Record<string, SQL>> = Object.fromEntries(RESULT_FIELDS.filter((f) => f.range).map((f) => [f.key, column(f.key)]))

const REDSHIFT = column('redshift')
const SNR_MIN = column('snrMin')

/** WHERE clause of the shared galaxy filters (galaxies `g` joined with results `r`). */
export function filterSql(projectId: string, revision: number, f: GalaxyFilter): SQL {
  const parts: SQL[] = [sql`g.project_id = ${projectId}::uuid`, sql`r.revision = ${revision}`]
  for (const c of CLASS_FILTERS) {
    const names = f[c.param]
    if (names?.length) parts.push(sql`${column(c.field.key)} in (${sql.join(names.map((n) => sql`${classCode(c.diagram, n)}`), sql`, `)})`)
  }
  if (f.q) parts.push(sql`g.key ilike ${'%' + f.q.replace(/[\\%_]/g, (ch) => '\\' + ch) + '%'}`)
  // bounds are doubles: typed so, a bound beyond float4 (1e300) filters instead of failing to convert to `real`
  if (f.zMin !== undefined) parts.push(sql`${REDSHIFT} >= ${f.zMin}::float8`)
  if (f.zMax !== undefined) parts.push(sql`${REDSHIFT} <= ${f.zMax}::float8`)
  if (f.minSnr !== undefined) parts.push(sql`${SNR_MIN} >= ${f.minSnr}::float8`)
  for (const r of f.range ?? []) {
    const col = RANGE_FIELDS[r.field]
    if (r.min !== null) parts.push(sql`${col} >= ${r.min}::float8`)
    if (r.max !== null) parts.push(sql`${col} <= ${r.max}::float8`)
  }
  return sql.join(parts, sql` and `)
}

/** The revision queries show: the one asked for, else the newest whose recompute finished. */
export async function projectRevisionForQueries(db: Db, projectId: string, revision?: number) {
  const [p] = await db.select({ current: projects.currentRevision, shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
  if (!p) throw notFound('project')
  return revision ?? p.shown
}
