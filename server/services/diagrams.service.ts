import { createHash } from 'node:crypto'
import { gzip } from 'node:zlib'
import { promisify } from 'node:util'
import { eq, sql, type SQL } from 'drizzle-orm'
import { projects } from '../db/schema.ts'
import { notFound } from '../http/problem.ts'
import { DIAGRAM_CLASSES } from '../../shared/vocabulary/classes.ts'
import type { GalaxyFilter } from '../../shared/schemas/query.schema.ts'
import { LIMIT_BITS } from './result-columns.ts'
import { filterSql } from './galaxy-filters.ts'
import { binaryDiagram, type DiagramDocument } from './diagram-cache.ts'
import type { GalaxyContext } from './galaxy-context.ts'

const gzipAsync = promisify(gzip)

/**
 * Columnar diagram data built by PostgreSQL itself (one row of arrays), so 10⁵–10⁶ galaxies cost
 * one scan and no per-row JavaScript; kept in the app's cache (`ctx.diagrams`) until the data change.
 */
export async function diagramDocument(ctx: GalaxyContext, projectId: string, f: GalaxyFilter): Promise<DiagramDocument> {
  // one read for both: the revision shown and the data version that keys the cache
  const [p] = await ctx.db.select({ shown: projects.resultsRevision, version: projects.dataVersion }).from(projects).where(eq(projects.id, projectId))
  if (!p) throw notFound('project')
  const revision = f.revision ?? p.shown
  // every results write bumps data_version, so a cached document is never stale (across processes too)
  const cacheKey = `${projectId}|${revision}|${p.version}|${JSON.stringify(f)}`
  return ctx.diagrams.get(cacheKey, () => buildDiagram(ctx, projectId, revision, f))
}

async function buildDiagram(ctx: GalaxyContext, projectId: string, revision: number, f: GalaxyFilter): Promise<DiagramDocument> {
  const where = filterSql(projectId, revision, f)
  const lim = (b: { upper: number; lower: number }) =>
    sql.raw(`case when s.limits & ${b.upper} <> 0 then 1 when s.limits & ${b.lower} <> 0 then -1 else 0 end`)
  // one ordered scan feeds every array (array_agg keeps the subquery's order), so there is one sort
  const agg = (e: SQL | string) => sql`coalesce(array_agg(${typeof e === 'string' ? sql.raw(e) : e}), '{}')`
  // plotting precision: 10⁻⁴ dex is far below any measurement error and halves the document
  // (exact values are in the galaxy detail and the exports)
  // (float8 arithmetic: an integer over a power of ten prints as the short decimal, and is far cheaper than numeric)
  const r = (col: string, digits: number) => `round(${col} * 1e${digits}) / 1e${digits}`
  const res = await ctx.db.execute<{ doc: string }>(sql`
    select json_build_object(
      'revision', ${revision}::int, 'count', count(*),
      'ids', ${agg('s.key')}, 'redshift', ${agg(r('s.redshift', 6))},
      'class', json_build_object('overall', ${agg('s.class_overall')}, 'nii', ${agg('s.class_nii')}, 'sii', ${agg('s.class_sii')}, 'oi', ${agg('s.class_oi')}, 'whan', ${agg('s.class_whan')}),
      'x', json_build_object('nii', ${agg(r('s.x_nii', 4))}, 'sii', ${agg(r('s.x_sii', 4))}, 'oi', ${agg(r('s.x_oi', 4))}),
      'y', ${agg(r('s.y_oiii', 4))},
      'xErr', json_build_object('nii', ${agg(r('s.x_nii_err', 4))}, 'sii', ${agg(r('s.x_sii_err', 4))}, 'oi', ${agg(r('s.x_oi_err', 4))}),
      'yErr', ${agg(r('s.y_oiii_err', 4))},
      'xLimit', json_build_object('nii', ${agg(lim(LIMIT_BITS.niiHa))}, 'sii', ${agg(lim(LIMIT_BITS.siiHa))}, 'oi', ${agg(lim(LIMIT_BITS.oiHa))}),
      'yLimit', ${agg(lim(LIMIT_BITS.oiiiHb))},
      'ewHalpha', ${agg(r('s.ew_halpha', 3))}
    )::text as doc
    from (select g.key, g.redshift, r.class_overall, r.class_nii, r.class_sii, r.class_oi, r.class_whan, r.x_nii, r.x_sii, r.x_oi, r.y_oiii,
            r.x_nii_err, r.x_sii_err, r.x_oi_err, r.y_oiii_err, r.limits, r.ew_halpha
          from galaxies g join results r on r.galaxy_id = g.id where ${where} order by g.id) s`)
  const body = Buffer.from(res.rows[0].doc.slice(0, -1) + `,"classNames":${JSON.stringify(DIAGRAM_CLASSES)}}`)
  // encoded and hashed once: repeated requests then cost a memory copy, not a query and a hash
  const doc: DiagramDocument = { body, etag: `"d${createHash('sha1').update(body).digest('base64url')}"` }
  // every form made off the event loop: the binary columns on a compute thread, gzip on libuv's
  const [binary, gzipped] = await Promise.all([ctx.compute.encodeDiagram(body), gzipAsync(body, { level: 6 })])
  doc.binary = Buffer.from(binary.buffer, binary.byteOffset, binary.byteLength)
  doc.gzipped = gzipped
  doc.binaryGzipped = await gzipAsync(doc.binary, { level: 6 })
  return doc
}

/** Builds the project's unfiltered document in the form the dashboard asks for (binary, gzipped). */
const warmer = (ctx: GalaxyContext, projectId: string) => async () => { binaryDiagram(await diagramDocument(ctx, projectId, {}), true) }

/**
 * After writes to a project settle, build its unfiltered diagram document so the next visitor of
 * the Diagrams screen finds it cached instead of waiting for the query (seconds at 10⁵ galaxies).
 */
export function warmDiagramSoon(ctx: GalaxyContext, projectId: string) {
  ctx.diagrams.warmSoon(projectId, warmer(ctx, projectId))
}

/** Runs a write to a project's galaxies; once none is left running, the diagram document is rebuilt in the background. */
export function writingGalaxies<T>(ctx: GalaxyContext, projectId: string, write: () => Promise<T>): Promise<T> {
  return ctx.diagrams.writing(projectId, write, warmer(ctx, projectId))
}
