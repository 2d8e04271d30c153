import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import type { Role } from '../http/auth.ts'
import { DIAGRAM_CLASSES } from '../../shared/vocabulary/classes.ts'
import { projectsService } from './projects.service.ts'
import { RESULT_FIELDS } from '../../shared/results/registry.ts'

/** The fields the overview draws a histogram of (shared/results/registry.ts `histogram`). */
const HISTOGRAM_FIELDS = RESULT_FIELDS.filter((f) => f.histogram && f.stored?.table === 'results')
/** Counts per class of each class field. */
const CLASS_FIELDS = RESULT_FIELDS.filter((f) => f.kind === 'class')

/** Equal-width histogram of a results column computed in SQL (width_bucket). */
async function histogram(db: Db, projectId: string, revision: number, column: string, lo: number, hi: number, bins: number, log = false) {
  const expr = sql.raw(log ? `log(greatest(${column}, 1e-30)::numeric)::float8` : `${column}::float8`)
  const rows = await db.execute<{ b: number; n: number }>(sql`
    select width_bucket(${expr}, ${lo}, ${hi}, ${bins}) as b, count(*)::int as n
    from results r where r.project_id = ${projectId}::uuid and r.revision = ${revision} and ${sql.raw(column)} is not null group by 1 order by 1`)
  const counts = new Array(bins).fill(0)
  for (const { b, n } of rows.rows) counts[Math.min(Math.max(b, 1), bins) - 1] += n // fold the outliers into the end bins
  const edges = Array.from({ length: bins + 1 }, (_, i) => lo + ((hi - lo) * i) / bins)
  return { edges, counts, log }
}

export async function overview(db: Db, projectId: string, role: Role) {
  const projects = projectsService(db)
  const project = await projects.get(projectId, role)
  const revision = project.resultsRevision
  const classCounts: Record<string, Record<string, number>> = {}
  for (const f of CLASS_FIELDS) {
    const d = f.diagram!
    const col = sql.raw(f.stored!.column)
    const rows = await db.execute<{ c: number; n: number }>(sql`select ${col} as c, count(*)::int as n from results where project_id = ${projectId}::uuid and revision = ${revision} group by 1`)
    classCounts[d] = Object.fromEntries(DIAGRAM_CLASSES[d].map((name) => [name, 0]))
    for (const { c, n } of rows.rows) classCounts[d][DIAGRAM_CLASSES[d][c] ?? 'unclassified'] += n
  }
  const histograms: Record<string, Awaited<ReturnType<typeof histogram>>> = {}
  for (const f of HISTOGRAM_FIELDS) {
    const h = f.histogram!
    histograms[f.key] = await histogram(db, projectId, revision, f.stored!.column, h.lo, h.hi, h.bins, h.log)
  }
  return {
    project,
    revision,
    classCounts,
    histograms,
    latestIntakes: await projects.intakes(projectId, 5),
  }
}
