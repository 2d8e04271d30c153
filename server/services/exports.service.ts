import type { Response } from 'express'
import { stringify, type Options as CsvOptions } from 'csv-stringify'
import { stringify as stringifyRecords } from 'csv-stringify/sync'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { HttpProblem } from '../http/problem.ts'
import { EXPORT_COLUMNS, type ExportColumn, type ExportGalaxy } from '../../shared/results/export-columns.ts'
import type { GalaxyFilter } from '../../shared/schemas/query.schema.ts'
import { filterSql, projectRevisionForQueries } from './galaxy-filters.ts'
import { revisionSettings } from './projects.service.ts'
import { STORED_SELECT, documentReader, type StoredColumns } from './stored-results.ts'
import { METHOD_VERSION } from '../../shared/science.ts'
import { APP_VERSION } from '../lib/version.ts'

const CHUNK = 2000

export function pickColumns(names: string[] | undefined): ExportColumn[] {
  if (!names?.length) return EXPORT_COLUMNS
  const unknown = names.filter((n) => !EXPORT_COLUMNS.some((c) => c.name === n))
  if (unknown.length) throw new HttpProblem(422, 'Unprocessable Content', 'unknown export columns', unknown.map((n) => ({ path: '/columns', message: `unknown column "${n}"` })))
  const set = new Set(['galaxy_id', ...names])
  return EXPORT_COLUMNS.filter((c) => set.has(c.name))
}

/**
 * Text cells that a spreadsheet would evaluate get a leading apostrophe (OWASP "CSV injection");
 * numbers stay numbers. A spreadsheet set to split on semicolons sees every `;`-separated part of a
 * cell as a cell of its own, so each part is checked too (quotes and spaces before = + - @ do not
 * hide a formula).
 */
