import { GalaxyInputSchema, type GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import { LINE_IDS } from '../../shared/vocabulary/lines.ts'
import type { ColumnMapping, IntakeOptions, IntakeProblem } from '../../shared/schemas/intake.schema.ts'

/**
 * csv-parse options for staged files. A line whose first non-blank character is `#` is a comment
 * (survey tables open with them) wherever it stands, before the header or between rows; a `#`
 * inside a quoted field or later in a line is data. `ltrim` lets the comment test skip leading
 * blanks; every cell is trimmed when it is read anyway.
 */
export const CSV_PARSE_OPTIONS = {
  bom: true, comment: '#', comment_no_infix: true, ltrim: true, relax_column_count: true, skip_empty_lines: true, info: true,
  max_record_size: 1 << 20,
} as const

const NUMBER_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/

/**
 * Turns one CSV record into a galaxy of the public API (GalaxyInputSchema) using the column mapping. Problems carry the file's
 * row number and the 1-based column number, so a person can find the cell.
 */
export function rowToGalaxy(record: string[], row: number, headerIndex: Map<string, number>, opts: IntakeOptions,
  problems: IntakeProblem[]): GalaxyInputDto | null {
  const m = opts.mapping
  const before = problems.length
  const cell = (h: string | undefined) => (h === undefined ? undefined : (record[headerIndex.get(h)!] ?? '').trim())
  const problem = (h: string | null, message: string) =>
    problems.push({ row, column: h === null ? null : headerIndex.get(h)! + 1, field: h, message })
  const number = (h: string | undefined): number | undefined => {
    const v = cell(h)
    if (v === undefined || v === '') return undefined
    if (!NUMBER_RE.test(v)) { problem(h!, `"${v.slice(0, 40)}" is not a number`); return undefined }
    const n = Number(v)
    if (!Number.isFinite(n)) { problem(h!, `"${v.slice(0, 40)}" is out of range`); return undefined }
    return n
  }
  const id = cell(m.id) ?? ''
  if (!id) problem(m.id, 'the galaxy ID is empty')
  else if (/^[=+@]/.test(id)) problem(m.id, 'the galaxy ID looks like a spreadsheet formula')
  const g: Record<string, unknown> = { id, lines: {}, fluxUnit: opts.fluxUnit }
  const z = number(m.redshift); if (z !== undefined) g.redshift = z
  const ra = number(m.ra); if (ra !== undefined) g.ra = ra
  const dec = number(m.dec); if (dec !== undefined) g.dec = dec
  const lines = g.lines as Record<string, unknown>
  for (const lineId of LINE_IDS) {
    const cols = m.lines[lineId]
    if (!cols) continue
    const flux = number(cols.flux), error = number(cols.error), limit = opts.nonDetection === 'limit-column' ? number(cols.limit) : undefined
    if (limit !== undefined && flux === undefined) { lines[lineId] = { upperLimit: limit }; continue }
    // (a flux cell that is not a number has its problem already)
    if (flux === undefined) { if (error !== undefined && cell(cols.flux) === '') problem(cols.flux, 'an error is given but no flux'); continue }
    if (opts.nonDetection === 'negative-error' && error !== undefined && error < 0) { lines[lineId] = { upperLimit: flux }; continue }
    if (error === undefined) { problem(cols.error ?? cols.flux, `no error for ${lineId}`); continue }
    lines[lineId] = { flux, error }
  }
  for (const [key, source] of [['ew', m.ew], ['fwhm', m.fwhm]] as const) {
    const out: Record<string, number> = {}
    for (const [lineId, h] of Object.entries(source ?? {})) { const v = number(h); if (v !== undefined) out[lineId] = v }
    if (Object.keys(out).length) g[key] = out
  }
  if (problems.length > before) return null
  // a row without a single line value would store a galaxy with no measurements (and, with replace,
  // overwrite a measured one with it): a comment or a stray line read as data, never a galaxy
  if (Object.keys(lines).length === 0) {
    problems.push({ row, column: null, field: 'lines', message: 'no line measurement in this row (every mapped flux and limit cell is empty)' })
    return null
  }
  const parsed = GalaxyInputSchema.safeParse(g)
  if (parsed.success) return parsed.data
  for (const issue of parsed.error.issues) problem(columnFor(m, issue.path), issue.message)
  return null
}

/** The header that fed a schema path such as ['lines','hbeta','error']. */
export function columnFor(m: ColumnMapping, path: PropertyKey[]): string | null {
  const [a, b, c] = path.map(String)
  if (a === 'id') return m.id
  if (a === 'redshift' || a === 'ra' || a === 'dec') return (m[a] as string | undefined) ?? null
  if (a === 'lines' && b) { const cols = m.lines[b as keyof typeof m.lines]; return (c === 'error' ? cols?.error : c === 'upperLimit' ? cols?.limit : cols?.flux) ?? null }
  if ((a === 'ew' || a === 'fwhm') && b) return (m[a] as Record<string, string>)[b] ?? null
  return null
}

const norm = (h: string) => h.trim().toLowerCase().replace(/[\s.\-]+/g, '_')

/** Suggests a mapping from header names (`halpha_flux`, `halpha_err`, `z`, `ew_halpha` …). */
export function suggestMapping(headers: string[]): ColumnMapping {
  const byNorm = new Map(headers.map((h) => [norm(h), h]))
  const pick = (...names: string[]) => { for (const n of names) { const h = byNorm.get(n); if (h) return h } return undefined }
  const lines: ColumnMapping['lines'] = {}
  const ew: ColumnMapping['ew'] = {}
  const fwhm: ColumnMapping['fwhm'] = {}
  for (const id of LINE_IDS) {
    const flux = pick(`${id}_flux`, id, `f_${id}`, `flux_${id}`)
    if (flux) {
      const error = pick(`${id}_err`, `${id}_error`, `${id}_flux_err`, `${id}_sigma`, `e_${id}`, `${id}_e`, `err_${id}`)
      const limit = pick(`${id}_limit`, `${id}_ul`, `${id}_upper`, `${id}_upper_limit`, `ul_${id}`)
      lines[id] = { flux, ...(error ? { error } : {}), ...(limit ? { limit } : {}) }
    }
    const e = pick(`ew_${id}`, `${id}_ew`, `eqw_${id}`); if (e) ew[id] = e
    const f = pick(`fwhm_${id}`, `${id}_fwhm`); if (f) fwhm[id] = f
  }
  return {
    id: pick('id', 'galaxy_id', 'galaxy', 'name', 'objid', 'object_id', 'source_id') ?? headers[0],
    redshift: pick('z', 'redshift', 'zspec', 'z_spec'),
    ra: pick('ra', 'ra_deg', 'raj2000'),
    dec: pick('dec', 'dec_deg', 'decj2000', 'de'),
    lines, ew, fwhm,
  }
}
