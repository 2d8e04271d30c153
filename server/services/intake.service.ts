import { createReadStream } from 'node:fs'
import { mkdir, open, rm } from 'node:fs/promises'
import { join } from 'node:path'
import { CsvError, parse } from 'csv-parse'
import { and, eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { columnMappings, intakes, users } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { HttpProblem, notFound } from '../http/problem.ts'
import type { Mailer } from '../lib/mailer.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import type { IntakeOptions, IntakeProblem } from '../../shared/schemas/intake.schema.ts'
import { checkBatchRules, computeForRevisions, writeGalaxies } from './galaxies.service.ts'
import { intakeDto, revisionSettings } from './projects.service.ts'
import { rowToGalaxy, suggestMapping } from './csv-rows.ts'
import { CONTROL_MESSAGE, isCleanText } from '../../shared/schemas/text.ts'

const PREVIEW_ROWS = 20
const MAX_PROBLEMS = 500

const bad = (detail: string, path = '/file') => new HttpProblem(422, 'Unprocessable Content', detail, [{ path, message: detail }])

/** Reads the whole file once: UTF-8 check (streaming, fatal), BOM, and the delimiter of the first line. */
async function inspect(path: string): Promise<{ delimiter: string; bytes: number }> {
  const fh = await open(path)
  const decoder = new TextDecoder('utf-8', { fatal: true })
  let first = '', bytes = 0
  try {
    for await (const chunk of fh.createReadStream()) {
      bytes += (chunk as Buffer).length
      // valid UTF-8, but no text file holds NUL (a UTF-16 file does), and PostgreSQL cannot store it
      if ((chunk as Buffer).includes(0)) throw bad('the file holds NUL bytes, so it is not UTF-8 text (UTF-16? save it as UTF-8 CSV)')
      let text: string
      try { text = decoder.decode(chunk as Buffer, { stream: true }) } catch { throw bad('the file is not UTF-8 text (save it as UTF-8 CSV)') }
      if (first.length < 65536 && !first.includes('\n')) first += text
    }
    try { decoder.decode() } catch { throw bad('the file is not UTF-8 text (save it as UTF-8 CSV)') }
  } finally { await fh.close() }
  if (bytes === 0 || first.replace(/^\uFEFF/, '').trim() === '') throw bad('the file is empty')
  const line = first.replace(/^\uFEFF/, '').split(/\r?\n/)[0].replace(/"[^"]*"/g, '')
  const counts: Array<[string, number]> = [',', ';', '\t', '|'].map((d) => [d, line.split(d).length - 1])
  counts.sort((a, b) => b[1] - a[1])
  return { delimiter: counts[0][1] > 0 ? counts[0][0] : ',', bytes }
}

/** Streams the records of a staged file (csv-parse), with the file line of each record. */
async function* records(path: string, delimiter: string): AsyncGenerator<{ record: string[]; line: number }> {
  const parser = createReadStream(path).pipe(parse({ bom: true, delimiter, relax_column_count: true, skip_empty_lines: true, info: true, max_record_size: 1 << 20 }))
  try {
    for await (const item of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) yield { record: item.record, line: item.info.lines }
  } catch (err) {
    if (err instanceof CsvError) throw bad(`the file is not valid CSV: ${err.message}`)
    throw err
  }
}

function checkHeaders(headers: string[]) {
  const errors: Array<{ path: string; message: string }> = []
  const seen = new Map<string, number>()
  headers.forEach((h, i) => {
    const name = h.trim()
    if (!name) errors.push({ path: `/file/header/${i + 1}`, message: `column ${i + 1} has no header` })
    else if (!isCleanText(name)) errors.push({ path: `/file/header/${i + 1}`, message: `the header of column ${i + 1} ${CONTROL_MESSAGE}` })
    else if (seen.has(name)) errors.push({ path: `/file/header/${i + 1}`, message: `header "${name}" repeats column ${seen.get(name)! + 1}` })
    else seen.set(name, i)
  })
  if (errors.length) throw new HttpProblem(422, 'Unprocessable Content', 'the header row has missing, repeated or unreadable names', errors)
}

export function intakeService(db: Db, mailer: Mailer, dataDir: string, appUrl: string, largeIntakeRows: number) {
  const uploads = join(dataDir, 'uploads')

  async function staged(projectId: string, intakeId: string) {
    const [i] = await db.select().from(intakes).where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId)))
    if (!i || i.kind !== 'csv') throw notFound('intake')
    if (i.status !== 'staged' || !i.filePath) throw new HttpProblem(409, 'Conflict', `this intake is already ${i.status}`)
    return i
  }

  /** Parses every row with the mapping; returns galaxies and problems (with file rows and columns). */
  async function build(path: string, opts: IntakeOptions, settings: Parameters<typeof checkBatchRules>[1]) {
    const { delimiter } = await inspect(path)
    const problems: IntakeProblem[] = []
    const galaxies: GalaxyInputDto[] = []
    const rows: number[] = []
    let headerIndex: Map<string, number> | undefined
    let total = 0
    for await (const { record, line } of records(path, delimiter)) {
      if (!headerIndex) {
        const index = new Map(record.map((h, i) => [h.trim(), i]))
        headerIndex = index
        const m = opts.mapping
        const used = [m.id, m.redshift, m.ra, m.dec, ...Object.values(m.lines).flatMap((c) => [c?.flux, c?.error, c?.limit]), ...Object.values(m.ew), ...Object.values(m.fwhm)]
        const missing = [...new Set(used.filter((h): h is string => !!h && !index.has(h)))]
        if (missing.length) throw new HttpProblem(422, 'Unprocessable Content', 'the mapping names columns the file does not have',
          missing.map((h) => ({ path: '/mapping', message: `no column "${h}" in the file` })))
        continue
      }
      total++
      const g = rowToGalaxy(record, line, headerIndex, opts, problems)
      if (g) { galaxies.push(g); rows.push(line) }
      if (problems.length > MAX_PROBLEMS * 4) break
    }
    for (const e of checkBatchRules(galaxies, settings, '')) {
      const idx = Number(e.path.split('/')[1])
      problems.push({ row: rows[idx], column: null, field: e.path.split('/').slice(2).join('/'), message: e.message })
    }
    return { galaxies, problems, total }
  }

  return {
    async stage(auth: Auth, projectId: string, file: { path: string; originalname: string; size: number }) {
      try {
        const { delimiter } = await inspect(file.path)
        let headers: string[] | undefined
        const preview: string[][] = []
        let count = 0
        for await (const { record } of records(file.path, delimiter)) {
          if (!headers) { headers = record.map((h) => h.trim()); checkHeaders(headers); continue }
          if (preview.length < PREVIEW_ROWS) preview.push(record)
          count++
        }
        if (!headers) throw bad('the file is empty')
        if (count === 0) throw bad('the file has a header row but no data rows')
        const [intake] = await db.insert(intakes).values({
          projectId, kind: 'csv', status: 'staged', userId: auth.user.id, apiKeyId: auth.key?.id ?? null,
          fileName: file.originalname.slice(0, 255), filePath: file.path, rowsTotal: count,
        }).returning()
        const saved = await db.select().from(columnMappings).where(eq(columnMappings.projectId, projectId)).orderBy(columnMappings.name)
        return {
          intake: intakeDto(intake, { id: auth.user.id, name: auth.user.name }), delimiter, headers, previewRows: preview, rowCount: count,
          suggestedMapping: suggestMapping(headers), savedMappings: saved.map((s) => ({ name: s.name, mapping: s.mapping })),
        }
      } catch (err) {
        await rm(file.path, { force: true })
        throw err
      }
    },

    async validate(projectId: string, intakeId: string, opts: IntakeOptions) {
      const i = await staged(projectId, intakeId)
      const { settings } = await revisionSettings(db, projectId)
      const { galaxies, problems, total } = await build(i.filePath!, opts, settings)
      return { rowsTotal: total, rowsValid: galaxies.length - problems.filter((p) => p.column === null).length, problems: problems.slice(0, MAX_PROBLEMS), problemCount: problems.length }
    },

    /** Commits every row in one transaction, or nothing (422 with the problems). */
    async commit(auth: Auth, projectId: string, intakeId: string, opts: IntakeOptions) {
      const i = await staged(projectId, intakeId)
      const { revision, settings } = await revisionSettings(db, projectId)
      const { galaxies, problems, total } = await build(i.filePath!, opts, settings)
      if (problems.length) {
        await db.update(intakes).set({ report: { problems: problems.slice(0, MAX_PROBLEMS), problemCount: problems.length } }).where(eq(intakes.id, intakeId))
        throw new HttpProblem(422, 'Unprocessable Content', `${problems.length} problem(s) in the file; nothing was stored`,
          problems.slice(0, MAX_PROBLEMS).map((p) => ({ path: `/rows/${p.row}${p.field ? '/' + p.field.replaceAll('~', '~0').replaceAll('/', '~1') : ''}`, message: `row ${p.row}${p.column ? `, column ${p.column}` : ''}: ${p.message}` })))
      }
      const { computed } = await computeForRevisions(db, projectId, galaxies, '/rows')
      const out = await db.transaction(async (tx) => {
        const [locked] = await tx.select().from(intakes).where(eq(intakes.id, intakeId)).for('update')
        if (locked.status !== 'staged') throw new HttpProblem(409, 'Conflict', `this intake is already ${locked.status}`)
        const counts = await writeGalaxies(tx, projectId, intakeId, galaxies, computed)
        const [done] = await tx.update(intakes).set({
          status: 'committed', rowsTotal: total, rowsAccepted: galaxies.length, rowsRejected: 0, revision, finishedAt: sql`now()`,
          report: { ...counts, fluxUnit: opts.fluxUnit, nonDetection: opts.nonDetection },
        }).where(eq(intakes.id, intakeId)).returning()
        if (opts.saveMappingAs) {
          await tx.insert(columnMappings).values({ projectId, name: opts.saveMappingAs, mapping: opts.mapping })
            .onConflictDoUpdate({ target: [columnMappings.projectId, columnMappings.name], set: { mapping: opts.mapping } })
        }
        return { intake: intakeDto(done, { id: auth.user.id, name: auth.user.name }), ...counts }
      })
      await rm(i.filePath!, { force: true })
      if (galaxies.length >= largeIntakeRows) {
        const [u] = await db.select().from(users).where(eq(users.id, auth.user.id))
        await mailer.send({
          to: u.email, subject: `Intake finished: ${i.fileName} (${galaxies.length} galaxies)`,
          text: `Your intake of ${i.fileName} finished: ${out.inserted} new and ${out.updated} updated galaxies, computed under assumptions revision ${revision}.\n\n${appUrl}/projects/${projectId}/intake`,
        }).catch(() => {}) // the data are stored; a mail failure must not undo that
      }
      return out
    },

    async get(projectId: string, intakeId: string) {
      const [row] = await db.select({ i: intakes, byName: users.name }).from(intakes).leftJoin(users, eq(users.id, intakes.userId))
        .where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId)))
      if (!row) throw notFound('intake')
      return { ...intakeDto(row.i, { id: row.i.userId, name: row.byName }), report: row.i.report }
    },

    uploadsDir: async () => { await mkdir(uploads, { recursive: true }); return uploads },
  }
}

/**
 * Staged CSV uploads that nobody commits would keep their files on disk for ever. Those older
 * than `maxAgeHours` are closed as rejected (the report says why) and their files removed. One
 * UPDATE claims them, so a commit racing with the sweep finds the intake no longer staged (409).
 */
export async function expireStagedIntakes(db: Db, maxAgeHours: number): Promise<number> {
  if (!(maxAgeHours > 0)) return 0
  const expired = await db.execute<{ file_path: string | null }>(sql`
    with old as (
      select id, file_path from intakes
      where status = 'staged' and created_at < now() - make_interval(hours => ${maxAgeHours}::int) for update)
    update intakes i set status = 'rejected', finished_at = now(), file_path = null,
      report = jsonb_build_object('expired', true, 'reason', ${`not committed within ${maxAgeHours} h; the uploaded file was removed`}::text)
    from old where i.id = old.id
    returning old.file_path`)
  for (const r of expired.rows) if (r.file_path) await rm(r.file_path, { force: true })
  return expired.rows.length
}
