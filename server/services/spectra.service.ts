import { createHash } from 'node:crypto'
import { to as copyTo } from 'pg-copy-streams'
import { endianness } from 'node:os'
import { basename, extname } from 'node:path'
import { and, asc, desc, eq, getTableColumns, sql, type SQL } from 'drizzle-orm'
import type { Db } from '../db/client.ts'
import { intakes, jobs, lineFits, projects, spectra, spectrumUploads } from '../db/schema.ts'
import type { Auth } from '../http/auth.ts'
import { HttpProblem, notFound, type FieldError } from '../http/problem.ts'
import { audit } from './audit.ts'
import { anyKey } from './galaxy-ingest.service.ts'
import type { GalaxyContext } from './galaxy-context.ts'
import { dispatchJob, jobDto } from './jobs.service.ts'
import { revisionSettings } from './projects.service.ts'
import { printable, readUpload, removeStaged, type FileOutcome, type UploadedFile } from './spectra-upload.service.ts'
import type { ReadSpectrum } from '../compute/read-spectra.task.ts'
import { FIT_METHOD_VERSION, modelOf, type FitSettings, type StoredSpectrumArrays } from '../compute/fit-spectra.task.ts'
import type { Settings } from '../../shared/schemas/galaxy.schema.ts'
import { GalaxyInputSchema } from '../../shared/schemas/galaxy.schema.ts'
import { FitOptionsSchema } from '../../shared/schemas/fit-options.schema.ts'
import type { SpectraUploadFormSchema, SpectraListQuerySchema, UploadDefaults } from '../../shared/schemas/project-spectra.schema.ts'
import type { z } from 'zod'

/**
 * Spectra stored in a project: an upload stored in one transaction (all or nothing, or the good
 * files with `skipInvalid`), the fit-quality table, one galaxy's spectrum with its fit and model,
 * and a trial refit that stores nothing. The fit itself is the `fit` job (spectra-fit.service.ts).
 */

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]
type Executor = Db | Tx
type SpectrumRow = typeof spectra.$inferSelect
type LineFitRow = typeof lineFits.$inferSelect

// ---- stored arrays --------------------------------------------------------------------------------

const LITTLE_ENDIAN = endianness() === 'LE'
/** A typed array as little-endian bytes (the stored form). */
export function toBytes(a: Float64Array | Float32Array): Buffer {
  const b = Buffer.from(a.buffer.slice(a.byteOffset, a.byteOffset + a.byteLength))
  if (!LITTLE_ENDIAN) { if (a instanceof Float64Array) b.swap64(); else b.swap32() }
  return b
}
const { wavelength: _w, flux: _f, noise: _n, ...META_COLUMNS } = getTableColumns(spectra)

/**
 * Stored spectra with their arrays, in id order. The arrays are read by a binary COPY: as query
 * text a bytea comes as hex, twice the bytes for PostgreSQL to write and for the client to decode
 * into a string and again into bytes (about 130 kB a 4,000-pixel spectrum). A spectrum deleted
 * between the two reads is left out.
 */
export async function selectSpectra(db: Db, where: SQL, limit?: number): Promise<SpectrumRow[]> {
  const q = db.select(META_COLUMNS).from(spectra).where(where).orderBy(asc(spectra.id))
  const meta = await (limit !== undefined ? q.limit(limit) : q)
  if (!meta.length) return []
  // the ids are integers from the query above
  const ids = meta.map((m) => Number(m.id)).filter(Number.isSafeInteger).join(',')
  const client = await db.$client.connect()
  let bytes: Buffer
  try {
    const chunks: Buffer[] = []
    const stream = client.query(copyTo(`copy (select id, wavelength, flux, noise from spectra where id = any('{${ids}}'::bigint[])) to stdout with (format binary)`))
    for await (const chunk of stream) chunks.push(chunk as Buffer)
    bytes = Buffer.concat(chunks)
  } finally {
    client.release()
  }
  const byId = new Map(binaryCopyRows(bytes).map(([id, wavelength, flux, noise]) => [Number(id!.readBigInt64BE(0)), { wavelength: wavelength!, flux: flux!, noise: noise! }]))
  const out: SpectrumRow[] = []
  for (const m of meta) {
    const a = byId.get(m.id)
    if (a) out.push({ ...m, ...a })
  }
  return out
}

