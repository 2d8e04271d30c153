import type { Response } from 'express'
import { stringify } from 'csv-stringify'
import { stringify as stringifyRecords } from 'csv-stringify/sync'
import { sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { LINE_EXPORT_COLUMNS } from '../../shared/results/line-fit-fields.ts'
import { APP_VERSION } from '../lib/version.ts'
import { CSV_OPTIONS, safeCell, settingsWords, streamCsvRows, streamVotable } from './exports.service.ts'
import { projectRevisionForQueries } from './galaxy-filters.ts'
import { revisionSettings } from './projects.service.ts'
import { arraysOf, f32, fitOf, type spectraService } from './spectra.service.ts'
import { modelOf } from '../compute/fit-spectra.task.ts'
import { notFound } from '../http/problem.ts'

/**
 * The line measurements of a project's fitted spectra (CSV and VOTable, one row per galaxy, units
 * and UCDs from shared/schemas/line-export-columns.ts) and the best-fit model of one spectrum (CSV).
 */

const CHUNK = 500

/** A fitted galaxy: its record as the exports read it (with the spectrum's ID) and the fit result. */
interface LineRow { galaxy: { key: string; spectrumId: number; redshift: number; ra: null; dec: null; fluxUnit: number }; result: unknown }

async function* rowsOf(db: Db, projectId: string, revision: number): AsyncGenerator<LineRow> {
  let lastId = 0
  for (;;) {
    const res = await db.execute<{ id: number; galaxy_id: string; redshift: number; flux_unit: number; result: unknown }>(sql`
      select s.id, s.galaxy_id, s.redshift, s.flux_unit, f.result from spectra s join line_fits f on f.spectrum_id = s.id and f.revision = ${revision}
      where s.project_id = ${projectId}::uuid and s.id > ${lastId} order by s.id limit ${CHUNK}`)
    if (!res.rows.length) return
    for (const r of res.rows) yield { galaxy: { key: r.galaxy_id, spectrumId: Number(r.id), redshift: r.redshift, ra: null, dec: null, fluxUnit: r.flux_unit }, result: r.result }
    lastId = Number(res.rows[res.rows.length - 1].id)
  }
}

export function linesExportService(db: Db, spectra: ReturnType<typeof spectraService>) {
  async function context(projectId: string, revision?: number) {
    const r = await projectRevisionForQueries(db, projectId, revision)
    const { settings } = await revisionSettings(db, projectId, r)
    return { revision: r, settings }
  }
  return {
    async csv(res: Response, projectId: string, projectName: string, revision?: number) {
      const c = await context(projectId, revision)
      res.setHeader('Content-Type', 'text/csv; charset=utf-8')
      res.setHeader('Content-Disposition', `attachment; filename="ratiograph-${projectId.slice(0, 8)}-lines-rev${c.revision}.csv"`)
      res.write(stringifyRecords([
        [`# Ratiograph ${APP_VERSION} line measurements of project`, safeCell(projectName)],
        [`# assumptions revision: ${c.revision}`],
        [`# fit settings: ${settingsWords({ fit: c.settings.fit, minSnr: c.settings.minSnr })}`],
        [`# generated: ${new Date().toISOString()}`],
        ['# fluxes observed (not corrected for dust) in erg s-1 cm-2; velocities are offsets from the redshift; sigma is the Gaussian width; EWs rest-frame, emission positive'],
        ['# units: ' + LINE_EXPORT_COLUMNS.filter((k) => k.unit).map((k) => `${k.name}=${k.unit}`).join(' ')],
      ], CSV_OPTIONS))
      // booleans as the words VOTable uses too (the writer's default is 1 and an empty cell)
      await streamCsvRows(res, LINE_EXPORT_COLUMNS, rowsOf(db, projectId, c.revision), { cast: { ...CSV_OPTIONS.cast, boolean: (v: boolean) => String(v) } })
    },

    async votable(res: Response, projectId: string, projectName: string, revision?: number) {
      const c = await context(projectId, revision)
      res.setHeader('Content-Type', 'application/x-votable+xml; charset=utf-8')
      res.setHeader('Content-Disposition', `attachment; filename="ratiograph-${projectId.slice(0, 8)}-lines-rev${c.revision}.vot"`)
      await streamVotable(res, {
        resource: 'ratiograph-lines', table: 'lines', columns: LINE_EXPORT_COLUMNS, rows: rowsOf(db, projectId, c.revision),
        description: `Ratiograph ${APP_VERSION} line measurements of project "${projectName}"; assumptions revision ${c.revision}`,
        infos: [['assumptionsRevision', String(c.revision)], ['fitSettings', JSON.stringify({ ...c.settings.fit, minSnr: c.settings.minSnr })]],
      })
    },

    /** The best-fit model of a galaxy's spectrum per pixel: data, continuum, model, each component, residual. */
    async modelCsv(res: Response, projectId: string, galaxyId: string, revision?: number) {
      const row = await spectra.spectrumOf(projectId, galaxyId)
      const fit = await fitOf(db, projectId, row.id, revision)
      if (!fit) throw notFound(revision === undefined ? 'fit of this spectrum yet' : 'fit of this spectrum under that revision')
      const a = arraysOf(row)
      const model = modelOf(a, fit.result)
      // a line's column (with the lines tied to it), its second narrow component, broad Hα, the Na I D absorption
      const names = model.components.map((k) => (k.kind === 'narrow2' ? `${k.line}_2` : k.kind === 'absorption' ? `${k.line}_absorption` : k.line))
      res.setHeader('Content-Type', 'text/csv; charset=utf-8')
      res.setHeader('Content-Disposition', `attachment; filename="ratiograph-${projectId.slice(0, 8)}-model-rev${fit.revision}.csv"`)
      res.write(stringifyRecords([
        ['# best-fit model of galaxy', safeCell(galaxyId)],
        [`# spectrum ${row.id} fitted under assumptions revision ${fit.revision} (method ${fit.methodVersion})`],
        [`# wavelength: observed Angstrom (${a.wavelengthMedium}). flux error continuum model components and residual: ${row.fluxUnit} erg s-1 cm-2 A-1 per unit. Empty cells: outside the fitted windows or a bad pixel`],
      ], CSV_OPTIONS))
      const out = stringify({ header: true, columns: ['wavelength', 'flux', 'error', 'continuum', 'model', ...names, 'residual'], ...CSV_OPTIONS })
      out.pipe(res)
      const n = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? null : Number(v.toPrecision(8)))
      for (let j = 0; j < a.wavelength.length; j++) {
        const e = a.noiseKind === 'ivar' ? (a.noise[j] > 0 ? 1 / Math.sqrt(a.noise[j]) : null) : Number.isNaN(a.noise[j]) ? null : a.noise[j]
        const m = model.total[j]
        const record = [a.wavelength[j], f32(a.flux[j]), e === null ? null : f32(e), n(model.continuum[j]), n(m), ...model.components.map((k) => n(k.values[j])), m === null ? null : n(a.flux[j] - m)]
        if (!out.write(record)) await new Promise((ok) => out.once('drain', ok))
      }
      out.end()
    },
  }
}
