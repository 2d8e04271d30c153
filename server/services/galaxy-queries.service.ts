import { and, eq, sql } from 'drizzle-orm'
import { z } from 'zod'
import type { Db } from '../db/client.ts'
import { galaxies, galaxyIntakes, intakes, results, users } from '../db/schema.ts'
import { HttpProblem, notFound } from '../http/problem.ts'
import type { GalaxyFilter } from '../../shared/schemas/query.schema.ts'
import { isWellFormed } from '../../shared/schemas/text.ts'
import { galaxySummary } from '../../shared/results/list.ts'
import { SORT_FIELDS, filterSql, projectRevisionForQueries } from './galaxy-filters.ts'
import { STORED_SELECT, documentReader, type StoredColumns } from './stored-results.ts'

/** A list item: the registry's list fields of one row (shared/results/list.ts). */
export const summary = galaxySummary

const encodeCursor = (v: [string | number | null, number]) => Buffer.from(JSON.stringify(v)).toString('base64url')
/**
 * [sort value of the last row, its internal id]: text for the id sort, a number (or null) for the
 * others. The text is a stored ID (which may predate today's text rules), so only what PostgreSQL
 * cannot take is refused: NUL and unpaired surrogates.
 */
const CursorSchema = z.tuple([z.union([z.string().max(200).refine((s) => !s.includes('\u0000') && isWellFormed(s)), z.number(), z.null()]), z.number().int().min(1)])
function decodeCursor(c: string, textSort: boolean): [string | number | null, number] {
  let decoded: unknown
  try { decoded = JSON.parse(Buffer.from(c, 'base64url').toString('utf8')) } catch { decoded = undefined }
  const parsed = CursorSchema.safeParse(decoded)
  if (parsed.success && (typeof parsed.data[0] === 'string') === textSort) return parsed.data
  throw new HttpProblem(422, 'Unprocessable Content', 'invalid cursor', [{ path: '/cursor', message: parsed.success
    ? 'this cursor belongs to another sort; pass the sort it was made with, or start without a cursor'
    : 'not a cursor from this API (pass nextCursor unchanged)' }])
}

/** The list and detail reads of a project's galaxies. */
export function galaxiesService(db: Db) {
  return {
    /** One page of galaxies by keyset pagination on (sort value, internal id). */
    async list(projectId: string, f: GalaxyFilter & { limit: number; cursor?: string; sort: string }) {
      const revision = await projectRevisionForQueries(db, projectId, f.revision)
      const desc = f.sort.startsWith('-')
      const field = desc ? f.sort.slice(1) : f.sort
      const isText = field === 'id'
      const col = SORT_FIELDS[field]
      // nulls sort last either way: replace them by the far end of the order
      const key = isText ? col : sql`coalesce(${col}::float8, ${desc ? sql`'-Infinity'::float8` : sql`'Infinity'::float8`})`
      const where = filterSql(projectId, revision, f)
      let page = where
      if (f.cursor) {
        const [v, id] = decodeCursor(f.cursor, isText)
        const val = isText ? sql`${v}` : sql`${v === null ? (desc ? -Infinity : Infinity) : v}::float8`
        page = sql`${where} and (${key}, g.id) ${desc ? sql`<` : sql`>`} (${val}, ${id})`
      }
      const rows = await db.execute<Record<string, unknown>>(sql`
        select g.id, g.key, g.redshift, ${STORED_SELECT}, ${key} as sort_value from galaxies g join results r on r.galaxy_id = g.id
        where ${page} order by ${key} ${desc ? sql`desc` : sql`asc`}, g.id ${desc ? sql`desc` : sql`asc`} limit ${f.limit + 1}`)
      const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n from galaxies g join results r on r.galaxy_id = g.id where ${where}`)).rows
      const reader = await documentReader(db, projectId, [revision])
      const items: Array<Record<string, unknown>> = rows.rows.slice(0, f.limit).map((row) => ({ ...row, result: reader.document(row.key as string, row as unknown as StoredColumns) }))
      const last = items[items.length - 1]
      const sv = last ? (typeof last.sort_value === 'number' && !Number.isFinite(last.sort_value) ? null : last.sort_value) : null
      return {
        revision, total: n, items: items.map(summary),
        nextCursor: rows.rows.length > f.limit && last ? encodeCursor([sv as string | number | null, last.id as number]) : null,
      }
    },

    async getOne(projectId: string, key: string, revision?: number) {
      const shown = await projectRevisionForQueries(db, projectId)
      const [g] = await db.select().from(galaxies).where(and(eq(galaxies.projectId, projectId), eq(galaxies.key, key)))
      if (!g) throw notFound('galaxy')
      const revs = await db.select({ revision: results.revision, methodVersion: results.methodVersion, computedAt: results.computedAt })
        .from(results).where(eq(results.galaxyId, g.id)).orderBy(results.revision)
      const want = revision ?? (revs.some((r) => r.revision === shown) ? shown : revs[revs.length - 1]?.revision)
      const [res] = want === undefined ? [] : await db.select({
        revision: results.revision, methodVersion: results.methodVersion, computedAt: results.computedAt,
        layout: results.layout, measures: results.measures, measures_exact: results.measuresExact, codes: results.codes, mc_percentiles: results.mcPercentiles, mc_classes: results.mcClasses, result: results.result,
      }).from(results).where(and(eq(results.galaxyId, g.id), eq(results.revision, want)))
      if (revision !== undefined && !res) throw notFound('result for that revision')
      const history = await db.select({ i: intakes, byName: users.name, change: galaxyIntakes.change }).from(galaxyIntakes)
        .innerJoin(intakes, eq(intakes.id, galaxyIntakes.intakeId)).leftJoin(users, eq(users.id, intakes.userId))
        .where(eq(galaxyIntakes.galaxyId, g.id)).orderBy(intakes.createdAt)
      const input = g.input as { lines: unknown; ew?: unknown; fwhm?: unknown }
      return {
        id: g.key, redshift: g.redshift, fluxUnit: g.fluxUnit, ra: g.ra, dec: g.dec,
        lines: input.lines, ew: input.ew ?? null, fwhm: input.fwhm ?? null,
        // where the lines came from when not from an intake's rows: { source: 'line-fit', spectrumId, revision }
        provenance: g.provenance ?? null,
        revision: res?.revision ?? null, methodVersion: res?.methodVersion ?? null, computedAt: res?.computedAt.toISOString() ?? null,
        results: res ? (await documentReader(db, projectId, [res.revision])).document(g.key, res) : null,
        // change: what the intake did (created, replaced, merged); earlier records: GET …/versions
        history: history.map((h) => ({ intakeId: h.i.id, kind: h.i.kind, fileName: h.i.fileName, createdAt: h.i.createdAt.toISOString(), by: h.byName, change: h.change })),
        revisions: revs.map((r) => ({ revision: r.revision, methodVersion: r.methodVersion, computedAt: r.computedAt.toISOString() })),
      }
    },
  }
}