/** The tuples of a binary COPY (PostgreSQL documentation, COPY, "Binary Format"): each field's bytes, null for NULL. */
export function binaryCopyRows(b: Buffer): Array<Array<Buffer | null>> {
  const SIGNATURE = 'PGCOPY\n\xff\r\n\0'
  if (b.length < 19 || b.toString('latin1', 0, 11) !== SIGNATURE) throw new Error('not a binary COPY stream')
  let at = 19 + b.readUInt32BE(15)
  const rows: Array<Array<Buffer | null>> = []
  for (;;) {
    const fields = b.readInt16BE(at)
    at += 2
    if (fields === -1) return rows
    const row: Array<Buffer | null> = []
    for (let k = 0; k < fields; k++) {
      const len = b.readInt32BE(at)
      at += 4
      if (len < 0) { row.push(null); continue }
      row.push(b.subarray(at, at + len))
      at += len
    }
    rows.push(row)
  }
}

/** Little-endian bytes as a typed array (copied: a Buffer's pool offset need not be aligned). */
function fromBytes<T extends Float64Array | Float32Array>(b: Buffer, make: new (buffer: ArrayBuffer) => T, width: 4 | 8): T {
  const copy = new Uint8Array(b.byteLength)
  copy.set(b)
  if (!LITTLE_ENDIAN) { const view = Buffer.from(copy.buffer); if (width === 8) view.swap64(); else view.swap32() }
  return new make(copy.buffer)
}

/** A stored row's arrays and what the fit needs of it. */
export function arraysOf(row: SpectrumRow): StoredSpectrumArrays {
  return {
    galaxyId: row.galaxyId, redshift: row.redshift, fluxUnit: row.fluxUnit, fluxUnitAssumed: row.fluxUnitAssumed,
    wavelengthMedium: row.wavelengthMedium as 'air' | 'vacuum', resolution: (row.resolution as StoredSpectrumArrays['resolution']) ?? null,
    wavelength: fromBytes(row.wavelength, Float64Array, 8), flux: fromBytes(row.flux, Float32Array, 4),
    noiseKind: row.noiseKind as 'error' | 'ivar', noise: fromBytes(row.noise, Float32Array, 4),
  }
}

