import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import type { Role } from '../http/auth.ts'
import { DIAGRAM_CLASSES, CLASS_DIAGRAMS } from '../../shared/vocabulary/classes.ts'
import { projectsService } from './projects.service.ts'

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
  for (const d of CLASS_DIAGRAMS) {
    const col = sql.raw(`class_${d}`)
    const rows = await db.execute<{ c: number; n: number }>(sql`select ${col} as c, count(*)::int as n from results where project_id = ${projectId}::uuid and revision = ${revision} group by 1`)
    classCounts[d] = Object.fromEntries(DIAGRAM_CLASSES[d].map((name) => [name, 0]))
    for (const { c, n } of rows.rows) classCounts[d][DIAGRAM_CLASSES[d][c] ?? 'unclassified'] += n
  }
  return {
    project,
    revision,
    classCounts,
    histograms: {
      ebv: await histogram(db, projectId, revision, 'ebv', 0, 1.5, 30),
      neSii: await histogram(db, projectId, revision, 'ne_sii', 0, 4, 32, true),
    },
    latestIntakes: await projects.intakes(projectId, 5),
  }
}
