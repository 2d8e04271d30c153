import { createReadStream } from 'node:fs'
import { access, mkdir, open, rm } from 'node:fs/promises'
import { pipeline } from 'node:stream/promises'
import { join } from 'node:path'
import { CsvError, parse } from 'csv-parse'
import { and, eq, sql } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { columnMappings, galaxies, galaxyIntakes, galaxyVersions, intakes, jobs, projects, users } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { HttpProblem, conflict, notFound } from '../http/problem.ts'
import type { GalaxyInputDto, Settings } from '../../shared/schemas/galaxy.schema.ts'
import { IntakeOptionsSchema, type IntakeCounts, type IntakeOptions, type IntakeProblem } from '../../shared/schemas/intake.schema.ts'
import {
  anyKey, bumpDataVersion, computeRows, negativeFluxErrors, revisionsToCompute, writeIntakeChunk, type RevisionPlan,
} from './galaxy-ingest.service.ts'
import { writingGalaxies } from './diagrams.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'
import type { ComputePool } from '../compute/pool.ts'
import { intakeDto, revisionSettings } from './projects.service.ts'
import { CSV_PARSE_OPTIONS, columnFor, rowToGalaxy, suggestMapping } from './csv-rows.ts'
import { dispatchJob, errorText, jobDto, registerJobRunner, reportProgress, runJob, type JobLease } from './jobs.service.ts'
import { storeResults } from './result-copy.ts'
import { currentLayoutId } from './stored-results.ts'
import { audit } from './audit.ts'
import { addCounts, zeroCounts } from './intake-counts.ts'
import { CONTROL_MESSAGE, isCleanText } from '../../shared/schemas/text.ts'

const PREVIEW_ROWS = 20
const MAX_PROBLEMS = 500
/** Rows parsed, checked, computed and written at a time: bounds memory and each pause of the event loop. */
const CHUNK_ROWS = 1000
/** Rows parsed between two turns of the event loop. */
const YIELD_ROWS = 100

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

const bad = (detail: string, path = '/file') => new HttpProblem(422, 'Unprocessable Content', detail, [{ path, message: detail }])
const fmtInt = (n: number) => n.toLocaleString('en-US')
const isComment = (line: string) => /^[\s\uFEFF]*#/.test(line)

/**
 * The header: the first complete line that is neither blank nor a `#` comment, from the start of a
 * file (`complete`: the text holds the whole file, so its last line is whole too).
 */
function headerLine(text: string, complete = true): string | undefined {
  const lines = text.replace(/^\uFEFF/, '').split(/\r?\n/)
  if (!complete) lines.pop()
  for (const line of lines) if (line.trim() !== '' && !isComment(line)) return line
  return undefined
}

/** Reads the whole file once: UTF-8 check (streaming, fatal), BOM, and the delimiter of the header line. */
async function inspect(path: string): Promise<{ delimiter: string; bytes: number }> {
  const fh = await open(path)
  const decoder = new TextDecoder('utf-8', { fatal: true })
  let start = '', bytes = 0
  let headerFound = false
  try {
    for await (const chunk of fh.createReadStream()) {
      bytes += (chunk as Buffer).length
      // valid UTF-8, but no text file holds NUL (a UTF-16 file does), and PostgreSQL cannot store it
      if ((chunk as Buffer).includes(0)) throw bad('the file holds NUL bytes, so it is not UTF-8 text (UTF-16? save it as UTF-8 CSV)')
      let text: string
      try { text = decoder.decode(chunk as Buffer, { stream: true }) } catch { throw bad('the file is not UTF-8 text (save it as UTF-8 CSV)') }
      // enough of the start to pass an opening comment block and hold the whole header line
      if (!headerFound && start.length < (1 << 20)) { start += text; headerFound = headerLine(start, false) !== undefined }
    }
    try { decoder.decode() } catch { throw bad('the file is not UTF-8 text (save it as UTF-8 CSV)') }
  } finally { await fh.close() }
  if (bytes === 0 || start.replace(/^\uFEFF/, '').trim() === '') throw bad('the file is empty')
  const header = headerLine(start, start.length < (1 << 20))
  if (header === undefined) throw bad('the file has no header row (only comment lines)')
  const line = header.replace(/"[^"]*"/g, '')
  const counts: Array<[string, number]> = [',', ';', '\t', '|'].map((d) => [d, line.split(d).length - 1])
  counts.sort((a, b) => b[1] - a[1])
  return { delimiter: counts[0][1] > 0 ? counts[0][0] : ',', bytes }
}