/** The fit settings of a revision: its `fit` options and the detection threshold of the diagnostics. */
export function fitSettingsOf(settings: Settings): FitSettings {
  return { ...settings.fit, minSnr: settings.minSnr }
}
/** JSON with every object's keys sorted (jsonb gives them back in its own order). */
const canonical = (v: unknown): string => (Array.isArray(v) ? `[${v.map(canonical).join(',')}]`
  : v && typeof v === 'object' ? `{${Object.keys(v).sort().map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`).join(',')}}`
    : JSON.stringify(v))
/** Two revisions with equal fit settings give the same fit (the fit is deterministic): its key. */
export const fitSettingsKey = (s: FitSettings) => canonical(s)

/** A Float32 value as the shortest decimal that reads back as the same Float32 (what was written, typically). */
export function f32(v: number): number {
  if (!Number.isFinite(v) || v === 0) return v
  for (let p = 6; p < 9; p++) { const d = Number(v.toPrecision(p)); if (Math.fround(d) === v) return d }
  return Number(v.toPrecision(9))
}

// ---- upload -----------------------------------------------------------------------------------------

type UploadForm = z.output<typeof SpectraUploadFormSchema>
interface FileReport {
  name: string; size: number
  spectra?: Array<{ galaxyId: string; pixels: number; source: string; spectrumId: number | null; stored: 'created' | 'replaced' | 'skipped'; fluxUnitAssumed?: true }>
  error?: { message: string; line?: number }
}

/** Problems listed in a 422 at the most (the count in its detail is of all). */
const MAX_PROBLEMS = 500

/** The 422 of an upload with bad files: nothing was stored. */
export class SpectraFileProblems extends HttpProblem {
  constructor(errors: FieldError[], files: number) {
    super(422, 'Unprocessable Content', `${files} file(s) could not be stored; nothing was stored (send skipInvalid=true to store the others)`, errors.slice(0, MAX_PROBLEMS))
  }
}

const GalaxyIdSchema = GalaxyInputSchema.shape.id
const stem = (name: string) => basename(name, extname(name))

interface Placed { s: ReadSpectrum; k: number; galaxyId: string; redshift?: number }

/** The galaxy ID and redshift of each spectrum of a file, or the problems that keep it out. */
async function placeSpectra(tx: Tx, projectId: string, f: FileOutcome, defaults: UploadDefaults, seen: Map<string, number>) {
  const problems: FieldError[] = []
  const at = (k: number, field: string) => `/files/${f.index}/spectra/${k}/${field}`
  const placed: Placed[] = f.spectra!.map((s, k) => ({
    s, k, galaxyId: (s.id ?? '').trim() || (f.spectra!.length === 1 ? stem(f.name) : `${stem(f.name)}-${k + 1}`),
    redshift: s.redshift ?? defaults.redshift,
  }))
  const inFile = new Map<string, number>()
  for (const p of placed) {
    const ok = GalaxyIdSchema.safeParse(p.galaxyId)
    if (!ok.success) problems.push({ path: at(p.k, 'id'), message: `galaxy ID "${printable(p.galaxyId.slice(0, 40))}": ${ok.error.issues[0]!.message}` })
    else if (seen.has(p.galaxyId)) problems.push({ path: at(p.k, 'id'), message: `galaxy ${p.galaxyId} has a spectrum in file ${seen.get(p.galaxyId)} of this upload too` })
    else if (inFile.has(p.galaxyId)) problems.push({ path: at(p.k, 'id'), message: `galaxy ${p.galaxyId} has spectrum ${inFile.get(p.galaxyId)} of this file too` })
    inFile.set(p.galaxyId, p.k)
    if (p.redshift !== undefined && !(p.redshift >= 0 && p.redshift <= 20)) problems.push({ path: at(p.k, 'redshift'), message: `redshift ${p.redshift} is not from 0 to 20` })
  }
  const unknownZ = placed.filter((p) => p.redshift === undefined)
  if (unknownZ.length) {
    const rows = (await tx.execute<{ key: string; redshift: number | null }>(sql`select key, redshift from galaxies
      where project_id = ${projectId}::uuid and key = ${anyKey(unknownZ.map((p) => p.galaxyId))}`)).rows
    const z = new Map(rows.map((r) => [r.key, r.redshift]))
    for (const p of unknownZ) {
      const known = z.get(p.galaxyId)
      if (known !== null && known !== undefined) p.redshift = known
      else problems.push({ path: at(p.k, 'redshift'), message: `no redshift for ${p.galaxyId}: the file has none (Z or REDSHIFT), the upload's defaults have none, and the project has no redshift for this galaxy` })
    }
  }
  return { placed, problems }
}

/** Spectra stored with one statement (and one DELETE when replacing): ≈ 4 MB of arrays at 4,000 pixels. */
const STORE_BATCH = 64

interface Pending { p: Placed; fileName: string; entry: NonNullable<FileReport['spectra']>[number] }

/** Neither the file (BUNIT, a unit column, fluxUnit) nor the upload's defaults say what one flux unit is: 1 is assumed. */
const fluxUnitAssumed = (p: Placed, defaults: UploadDefaults) => p.s.fluxUnit === undefined && defaults.fluxUnit === undefined

/**
 * Stores a batch of spectra (skipping or replacing a galaxy's earlier one) and fills in each report
 * entry's id and outcome. The galaxies of one upload are distinct (placeSpectra), so a batch holds
 * each at most once.
 */
async function storeBatch(tx: Tx, projectId: string, uploadId: string, batch: Pending[], defaults: UploadDefaults, onExisting: 'skip' | 'replace') {
  if (!batch.length) return 0
  const keys = batch.map((b) => b.p.galaxyId)
  const replaced = new Set<string>()
  if (onExisting === 'replace') {
    const gone = await tx.delete(spectra).where(and(eq(spectra.projectId, projectId), sql`${spectra.galaxyId} = ${anyKey(keys)}`)).returning({ galaxyId: spectra.galaxyId })
    for (const g of gone) replaced.add(g.galaxyId)
  }
  const values = batch.map(({ p, fileName }) => {
    const wavelength = toBytes(p.s.wavelength), flux = toBytes(p.s.flux), noise = toBytes(p.s.noise)
    const sha256 = createHash('sha256').update(wavelength).update(flux).update(noise).digest('hex')
    return {
      projectId, galaxyId: p.galaxyId, uploadId, fileName: fileName.slice(0, 255), source: printable(p.s.source).slice(0, 500), redshift: p.redshift!,
      wavelengthMedium: p.s.wavelengthMedium ?? defaults.wavelengthMedium ?? 'air', fluxUnit: p.s.fluxUnit ?? defaults.fluxUnit ?? 1,
      fluxUnitAssumed: fluxUnitAssumed(p, defaults),
      resolution: p.s.resolution ?? defaults.resolution ?? null, pixels: p.s.pixels, wavelengthMin: p.s.wavelength[0]!, wavelengthMax: p.s.wavelength[p.s.pixels - 1]!,
      wavelength, flux, noiseKind: p.s.noiseKind, noise, sha256,
    }
  })
  const rows = await tx.insert(spectra).values(values).onConflictDoNothing().returning({ id: spectra.id, galaxyId: spectra.galaxyId })
  const ids = new Map(rows.map((r) => [r.galaxyId, r.id]))
  for (const { p, entry } of batch) {
    const id = ids.get(p.galaxyId) ?? null
    entry.spectrumId = id
    entry.stored = id === null ? 'skipped' : replaced.has(p.galaxyId) ? 'replaced' : 'created'
  }
  return rows.length
}

