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

/** Velocity offsets (km/s) and intrinsic widths (km/s) shown: narrow Hα, else [O III] 5007, when detected. */
const NARROW = (k: string) => `coalesce(case when (result->'lines'->'halpha'->>'detected')::boolean then (result->'lines'->'halpha'->>'${k}')::float8 end,
  case when (result->'lines'->'oiii_5007'->>'detected')::boolean then (result->'lines'->'oiii_5007'->>'${k}')::float8 end)`
export const KINEMATICS_BINS = { velocity: { lo: -500, hi: 500, bins: 40 }, sigma: { lo: 0, hi: 500, bins: 25 } } as const

/** The line fits under a revision: how many, the share with a broad Hα, and histograms of velocity and σ. */
async function kinematics(db: Db, projectId: string, revision: number) {
  const where = sql`project_id = ${projectId}::uuid and revision = ${revision} and result->'fit' is not null and result->>'fit' <> 'null'`
  const [c] = (await db.execute<{ fitted: number; broad: number }>(sql`select count(*)::int as fitted,
    count(*) filter (where (result->'fit'->>'broadHalpha')::boolean)::int as broad from line_fits where ${where}`)).rows
  const hist = async (key: 'velocity' | 'sigmaIntrinsic', b: { lo: number; hi: number; bins: number }) => {
    const expr = sql.raw(NARROW(key))
    const rows = (await db.execute<{ b: number; n: number }>(sql`select width_bucket(v, ${b.lo}::float8, ${b.hi}::float8, ${b.bins}::int) as b, count(*)::int as n
      from (select ${expr} as v from line_fits where ${where}) t where v is not null group by 1`)).rows
    const counts = new Array(b.bins).fill(0)
    for (const { b: k, n } of rows) counts[Math.min(Math.max(k, 1), b.bins) - 1] += n // the outliers fold into the end bins
    return { bins: Array.from({ length: b.bins + 1 }, (_, i) => b.lo + ((b.hi - b.lo) * i) / b.bins), counts }
  }
  return {
    fitted: c.fitted, broadFraction: c.fitted ? c.broad / c.fitted : null,
    velocity: await hist('velocity', KINEMATICS_BINS.velocity), sigma: await hist('sigmaIntrinsic', KINEMATICS_BINS.sigma),
  }
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
    // narrow Hα (else [O III] 5007) velocity offsets and intrinsic σ of the fitted spectra; bins are the edges
    kinematics: await kinematics(db, projectId, revision),
  }
}