/**
 * Streams the records of a staged file (csv-parse, `#` comment lines skipped), with the file line of
 * each. The file is read through `pipeline`, so it is closed however the reading ends: at the end,
 * on a CSV error, or when the caller stops early (the header alone).
 */
async function* records(path: string, delimiter: string, stats?: { commentLines: number }): AsyncGenerator<{ record: string[]; line: number }> {
  const parser = parse({ ...CSV_PARSE_OPTIONS, delimiter })
  const piped = pipeline(createReadStream(path), parser)
  piped.catch(() => {}) // its failure reaches the loop below through the parser
  try {
    for await (const item of parser as AsyncIterable<{ record: string[]; info: { lines: number } }>) yield { record: item.record, line: item.info.lines }
    await piped
  } catch (err) {
    if (err instanceof CsvError) throw bad(`the file is not valid CSV: ${err.message}`)
    throw err
  } finally {
    if (stats) stats.commentLines = parser.info.comment_lines
    parser.destroy() // a caller that stopped early: the pipeline then closes the file
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

/** The mapping must name columns of the file, and at least one line: else every row would be empty. */
function checkMapping(index: Map<string, number>, m: IntakeOptions['mapping']) {
  const used = [m.id, m.redshift, m.ra, m.dec, ...Object.values(m.lines).flatMap((c) => [c?.flux, c?.error, c?.limit]), ...Object.values(m.ew), ...Object.values(m.fwhm)]
  const missing = [...new Set(used.filter((h): h is string => !!h && !index.has(h)))]
  if (missing.length) {
    throw new HttpProblem(422, 'Unprocessable Content', 'the mapping names columns the file does not have',
      missing.map((h) => ({ path: '/mapping', message: `no column "${h}" in the file` })))
  }
  if (!Object.values(m.lines).some((c) => c?.flux || c?.limit)) {
    throw new HttpProblem(422, 'Unprocessable Content', 'the mapping has no line column: map at least one line\'s flux',
      [{ path: '/mapping/lines', message: 'map at least one line\'s flux column' }])
  }
}

async function readHeader(path: string) {
  const { delimiter } = await inspect(path)
  for await (const { record } of records(path, delimiter)) return new Map(record.map((h, i) => [h.trim(), i]))
  throw bad('the file is empty')
}

/** A JSON Pointer segment (RFC 6901). */
const pointer = (s: string) => s.replaceAll('~', '~0').replaceAll('/', '~1')
const problemPath = (p: IntakeProblem) => `/rows/${p.row}${p.field ? '/' + pointer(p.field) : ''}`

/** The 422 of a file with problems: nothing was stored. Carries the problems for the intake's report. */
export class IntakeProblems extends HttpProblem {
  constructor(readonly problems: IntakeProblem[], readonly problemCount: number) {
    super(422, 'Unprocessable Content', `${problemCount} problem(s) in the file; nothing was stored`,
      problems.map((p) => ({ path: problemPath(p), message: `row ${p.row}${p.column ? `, column ${p.column}` : ''}: ${p.message}` })))
  }
}

interface PassResult { total: number; invalidRows: number; problems: IntakeProblem[]; problemCount: number; existing: number }

/**
 * One streaming pass over a staged file inside a transaction: rows are parsed, checked and handed to
 * `write` CHUNK_ROWS at a time, so memory stays flat whatever the file's size. IDs repeated anywhere
 * in the file are found through a temporary table (first row of each ID), not a set in memory. Once
 * a row has a problem nothing more is written (the caller rolls back) but every row is still checked,
 * so the report is complete.
 */
async function pass(tx: Tx, projectId: string, path: string, opts: IntakeOptions, settings: Settings, hooks: {
  write?: (gals: GalaxyInputDto[], rows: number[]) => Promise<void>
  progress?: (rowsDone: number) => Promise<void>
}): Promise<PassResult> {
  const { delimiter } = await inspect(path)
  const out: PassResult = { total: 0, invalidRows: 0, problems: [], problemCount: 0, existing: 0 }
  const keep = (p: IntakeProblem) => { out.problemCount++; if (out.problems.length < MAX_PROBLEMS) out.problems.push(p) }
  await tx.execute(sql`create temporary table if not exists intake_keys (key text primary key, row int not null) on commit drop`)
  let headerIndex: Map<string, number> | undefined
  let gals: GalaxyInputDto[] = [], rows: number[] = []
  const columnOf = (field: string) => {
    const h = columnFor(opts.mapping, field.split('/'))
    return h === null ? null : headerIndex!.get(h)! + 1
  }

  const flush = async () => {
    if (!gals.length) return
    const invalid = new Map<number, IntakeProblem[]>()
    const note = (i: number, p: IntakeProblem) => { const l = invalid.get(i) ?? []; l.push(p); invalid.set(i, l) }
    for (const e of negativeFluxErrors(gals, settings, '')) {
      const [, i, ...rest] = e.path.split('/')
      note(Number(i), { row: rows[Number(i)], column: columnOf(rest.join('/')), field: rest.join('/'), message: e.message })
    }
    const firsts = await tx.execute<{ key: string; row: number }>(sql`
      insert into intake_keys (key, row) select t.key, t.row from json_to_recordset(${JSON.stringify(gals.map((g, i) => ({ key: g.id, row: rows[i] })))}::json) as t(key text, row int)
      on conflict do nothing returning key, row`)
    const firstRow = new Map(firsts.rows.map((r) => [r.key, r.row]))
    const repeated = gals.map((g, i) => [g.id, i] as const).filter(([key, i]) => firstRow.get(key) !== rows[i])
    if (repeated.length) {
      const earlier = await tx.execute<{ key: string; row: number }>(sql`select key, row from intake_keys where key = ${anyKey(repeated.map(([k]) => k))}`)
      const at = new Map(earlier.rows.map((r) => [r.key, r.row]))
      for (const [key, i] of repeated) note(i, { row: rows[i], column: headerIndex!.get(opts.mapping.id)! + 1, field: opts.mapping.id, message: `duplicate galaxy id "${key}" (also in row ${at.get(key)})` })
    }
    for (const [, ps] of [...invalid.entries()].sort((a, b) => a[0] - b[0])) { out.invalidRows++; ps.forEach(keep) }
    const okGals = gals.filter((_, i) => !invalid.has(i)), okRows = rows.filter((_, i) => !invalid.has(i))
    if (!hooks.write) {
      const [{ n }] = (await tx.execute<{ n: number }>(sql`select count(*)::int as n from galaxies where project_id = ${projectId}::uuid
        and key = ${anyKey(okGals.map((g) => g.id))}`)).rows
      out.existing += n
    } else if (out.problemCount === 0 && okGals.length) {
      await hooks.write(okGals, okRows)
    }
    gals = []; rows = []
    await hooks.progress?.(out.total)
  }

  for await (const { record, line } of records(path, delimiter)) {
    if (!headerIndex) {
      headerIndex = new Map(record.map((h, i) => [h.trim(), i]))
      checkMapping(headerIndex, opts.mapping)
      continue
    }
    out.total++
    const found: IntakeProblem[] = []
    const g = rowToGalaxy(record, line, headerIndex, opts, found)
    if (g) { gals.push(g); rows.push(line) } else { out.invalidRows++; found.forEach(keep) }
    if (gals.length >= CHUNK_ROWS) await flush()
    // records already buffered arrive as microtasks: without a turn of the event loop now and then
    // a chunk's parsing and checking holds it for tens of ms (an inline commit runs inside a request)
    else if (out.total % YIELD_ROWS === 0) await new Promise((ok) => setImmediate(ok))
  }
  await flush()
  if (!headerIndex) throw bad('the file is empty')
  out.problems.sort((a, b) => a.row - b.row)
  return out
}

interface IntakeJobParams { intakeId: string; options: unknown }

/**
 * Computes the galaxies this intake wrote under revisions that appeared (or finished recomputing)
 * while its transaction was open: the recompute that made them could not see rows not yet committed.
 */
async function computeIntakeUnder(tx: Tx, pool: ComputePool, projectId: string, intakeId: string, plans: RevisionPlan[]) {
  let lastId = 0
  for (;;) {
    const rows = (await tx.execute<{ id: number; key: string; redshift: number | null; flux_unit: number; input: Pick<GalaxyInputDto, 'lines' | 'ew' | 'fwhm'> }>(sql`
      select g.id, g.key, g.redshift, g.flux_unit, g.input from galaxy_intakes gi join galaxies g on g.id = gi.galaxy_id
      where gi.intake_id = ${intakeId}::uuid and gi.galaxy_id > ${lastId} order by gi.galaxy_id limit ${CHUNK_ROWS}`)).rows
    if (!rows.length) return
    const inputs: GalaxyInputDto[] = rows.map((r) => ({ id: r.key, ...(r.redshift !== null ? { redshift: r.redshift } : {}), fluxUnit: r.flux_unit, ...r.input }))
    for (const p of plans) {
      const ids = rows.map((r) => r.id)
      await storeResults(tx, { projectId, revision: p.revision, layoutId: await currentLayoutId(tx) }, await computeRows(pool, inputs, p.settings), ids, 0, ids)
    }
    lastId = rows[rows.length - 1].id
  }
}

/**
 * The `intake` job: stores a staged CSV in one transaction on the job's lease connection, fed in
 * chunks straight from the file (see `pass`). All or nothing: a problem, an error or a crash rolls
 * everything back, so no part of an intake is ever visible; progress is written outside the
 * transaction for the dashboard. The intake and the job are marked done in the same transaction.
 */
async function runIntakeJob(lease: JobLease, job: typeof jobs.$inferSelect, galaxy: GalaxyContext) {
  const { db } = galaxy
  const { intakeId, options } = job.params as IntakeJobParams
  const opts = IntakeOptionsSchema.parse(options)
  const [i] = await db.select().from(intakes).where(eq(intakes.id, intakeId))
  if (!i || i.status !== 'committing' || !i.filePath) throw new Error(`the intake is ${i?.status ?? 'gone'}`)
  const projectId = i.projectId
  const counts = zeroCounts()
  const out = await writingGalaxies(galaxy, projectId, () => lease.db.transaction(async (tx) => {
    const [locked] = await tx.select().from(intakes).where(eq(intakes.id, intakeId)).for('update')
    if (locked.status !== 'committing') throw new Error(`the intake is ${locked.status}`)
    const revisions = await revisionsToCompute(tx, projectId)
    const ctx = { compute: galaxy.compute, projectId, intakeId, onExisting: opts.onExisting, revisions, bumpVersion: false }
    const res = await pass(tx, projectId, i.filePath!, opts, revisions[0].settings, {
      write: async (gals, rows) => addCounts(counts, await writeIntakeChunk(tx, { ...ctx, where: (k) => `/rows/${rows[k]}` }, gals)),
      progress: (done) => reportProgress(db, job.id, { done }),
    })
    if (res.problemCount) throw new IntakeProblems(res.problems, res.problemCount)
    // a revision made, or a recompute finished, while this ran: its results for these galaxies too
    await tx.select({ id: projects.id }).from(projects).where(eq(projects.id, projectId)).for('update')
    const now = await revisionsToCompute(tx, projectId)
    const missing = now.filter((r) => !revisions.some((x) => x.revision === r.revision))
    if (missing.length) await computeIntakeUnder(tx, galaxy.compute, projectId, intakeId, missing)
    await bumpDataVersion(tx, projectId)
    const [done] = await tx.update(intakes).set({
      status: 'committed', rowsTotal: res.total, rowsAccepted: res.total, rowsRejected: 0, revision: now[0].revision, finishedAt: sql`now()`,
      report: { ...counts, onExisting: opts.onExisting, fluxUnit: opts.fluxUnit, nonDetection: opts.nonDetection, jobId: job.id },
    }).where(eq(intakes.id, intakeId)).returning()
    if (opts.saveMappingAs) {
      await tx.insert(columnMappings).values({ projectId, name: opts.saveMappingAs, mapping: opts.mapping })
        .onConflictDoUpdate({ target: [columnMappings.projectId, columnMappings.name], set: { mapping: opts.mapping } })
    }
    await tx.update(jobs).set({ status: 'done', done: res.total, total: res.total, finishedAt: sql`now()`, heartbeatAt: sql`now()` }).where(eq(jobs.id, job.id))
    return { intake: done, revision: now[0].revision }
  }))
  await rm(i.filePath, { force: true })
  // a large intake mails its starter through the mailer of the app (or worker) running the job
  const mail = galaxy.intakeMail
  if (mail && out.intake.rowsAccepted >= mail.largeIntakeRows && i.userId) {
    const [u] = await db.select().from(users).where(eq(users.id, i.userId))
    if (u) {
      await mail.mailer.send({
        to: u.email, subject: `Intake finished: ${i.fileName} (${out.intake.rowsAccepted} galaxies)`,
        text: `Your intake of ${i.fileName} finished: ${counts.inserted} new, ${counts.replaced} replaced, ${counts.merged} merged and ${counts.skipped} existing galaxies left as they were, computed under assumptions revision ${out.revision}.\n\n${mail.appUrl}/projects/${projectId}/intake`,
      }).catch(() => {}) // the data are stored; a mail failure must not undo that
    }
  }
}

registerJobRunner('intake', {
  run: runIntakeJob,
  continues: false, // one transaction: after a crash nothing of it was stored, so it starts again
  inProcess: true, // the staged file is on this machine's disk
  async runnableHere(job, db) {
    const { intakeId } = job.params as IntakeJobParams
    const [i] = await db.select({ filePath: intakes.filePath }).from(intakes).where(eq(intakes.id, intakeId))
    if (!i?.filePath) return false
    try { await access(i.filePath); return true } catch { return false }
  },
  async failed(db, job, err) {
    // nothing was stored: the intake is staged again, with the reason, so it can be committed anew
    const { intakeId } = job.params as IntakeJobParams
    const report = err instanceof IntakeProblems ? { problems: err.problems, problemCount: err.problemCount }
      : err instanceof HttpProblem ? { problems: [], problemCount: 1, error: err.detail ?? err.title, errors: err.errors ?? [] }
        : { error: errorText(err) }
    await db.update(intakes).set({ status: 'staged', report }).where(and(eq(intakes.id, intakeId), eq(intakes.status, 'committing')))
  },
})

export function intakeService(galaxy: GalaxyContext, dataDir: string, limits: { maxRows: number; inlineRows: number } = { maxRows: 1_000_000, inlineRows: 10_000 }) {
  const { db } = galaxy
  const uploads = join(dataDir, 'uploads')

  async function staged(projectId: string, intakeId: string) {
    const [i] = await db.select().from(intakes).where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId)))
    if (!i || i.kind !== 'csv') throw notFound('intake')
    if (i.status !== 'staged' || !i.filePath) throw new HttpProblem(409, 'Conflict', `this intake is already ${i.status}`)
    return i
  }

  return {
    async stage(auth: Auth, projectId: string, file: { path: string; originalname: string; size: number }) {
      try {
        const { delimiter } = await inspect(file.path)
        let headers: string[] | undefined
        const preview: string[][] = []
        let count = 0
        const stats = { commentLines: 0 }
        for await (const { record } of records(file.path, delimiter, stats)) {
          if (!headers) { headers = record.map((h) => h.trim()); checkHeaders(headers); continue }
          if (preview.length < PREVIEW_ROWS) preview.push(record)
          if (++count > limits.maxRows) {
            throw new HttpProblem(413, 'Content Too Large', `the file has more than ${fmtInt(limits.maxRows)} data rows, the most one intake takes; split it into files of at most ${fmtInt(limits.maxRows)} rows`,
              [{ path: '/file', message: `more than ${fmtInt(limits.maxRows)} rows` }])
          }
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
          commentLines: stats.commentLines,
          suggestedMapping: suggestMapping(headers), savedMappings: saved.map((s) => ({ name: s.name, mapping: s.mapping })),
        }
      } catch (err) {
        await rm(file.path, { force: true })
        throw err
      }
    },

    /** Checks every row with a mapping and says how many IDs the project already has; stores nothing. */
    async validate(projectId: string, intakeId: string, opts: IntakeOptions) {
      const i = await staged(projectId, intakeId)
      const { settings } = await revisionSettings(db, projectId)
      const r = await db.transaction((tx) => pass(tx, projectId, i.filePath!, opts, settings, {}))
      return { rowsTotal: r.total, rowsValid: r.total - r.invalidRows, problems: r.problems, problemCount: r.problemCount, existing: r.existing, onExisting: opts.onExisting }
    },

    /**
     * Starts the `intake` job that stores the file (all or nothing). Up to `inlineRows` rows it runs
     * within the request (200 with the counts, or 422 with the problems); larger files answer 202 at
     * once with the job to follow.
     */
    async commit(auth: Auth, projectId: string, intakeId: string, opts: IntakeOptions) {
      const i = await staged(projectId, intakeId)
      checkMapping(await readHeader(i.filePath!), opts.mapping)
      const job = await db.transaction(async (tx) => {
        const [locked] = await tx.select().from(intakes).where(eq(intakes.id, intakeId)).for('update')
        if (locked.status !== 'staged') throw new HttpProblem(409, 'Conflict', `this intake is already ${locked.status}`)
        await tx.update(intakes).set({ status: 'committing', report: null }).where(eq(intakes.id, intakeId))
        const [j] = await tx.insert(jobs).values({
          projectId, kind: 'intake', status: 'queued', total: i.rowsTotal, createdBy: auth.user.id,
          params: { intakeId, options: opts } satisfies IntakeJobParams,
        }).returning()
        return j
      })
      const by = { id: auth.user.id, name: auth.user.name }
      if (i.rowsTotal > limits.inlineRows) {
        await dispatchJob(galaxy, undefined, job)
        const [now] = await db.select().from(intakes).where(eq(intakes.id, intakeId))
        return { status: 202 as const, body: { intake: intakeDto(now, by), job: jobDto(job) } }
      }
      await runJob(galaxy, job.id)
      const [done] = await db.select().from(intakes).where(eq(intakes.id, intakeId))
      const [j] = await db.select().from(jobs).where(eq(jobs.id, job.id))
      return { status: 200 as const, body: { intake: intakeDto(done, by), ...(done.report as IntakeCounts), job: jobDto(j) } }
    },

    async get(projectId: string, intakeId: string) {
      const [row] = await db.select({ i: intakes, byName: users.name }).from(intakes).leftJoin(users, eq(users.id, intakes.userId))
        .where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId)))
      if (!row) throw notFound('intake')
      return { ...intakeDto(row.i, { id: row.i.userId, name: row.byName }), report: row.i.report }
    },

    /**
     * Undoes a committed intake (see `undoIntake`). Intakes of up to `inlineRows` rows are undone
     * within the request (200); larger ones by an `undo` job (202), after the same checks.
     */
    async undo(auth: Auth, projectId: string, intakeId: string) {
      const by = { id: auth.user.id, name: auth.user.name }
      const [i] = await db.select().from(intakes).where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId)))
      if (!i) throw notFound('intake')
      if (i.rowsAccepted <= limits.inlineRows) {
        const out = await writingGalaxies(galaxy, projectId, () => db.transaction((tx) => undoIntake(tx, galaxy.compute, by, projectId, intakeId)))
        return { status: 200 as const, body: { intake: intakeDto(out.intake, i.userId ? { id: i.userId, name: out.byName } : null), restored: out.restored, removed: out.removed } }
      }
      const job = await db.transaction(async (tx) => {
        await undoChecks(tx, projectId, intakeId, false)
        const [running] = await tx.select({ id: jobs.id }).from(jobs)
          .where(and(eq(jobs.kind, 'undo'), sql`${jobs.status} in ('queued', 'running')`, sql`${jobs.params}->>'intakeId' = ${intakeId}`))
        if (running) throw conflict('an undo of this intake is already running')
        const [j] = await tx.insert(jobs).values({ projectId, kind: 'undo', status: 'queued', total: i.rowsAccepted, createdBy: by.id, params: { intakeId, by } }).returning()
        return j
      })
      await dispatchJob(galaxy, undefined, job)
      const [byRow] = i.userId ? await db.select({ name: users.name }).from(users).where(eq(users.id, i.userId)) : []
      return { status: 202 as const, body: { intake: intakeDto(i, i.userId ? { id: i.userId, name: byRow?.name ?? null } : null), job: jobDto(job) } }
    },

    /** Earlier records of a galaxy, newest first, each with the intake that had written it and the one that superseded it. */
    async versions(projectId: string, key: string) {
      const [g] = await db.select({ id: galaxies.id }).from(galaxies).where(and(eq(galaxies.projectId, projectId), eq(galaxies.key, key)))
      if (!g) throw notFound('galaxy')
      const rows = await db.select({ v: galaxyVersions, i: intakes }).from(galaxyVersions).innerJoin(intakes, eq(intakes.id, galaxyVersions.intakeId))
        .where(eq(galaxyVersions.galaxyId, g.id)).orderBy(sql`${galaxyVersions.replacedAt} desc, ${galaxyVersions.id} desc`)
      return {
        items: rows.map(({ v, i }) => {
          const input = v.input as { lines: unknown; ew?: unknown; fwhm?: unknown }
          return {
            writtenBy: v.previousIntakeId, writtenAt: v.writtenAt.toISOString(), replacedAt: v.replacedAt.toISOString(),
            supersededBy: { intakeId: i.id, kind: i.kind, fileName: i.fileName, createdAt: i.createdAt.toISOString() },
            record: { id: key, redshift: v.redshift, fluxUnit: v.fluxUnit, ra: v.ra, dec: v.dec, lines: input.lines, ew: input.ew ?? null, fwhm: input.fwhm ?? null },
          }
        }),
      }
    },

    uploadsDir: async () => { await mkdir(uploads, { recursive: true }); return uploads },
  }
}