const fileError = (problems: FieldError[], line?: number) => ({
  message: problems[0]!.message + (problems.length > 1 ? ` (and ${problems.length - 1} more)` : ''), ...(line !== undefined ? { line } : {}),
})

export function uploadDto(u: typeof spectrumUploads.$inferSelect) {
  return { id: u.id, createdAt: u.createdAt.toISOString(), fileCount: u.fileCount, spectrumCount: u.spectrumCount, intakeId: u.intakeId, files: u.report as FileReport[] }
}

/**
 * Stores the spectra of an upload's files (read, or refused by their problems) in the caller's
 * transaction: the upload and its report, its `spectra` intake and its queued `fit` job, which the
 * caller dispatches once this commits. A bad file refuses the whole upload (422, nothing stored)
 * unless `skipInvalid`. The upload route and the demo seed store spectra only through this.
 */
export async function storeUpload(
  tx: Tx, by: { userId: string; apiKeyId?: string | null }, projectId: string, names: string[],
  files: AsyncIterable<FileOutcome> | Iterable<FileOutcome>, form: Pick<UploadForm, 'defaults' | 'onExisting' | 'skipInvalid'>,
) {
  const [upload] = await tx.insert(spectrumUploads).values({ projectId, createdBy: by.userId, fileCount: 0, spectrumCount: 0, report: [] }).returning()
  const report: FileReport[] = []
  const errors: FieldError[] = []
  const seen = new Map<string, number>()
  const defaults = form.defaults ?? {}
  let bad = 0, stored = 0
  let storing: Promise<number> = Promise.resolve(0)
  const batch: Pending[] = []
  for await (const f of files) {
    let problems: FieldError[] = []
    let placed: Placed[] = []
    // messages quote the file (column names, cells): stored and shown, so printable
    if (f.problems) problems = f.problems.map((p) => ({ path: `/files/${f.index}${p.path}`, message: printable(p.message) }))
    else ({ placed, problems } = await placeSpectra(tx, projectId, f, defaults, seen))
    if (problems.length) {
      bad++
      errors.push(...problems.map((p) => ({ path: p.path, message: `${f.name}: ${p.message}` })))
      report.push({ name: f.name, size: f.size, error: fileError(problems, f.problems?.[0]?.line) })
      continue
    }
    for (const p of placed) seen.set(p.galaxyId, f.index)
    // a refused upload stores nothing: once a file is bad, the rest are only checked
    if (bad && !form.skipInvalid) { report.push({ name: f.name, size: f.size }); continue }
    const entries: NonNullable<FileReport['spectra']> = []
    for (const p of placed) {
      // id and outcome are filled in when its batch is stored
      const entry = { galaxyId: p.galaxyId, pixels: p.s.pixels, source: printable(p.s.source).slice(0, 500), spectrumId: null, stored: 'skipped' as const,
        ...(fluxUnitAssumed(p, defaults) ? { fluxUnitAssumed: true as const } : {}) } as NonNullable<FileReport['spectra']>[number]
      entries.push(entry)
      batch.push({ p, fileName: f.name, entry })
    }
    report.push({ name: f.name, size: f.size, spectra: entries })
    if (batch.length >= STORE_BATCH) {
      // one batch's INSERT runs while the next batch's files are read (the connection runs its queries in order)
      stored += await storing
      storing = storeBatch(tx, projectId, upload.id, batch.splice(0), defaults, form.onExisting)
      storing.catch(() => {})
    }
  }
  stored += await storing
  if (bad && !form.skipInvalid) throw new SpectraFileProblems(errors, bad)
  stored += await storeBatch(tx, projectId, upload.id, batch.splice(0), defaults, form.onExisting)
  const [intake] = await tx.insert(intakes).values({
    projectId, kind: 'spectra', status: 'committing', userId: by.userId, apiKeyId: by.apiKeyId ?? null,
    fileName: (names.length === 1 ? names[0]! : `${names[0]} and ${names.length - 1} more`).slice(0, 255), rowsTotal: stored,
  }).returning()
  const [done] = await tx.update(spectrumUploads).set({ fileCount: report.length, spectrumCount: stored, intakeId: intake.id, report })
    .where(eq(spectrumUploads.id, upload.id)).returning()
  const [job] = await tx.insert(jobs).values({
    projectId, kind: 'fit', status: 'queued', total: stored, createdBy: by.userId, params: { uploadId: upload.id, intakeId: intake.id },
  }).returning()
  await audit(tx, { action: 'spectra-uploaded', actorUserId: by.userId, projectId, target: `upload ${upload.id}`, details: { files: report.length, stored, refused: bad } })
  return { upload: done, job }
}