export const safeCell = (v: string | number | null) =>
  (typeof v === 'string' ? v.replace(/(^|;)(?=[\s"]*[=+\-@]|[\t\r])/g, "$1'") : v)

/**
 * A number as exports write it: 15 significant digits, which every decimal input survives, while a
 * stored real scaled to its unit (8.371114 × 10⁻¹⁷ · 10 → 8.371114000000001e-16) loses the noise of
 * the product.
 */
export const exportNumber = (v: number) => String(Number(v.toPrecision(15)))

/** The CSV writer's options: fields holding `;` are quoted as well as those holding `,`. */
export const CSV_OPTIONS = { quoted_match: [';'], cast: { number: exportNumber } }

/** Settings as `key=value` words, so the provenance line needs no CSV quoting and stays a `#` line. */
export function settingsWords(settings: Record<string, unknown>, prefix = ''): string {
  return Object.entries(settings).map(([k, v]) => (v && typeof v === 'object' && !Array.isArray(v)
    ? settingsWords(v as Record<string, unknown>, `${prefix}${k}.`)
    : `${prefix}${k}=${String(v)}`)).join(' ')
}

/**
 * The commented provenance block, written by the CSV writer like every other record: free text
 * (the project name) is a quoted field of its own after the `#` text, so the line still starts
 * with `#` for readers that skip comments and a spreadsheet sees one plain text cell for it.
 */
export function csvHeaderBlock(p: { projectName: string; revision: number; settings: Record<string, unknown>; generated: string; columns: ExportColumn[] }): string {
  const records: Array<Array<string | number | null>> = [
    [`# Ratiograph ${APP_VERSION} export of project`, safeCell(p.projectName)],
    [`# assumptions revision: ${p.revision}`],
    [`# method version: ${METHOD_VERSION}`],
    [`# settings: ${settingsWords(p.settings)}`],
    [`# generated: ${p.generated}`],
    ['# equivalent widths: emission positive. Fluxes corrected for dust in erg s-1 cm-2. Ratios are log10 of observed fluxes except the doublets'],
    ['# units: ' + p.columns.filter((c) => c.unit).map((c) => `${c.name}=${c.unit}`).join(' ')],
    ['# text cells (and each part of one after a semicolon) that begin with = + - @ get a leading apostrophe'],
  ]
  return stringifyRecords(records, CSV_OPTIONS)
}

type ExportRow = { id: number; key: string; redshift: number | null; ra: number | null; dec: number | null; flux_unit: number; result: unknown }

async function* rowsOf(db: Db, projectId: string, revision: number, f: GalaxyFilter): AsyncGenerator<ExportRow> {
  const where = filterSql(projectId, revision, { ...f, revision })
  const reader = await documentReader(db, projectId, [revision])
  let lastId = 0
  for (;;) {
    const res = await db.execute<ExportRow & StoredColumns & Record<string, unknown>>(sql`
      select g.id, g.key, g.redshift, g.ra, g.dec, g.flux_unit, ${STORED_SELECT} from galaxies g join results r on r.galaxy_id = g.id
      where ${where} and g.id > ${lastId} order by g.id limit ${CHUNK}`)
    if (!res.rows.length) return
    for (const row of res.rows) yield { id: row.id, key: row.key, redshift: row.redshift, ra: row.ra, dec: row.dec, flux_unit: row.flux_unit, result: reader.document(row.key, row) }
    lastId = res.rows[res.rows.length - 1].id
  }
}

export const xml = (s: string) => s.replace(/[<>&"']/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;', "'": '&apos;' })[c]!)
  // XML 1.0 forbids most control characters even escaped
  .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f]/g, '')

/**
 * Runs the first query before the caller sends anything: a failure there still answers a problem
 * document instead of a 200 whose body is cut off.
 */
async function primedRows(db: Db, projectId: string, revision: number, f: GalaxyFilter): Promise<AsyncIterable<ExportRow>> {
  const rows = rowsOf(db, projectId, revision, f)
  const first = await rows.next()
  return (async function* () { if (!first.done) { yield first.value; yield* rows } })()
}

export function exportsService(db: Db) {
  async function context(projectId: string, f: GalaxyFilter) {
    const revision = await projectRevisionForQueries(db, projectId, f.revision)
    const { settings } = await revisionSettings(db, projectId, revision)
    return { revision, settings }
  }
  return {
    /** Streams CSV: a commented header block (provenance, units), then one row per galaxy. */
    async csv(res: Response, projectId: string, projectName: string, f: GalaxyFilter, columns: ExportColumn[]) {
      const { revision, settings } = await context(projectId, f)
      const rows = await primedRows(db, projectId, revision, f)
      res.setHeader('Content-Type', 'text/csv; charset=utf-8')
      res.setHeader('Content-Disposition', `attachment; filename="ratiograph-${projectId.slice(0, 8)}-rev${revision}.csv"`)
      res.write(csvHeaderBlock({ projectName, revision, settings, generated: new Date().toISOString(), columns }))
      await streamCsvRows(res, columns, exportRows(rows))
    },

    /** Streams a VOTable 1.4 document with a unit and a UCD on every field. */
    async votable(res: Response, projectId: string, projectName: string, f: GalaxyFilter, columns: ExportColumn[]) {
      const { revision, settings } = await context(projectId, f)
      const rows = await primedRows(db, projectId, revision, f)
      res.setHeader('Content-Type', 'application/x-votable+xml; charset=utf-8')
      res.setHeader('Content-Disposition', `attachment; filename="ratiograph-${projectId.slice(0, 8)}-rev${revision}.vot"`)
      await streamVotable(res, {
        resource: 'ratiograph', table: 'galaxies', columns, rows: exportRows(rows),
        description: `Ratiograph ${APP_VERSION} export of project "${projectName}"; assumptions revision ${revision}; method version ${METHOD_VERSION}`,
        infos: [['assumptionsRevision', String(revision)], ['methodVersion', METHOD_VERSION], ['settings', JSON.stringify(settings)]],
      })
    },
  }
}

/** A row of an export: the galaxy's record and the result document its columns read. */
export interface ExportRecord { galaxy: ExportGalaxy; result: unknown }

async function* exportRows(rows: AsyncIterable<ExportRow>): AsyncGenerator<ExportRecord> {
  for await (const row of rows) yield { galaxy: { key: row.key, redshift: row.redshift, ra: row.ra, dec: row.dec, fluxUnit: row.flux_unit }, result: row.result }
}

/** Streams the CSV records of the rows (a header line of the column names first), waiting for the socket when it is full. */
export async function streamCsvRows(res: Response, columns: ExportColumn[], rows: AsyncIterable<ExportRecord>, options: CsvOptions = {}) {
  const out = stringify({ header: true, columns: columns.map((c) => c.name), ...CSV_OPTIONS, ...options })
  out.pipe(res)
  for await (const row of rows) {
    if (!out.write(columns.map((c) => safeCell(c.get(row.galaxy, row.result))))) await new Promise((ok) => out.once('drain', ok))
  }
  out.end()
}

/** Streams a VOTable 1.4 document: the resource's description and INFOs, a FIELD per column with its unit and UCD, the rows. */
export async function streamVotable(res: Response, doc: {
  resource: string; description: string; infos: Array<[string, string]>; table: string; columns: ExportColumn[]; rows: AsyncIterable<ExportRecord>
}) {
  const fields = doc.columns.map((c) => {
    const type = c.datatype === 'char' ? 'datatype="char" arraysize="*"' : c.datatype === 'int' ? 'datatype="int"' : 'datatype="double"'
    return `      <FIELD name="${xml(c.name)}" ${type}${c.unit ? ` unit="${xml(c.unit)}"` : ''} ucd="${xml(c.ucd)}"><DESCRIPTION>${xml(c.description)}</DESCRIPTION></FIELD>`
  })
  res.write(`<?xml version="1.0" encoding="UTF-8"?>
<VOTABLE version="1.4" xmlns="http://www.ivoa.net/xml/VOTable/v1.3" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">
  <RESOURCE type="results" name="${xml(doc.resource)}">
    <DESCRIPTION>${xml(doc.description)}</DESCRIPTION>
${doc.infos.map(([name, value]) => `    <INFO name="${xml(name)}" value="${xml(value)}"/>`).join('\n')}
    <TABLE name="${xml(doc.table)}">
${fields.join('\n')}
      <DATA><TABLEDATA>
`)
  let buf = ''
  for await (const row of doc.rows) {
    buf += '        <TR>' + doc.columns.map((c) => { const v = c.get(row.galaxy, row.result); return v === null ? '<TD/>' : `<TD>${xml(typeof v === 'number' ? exportNumber(v) : String(v))}</TD>` }).join('') + '</TR>\n'
    if (buf.length > 1 << 16) { if (!res.write(buf)) await new Promise((ok) => res.once('drain', ok)); buf = '' }
  }
  res.end(buf + '      </TABLEDATA></DATA>\n    </TABLE>\n  </RESOURCE>\n</VOTABLE>\n')
}