/** The intake must be committed, kept with history, and the last to have written each of its galaxies. */
async function undoChecks(tx: Tx, projectId: string, intakeId: string, lock: boolean) {
  const [i] = await (lock
    ? tx.select().from(intakes).where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId))).for('update')
    : tx.select().from(intakes).where(and(eq(intakes.id, intakeId), eq(intakes.projectId, projectId))))
  if (!i) throw notFound('intake')
  if (i.status !== 'committed') throw conflict(`this intake is ${i.status}; only a committed intake can be undone`)
  const [check] = (await tx.execute<{ unknown: number; later: number; example: string | null; created: number }>(sql`
    with touched as (
      select g.id, g.key, g.last_intake_id, gi.change from galaxy_intakes gi join galaxies g on g.id = gi.galaxy_id
      where gi.intake_id = ${intakeId}::uuid ${lock ? sql`for update of g` : sql``})
    select count(*) filter (where change is null)::int as unknown,
      count(*) filter (where last_intake_id is distinct from ${intakeId}::uuid)::int as later,
      min(key) filter (where last_intake_id is distinct from ${intakeId}::uuid) as example,
      count(*) filter (where change = 'created')::int as created
    from touched`)).rows
  if (check.unknown > 0) throw conflict('this intake was stored before intake history was kept, so its earlier records are not known; it cannot be undone')
  if (check.later > 0) throw conflict(`${fmtInt(check.later)} of its galaxies (e.g. "${check.example}") were changed by a later intake; undo that intake first`)
  return { intake: i, created: check.created }
}