// ---- the service ----------------------------------------------------------------------------------

export function spectraService(galaxy: GalaxyContext, limits: { fileLimitBytes: number }) {
  const { db } = galaxy
  async function spectrumOf(projectId: string, galaxyId: string) {
    const [row] = await selectSpectra(db, and(eq(spectra.projectId, projectId), eq(spectra.galaxyId, galaxyId))!)
    if (!row) throw notFound('spectrum for this galaxy')
    return row
  }

  function spectrumDto(row: SpectrumRow, a: StoredSpectrumArrays) {
    const error = Array.from(a.noise, (v) => (a.noiseKind === 'ivar' ? (v > 0 ? f32(1 / Math.sqrt(v)) : null) : Number.isNaN(v) ? null : f32(v)))
    return {
      id: row.id, galaxyId: row.galaxyId, redshift: row.redshift, wavelengthMedium: a.wavelengthMedium, fluxUnit: row.fluxUnit,
      resolution: a.resolution, fileName: row.fileName, source: row.source, createdAt: row.createdAt.toISOString(),
      wavelength: Array.from(a.wavelength), flux: Array.from(a.flux, f32), error,
    }
  }

  function fitDto(a: StoredSpectrumArrays, revision: number | null, settings: FitSettings, methodVersion: string, result: unknown) {
    return { revision, settings, methodVersion, result: result as Record<string, unknown>, model: modelOf(a, result) }
  }

  return {
    /**
     * Reads every file of an upload and stores its spectra in one transaction, then starts the
     * `fit` job. A bad file refuses the whole upload (422, nothing stored) unless `skipInvalid`.
     */
    async upload(auth: Auth, projectId: string, files: UploadedFile[], form: UploadForm) {
      try {
        if (!files.length) throw new HttpProblem(422, 'Unprocessable Content', 'no files in the form', [{ path: '/files', message: 'send one or more files in the "files" field' }])
        const out = await db.transaction((tx) => storeUpload(tx, { userId: auth.user.id, apiKeyId: auth.key?.id }, projectId, files.map((f) => f.originalname),
          readUpload(galaxy.compute, files, limits.fileLimitBytes), form))
        await dispatchJob(galaxy, undefined, out.job)
        return { upload: uploadDto(out.upload), job: jobDto(out.job) }
      } finally {
        await removeStaged(files)
      }
    },

    /** The fit-quality table: each spectrum with the fit the project shows (or its newest). */
    async list(projectId: string, q: z.output<typeof SpectraListQuerySchema>) {
      const [p] = await db.select({ shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
      if (!p) throw notFound('project')
      const where = [sql`s.project_id = ${projectId}::uuid`]
      if (q.q) where.push(sql`s.galaxy_id ilike ${'%' + q.q.replace(/[\\%_]/g, (c) => '\\' + c) + '%'}`)
      // a flag as written (not-covered:oii_3726), or its family (not-covered: any line)
      if (q.flag) where.push(sql`exists (select 1 from unnest(f.flags) x where x = ${q.flag} or starts_with(x, ${q.flag + ':'}))`)
      const desc = q.sort.startsWith('-')
      const key = q.sort.replace(/^-/, '')
      const order = key === 'galaxyId' ? sql`s.galaxy_id` : key === 'detections' ? sql`f.detections` : sql`(f.chi2 / nullif(f.dof, 0))`
      const dir = desc ? sql`desc nulls last` : sql`asc nulls last`
      const from = sql`from spectra s left join lateral (select lf.revision, lf.chi2, lf.dof, lf.detections, lf.flags, lf.result->'fit' as fit
          from line_fits lf where lf.spectrum_id = s.id order by (lf.revision = ${p.shown}) desc, lf.revision desc limit 1) f on true
        where ${sql.join(where, sql` and `)}`
      const rows = (await db.execute<{ id: number; galaxy_id: string; pixels: number; wavelength_min: number; wavelength_max: number; revision: number | null; chi2: number | null; dof: number | null; detections: number | null; flags: string[] | null; fit: { components?: number; broadHalpha?: boolean } | null }>(sql`
        select s.id, s.galaxy_id, s.pixels, s.wavelength_min, s.wavelength_max, f.revision, f.chi2, f.dof, f.detections, f.flags, f.fit
        ${from} order by ${order} ${dir}, s.id limit ${q.pageSize} offset ${(q.page - 1) * q.pageSize}`)).rows
      const [{ n }] = (await db.execute<{ n: number }>(sql`select count(*)::int as n ${from}`)).rows
      return {
        items: rows.map((r) => ({
          galaxyId: r.galaxy_id, spectrumId: Number(r.id), pixels: r.pixels, wavelengthMin: r.wavelength_min, wavelengthMax: r.wavelength_max,
          revision: r.revision, chi2: r.chi2, dof: r.dof, chi2dof: r.chi2 !== null && r.dof ? r.chi2 / r.dof : null,
          components: r.fit?.components ?? null, broadHalpha: r.fit?.broadHalpha ?? null, detections: r.detections, flags: r.flags ?? [],
        })),
        total: n, page: q.page, pageSize: q.pageSize,
      }
    },

    /** A galaxy's spectrum with the fit of a revision (default: the one shown, else the newest) and its model. */
    async galaxySpectrum(projectId: string, galaxyId: string, revision?: number) {
      const row = await spectrumOf(projectId, galaxyId)
      const fit = await fitOf(db, projectId, row.id, revision)
      if (revision !== undefined && !fit) throw notFound('fit of this spectrum under that revision')
      const a = arraysOf(row)
      return { spectrum: spectrumDto(row, a), fit: fit ? fitDto(a, fit.revision, fit.settings as FitSettings, fit.methodVersion, fit.result) : null }
    },

    /** Fits the galaxy's spectrum with other fit settings (the current revision's otherwise); nothing is stored. */
    async trialFit(projectId: string, galaxyId: string, fit: z.input<typeof FitOptionsSchema>) {
      const row = await spectrumOf(projectId, galaxyId)
      const { settings } = await revisionSettings(db, projectId)
      const trial: FitSettings = { ...FitOptionsSchema.parse(fit), minSnr: settings.minSnr }
      const a = arraysOf(row)
      const out = await galaxy.compute.fitSpectrum({ spectrum: a, settings: trial }, { interactive: true })
      if (!out.ok) throw new HttpProblem(422, 'Unprocessable Content', `the spectrum cannot be fitted with these settings: ${out.error}`, [{ path: '/fit', message: out.error }])
      return { spectrum: spectrumDto(row, a), fit: fitDto(a, null, trial, FIT_METHOD_VERSION, out.result) }
    },

    spectrumOf,
  }
}

/** The stored fit of a spectrum under a revision, or (none asked) the one the project shows, else the newest. */
export async function fitOf(db: Executor, projectId: string, spectrumId: number, revision?: number): Promise<LineFitRow | undefined> {
  if (revision !== undefined) {
    const [f] = await db.select().from(lineFits).where(and(eq(lineFits.spectrumId, spectrumId), eq(lineFits.revision, revision)))
    return f
  }
  const [p] = await db.select({ shown: projects.resultsRevision }).from(projects).where(eq(projects.id, projectId))
  const [f] = await db.select().from(lineFits).where(eq(lineFits.spectrumId, spectrumId))
    .orderBy(sql`(${lineFits.revision} = ${p?.shown ?? 0}) desc`, desc(lineFits.revision)).limit(1)
  return f
}