/**
 * Undoes a committed intake inside the caller's transaction: the records it replaced or merged into
 * are restored exactly (inputs, their earlier intake and time), the galaxies it created are removed,
 * and every stored result of a restored galaxy is computed again from the restored inputs.
 * Refused (409) when a later intake has changed any of its galaxies: undo that one first.
 */
async function undoIntake(tx: Tx, pool: ComputePool, by: { id: string; name: string | null }, projectId: string, intakeId: string, progress?: (n: number) => Promise<void>) {
  const { intake: i, created } = await undoChecks(tx, projectId, intakeId, true)
  await tx.execute(sql`
    update galaxies g set redshift = v.redshift, ra = v.ra, dec = v.dec, flux_unit = v.flux_unit, input = v.input, provenance = v.provenance,
      last_intake_id = v.previous_intake_id, updated_at = v.written_at
    from galaxy_versions v where v.intake_id = ${intakeId}::uuid and v.galaxy_id = g.id`)
  await tx.execute(sql`delete from galaxies where id in (select galaxy_id from galaxy_intakes where intake_id = ${intakeId}::uuid and change = 'created')`)
  // undoing a spectra upload's intake takes its spectra (and their fits) away too: what it wrote came from them
  await tx.execute(sql`delete from spectra where upload_id in (select id from spectrum_uploads where intake_id = ${intakeId}::uuid)`)
  await progress?.(created)
  const restored = await recomputeRestored(tx, pool, projectId, intakeId, (n) => progress?.(created + n))
  await tx.delete(galaxyVersions).where(eq(galaxyVersions.intakeId, intakeId))
  await tx.delete(galaxyIntakes).where(eq(galaxyIntakes.intakeId, intakeId))
  await bumpDataVersion(tx, projectId)
  const undone = { at: new Date().toISOString(), by, restored, removed: created }
  const [u] = await tx.update(intakes).set({ status: 'undone', report: sql`coalesce(${intakes.report}, '{}'::jsonb) || ${JSON.stringify({ undone })}::jsonb` })
    .where(eq(intakes.id, intakeId)).returning()
  await audit(tx, { action: 'intake-undone', actorUserId: by.id, projectId, target: `intake ${intakeId}`, details: { restored, removed: created, fileName: i.fileName, kind: i.kind } })
  const [byRow] = u.userId ? await tx.select({ name: users.name }).from(users).where(eq(users.id, u.userId)) : []
  return { intake: u, byName: byRow?.name ?? null, restored, removed: created }
}

/** The `undo` job: a large intake undone in one transaction on the lease's connection, with progress. */
registerJobRunner('undo', {
  continues: false, // one transaction: after a crash nothing of it was kept
  inProcess: true,
  async run(lease, job, galaxy) {
    const { intakeId, by } = job.params as { intakeId: string; by: { id: string; name: string | null } }
    await writingGalaxies(galaxy, job.projectId, () => lease.db.transaction(async (tx) => {
      await undoIntake(tx, galaxy.compute, by, job.projectId, intakeId, (n) => reportProgress(galaxy.db, job.id, { done: n }))
      await tx.update(jobs).set({ status: 'done', done: job.total, finishedAt: sql`now()`, heartbeatAt: sql`now()` }).where(eq(jobs.id, job.id))
    }))
  },
})

/** Every stored result of the galaxies an undo restored, computed again from the restored inputs. */
async function recomputeRestored(tx: Tx, pool: ComputePool, projectId: string, intakeId: string, progress?: (n: number) => Promise<void> | undefined): Promise<number> {
  const revs = (await tx.execute<{ revision: number }>(sql`select distinct r.revision from results r
    where r.galaxy_id in (select galaxy_id from galaxy_versions where intake_id = ${intakeId}::uuid) order by 1`)).rows
  const plans = await Promise.all(revs.map((r) => revisionSettings(tx, projectId, r.revision)))
  let lastId = 0, restored = 0
  for (;;) {
    const rows = (await tx.execute<{ id: number; key: string; redshift: number | null; flux_unit: number; input: Pick<GalaxyInputDto, 'lines' | 'ew' | 'fwhm'> }>(sql`
      select g.id, g.key, g.redshift, g.flux_unit, g.input from galaxy_versions v join galaxies g on g.id = v.galaxy_id
      where v.intake_id = ${intakeId}::uuid and v.galaxy_id > ${lastId} order by v.galaxy_id limit ${CHUNK_ROWS}`)).rows
    if (!rows.length) return restored
    restored += rows.length
    const inputs: GalaxyInputDto[] = rows.map((r) => ({ id: r.key, ...(r.redshift !== null ? { redshift: r.redshift } : {}), fluxUnit: r.flux_unit, ...r.input }))
    const have = new Map<number, Set<number>>()
    for (const r of (await tx.execute<{ galaxy_id: number; revision: number }>(sql`select galaxy_id, revision from results
      where galaxy_id = any(${'{' + rows.map((r) => r.id).join(',') + '}'}::bigint[])`)).rows) {
      if (!have.has(r.revision)) have.set(r.revision, new Set())
      have.get(r.revision)!.add(r.galaxy_id)
    }
    for (const p of plans) {
      const ids = have.get(p.revision)
      if (!ids?.size) continue
      const stored = rows.map((r) => (ids.has(r.id) ? r.id : undefined))
      await storeResults(tx, { projectId, revision: p.revision, layoutId: await currentLayoutId(tx) }, await computeRows(pool, inputs, p.settings), stored, 0, [...ids])
    }
    lastId = rows[rows.length - 1].id
    await progress?.(restored)
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

