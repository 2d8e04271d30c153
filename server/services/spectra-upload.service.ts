import type { NextFunction, Request, Response } from 'express'
import multer from 'multer'
import { randomUUID } from 'node:crypto'
import { mkdirSync } from 'node:fs'
import { readFile, rm } from 'node:fs/promises'
import { basename, extname, join } from 'node:path'
import { crc32 } from 'node:zlib'
import yauzl from 'yauzl'
import type { z } from 'zod'
import { HttpProblem } from '../http/problem.ts'
import { parseRequest } from '../http/parse-request.ts'
import type { ComputePool } from '../compute/pool.ts'
import type { DeflatedEntry, ReadProblem, ReadSpectraOutput, ReadSpectrum } from '../compute/read-spectra.task.ts'
import { CONTROL_MESSAGE, isCleanText, textLine } from '../../shared/schemas/text.ts'
import { SPECTRA_PER_UPLOAD_MAX, SPECTRUM_FILE_EXTENSIONS, SPECTRUM_PIXELS_MAX } from '../../shared/schemas/project-spectra.schema.ts'

/**
 * Reading a spectra upload: the multipart form (files staged on disk), zip archives opened entry by
 * entry, each file read and checked on a compute thread. Limits answer 413 before any content is
 * read; a file that cannot be read is reported by its index (`/files/<i>`), for the caller to refuse
 * the upload or skip it.
 */

const FileNameSchema = textLine().min(1).max(255)
/** Uncompressed bytes one zip may expand to: the spectra limit times a generous file size. */
const ZIP_TOTAL_MAX = 1024 * 1024 * 1024
const mb = (bytes: number) => `${Math.round(bytes / 1048576)} MB`
const tooLarge = (detail: string, path = '/files') => new HttpProblem(413, 'Content Too Large', detail, [{ path, message: detail }])

export interface UploadedFile { path: string; originalname: string; size: number }

/** One spectrum file of the upload (a zip's entries are files of their own), read or refused. */
export interface FileOutcome {
  index: number
  name: string
  size: number
  spectra?: ReadSpectrum[]
  problems?: ReadProblem[]
}

/**
 * The `before` middleware of the upload route: multipart with `files` (1…n) staged on disk and the
 * text fields checked by `form` here, so a refused form leaves no staged file behind.
 */
export function spectraReceiver(dataDir: string, fileLimitBytes: number, form: z.ZodType) {
  const dir = join(dataDir, 'uploads', 'spectra')
  mkdirSync(dir, { recursive: true })
  const seen = new WeakMap<Request, number>()
  const upload = multer({
    storage: multer.diskStorage({ destination: dir, filename: (_req, _file, cb) => cb(null, randomUUID()) }),
    limits: { fileSize: fileLimitBytes, files: SPECTRA_PER_UPLOAD_MAX, fields: 10, fieldSize: 10_000 },
    fileFilter: (req, file, cb) => {
      // the file's index in the form: multer adds a file to req.files only once it is written
      const i = seen.get(req) ?? 0
      seen.set(req, i + 1)
      try { parseRequest(FileNameSchema, file.originalname, ['files', String(i), 'filename']) } catch (err) { return cb(err as Error) }
      cb(null, true)
    },
  }).array('files', SPECTRA_PER_UPLOAD_MAX)
  return (req: Request, res: Response, next: NextFunction) => {
    if (!req.is('multipart/form-data')) return next(new HttpProblem(415, 'Unsupported Media Type', 'send multipart/form-data with one or more "files"'))
    const encoding = req.headers['content-encoding']
    if (encoding && encoding.toLowerCase() !== 'identity') return next(new HttpProblem(415, 'Unsupported Media Type', `uploads cannot be sent with Content-Encoding ${encoding}; send the form uncompressed`))
    upload(req, res, (err: unknown) => {
      // what multer staged is removed here when the handler will not see it
      const staged = (req.files as UploadedFile[] | undefined) ?? []
      if (!err) {
        try { parseRequest(form, { ...req.body }) } catch (e) { void removeStaged(staged); return next(e) }
        return next()
      }
      void removeStaged(staged)
      const e = err as { code?: string; field?: string }
      if (e instanceof HttpProblem) return next(e)
      if (e.code === 'LIMIT_FILE_SIZE') return next(tooLarge(`a file is larger than ${mb(fileLimitBytes)}, the most one spectrum file may be`))
      if (e.code === 'LIMIT_FILE_COUNT') return next(tooLarge(`more than ${SPECTRA_PER_UPLOAD_MAX} files; one upload takes at most ${SPECTRA_PER_UPLOAD_MAX} spectra`))
      if (e.code === 'LIMIT_UNEXPECTED_FILE') return next(new HttpProblem(422, 'Unprocessable Content', `files go in the "files" field, not "${e.field}"`, [{ path: `/${e.field ?? 'files'}`, message: 'unexpected file field' }]))
      if (e.code?.startsWith('LIMIT_')) return next(new HttpProblem(422, 'Unprocessable Content', `unexpected form data (${e.code})`, [{ path: `/${e.field ?? 'files'}`, message: e.code }]))
      next(new HttpProblem(400, 'Bad Request', 'the multipart body could not be read'))
    })
  }
}

/** Text from a file (an entry's name, column names) as it can be stored and shown: control characters and lone surrogates as '?'. */
export const printable = (s: string) => s.replace(/[\u0000-\u001f\u007f-\u009f]|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/g, '?')

const isZip = (name: string) => extname(name).toLowerCase() === '.zip'
const isSpectrumFile = (name: string) => (SPECTRUM_FILE_EXTENSIONS as readonly string[]).includes(extname(name).toLowerCase())
/** Entries an archiver adds beside the files (macOS resource forks, hidden files): passed over. */
const isArchiveClutter = (path: string) => path.endsWith('/') || path.startsWith('__MACOSX/') || basename(path).startsWith('.')
const wrongKind = (name: string) => ({ path: '', message: `"${name}" is not a spectrum file: send ${SPECTRUM_FILE_EXTENSIONS.join(' ')} files, or a .zip of them` })

/** A file of the upload: its bytes (a zip entry's as stored, deflated ones expanded on the compute thread that reads them) or why it is refused. */
interface RawFile { name: string; size: number; bytes?: Uint8Array; deflated?: DeflatedEntry; problem?: ReadProblem }

/**
 * An entry's data as stored, sliced from the archive in memory after its local header (APPNOTE.TXT
 * 4.3.7: signature, then the name and extra lengths at offsets 26 and 28). Only "stored" (0) and
 * "deflate" (8), unencrypted, are taken.
 */
function entryData(zip: Buffer, entry: yauzl.Entry): { bytes: Uint8Array; deflated?: DeflatedEntry } | ReadProblem {
  if (entry.isEncrypted()) return { path: '', message: 'the entry is encrypted; send the archive without a password' }
  if (entry.compressionMethod !== 0 && entry.compressionMethod !== 8) return { path: '', message: `the entry is compressed with method ${entry.compressionMethod}; use deflate (the usual zip compression) or none` }
  const h = entry.relativeOffsetOfLocalHeader
  if (h + 30 > zip.length || zip.readUInt32LE(h) !== 0x04034b50) return { path: '', message: 'the archive is damaged: the entry\'s local header is missing' }
  const start = h + 30 + zip.readUInt16LE(h + 26) + zip.readUInt16LE(h + 28)
  if (start + entry.compressedSize > zip.length) return { path: '', message: 'the archive is damaged: the entry runs past its end' }
  const bytes = zip.subarray(start, start + entry.compressedSize)
  if (entry.compressionMethod === 0) {
    if (entry.compressedSize !== entry.uncompressedSize) return { path: '', message: 'the archive is damaged: a stored entry\'s sizes differ' }
    if (crc32(bytes) !== entry.crc32) return { path: '', message: 'the entry is damaged: its CRC-32 does not match its archive\'s' }
    return { bytes }
  }
  return { bytes, deflated: { size: entry.uncompressedSize, crc32: entry.crc32 } }
}

/** A zip's spectrum files, their sizes checked from the central directory before any is expanded. */
async function* zipEntries(file: UploadedFile, fileLimitBytes: number): AsyncGenerator<RawFile> {
  let zip: yauzl.ZipFile
  let buffer: Buffer
  try {
    // in memory: yauzl reads the directory, each entry's data is sliced out (entryData) — its streams
    // cost about a millisecond an entry on the event loop
    buffer = await readFile(file.path)
    zip = await yauzl.fromBufferPromise(buffer, { autoClose: false, decodeStrings: true, validateEntrySizes: true, strictFileNames: false })
  } catch (err) {
    yield { name: file.originalname, size: file.size, problem: { path: '', message: `the archive cannot be opened: ${(err as Error).message}` } }
    return
  }
  try {
    const entries: yauzl.Entry[] = []
    let total = 0
    try {
      for await (const entry of zip.eachEntry()) {
        if (isArchiveClutter(entry.fileName)) continue
        entries.push(entry)
        total += entry.uncompressedSize
        if (entry.uncompressedSize > fileLimitBytes) throw tooLarge(`"${file.originalname}/${entry.fileName}" expands to ${mb(entry.uncompressedSize)}, more than the ${mb(fileLimitBytes)} a spectrum file may be`)
        if (total > ZIP_TOTAL_MAX) throw tooLarge(`"${file.originalname}" expands to more than ${mb(ZIP_TOTAL_MAX)}`)
        if (entries.length > SPECTRA_PER_UPLOAD_MAX) throw tooLarge(`"${file.originalname}" holds more than ${SPECTRA_PER_UPLOAD_MAX} files; one upload takes at most ${SPECTRA_PER_UPLOAD_MAX} spectra`)
      }
    } catch (err) {
      if (err instanceof HttpProblem) throw err
      // yauzl refuses absolute paths and `..` (a path escaping the archive) and a broken directory
      yield { name: file.originalname, size: file.size, problem: { path: '', message: `the archive cannot be read: ${(err as Error).message}` } }
      return
    }
    if (!entries.length) yield { name: file.originalname, size: file.size, problem: { path: '', message: 'the archive holds no files' } }
    for (const entry of entries) {
      const name = `${file.originalname}/${printable(entry.fileName)}`
      if (!isCleanText(entry.fileName)) { yield { name, size: entry.uncompressedSize, problem: { path: '', message: `the name of "${name}" in the archive ${CONTROL_MESSAGE}` } }; continue }
      if (!isSpectrumFile(entry.fileName)) { yield { name, size: entry.uncompressedSize, problem: wrongKind(entry.fileName) }; continue }
      const data = entryData(buffer, entry)
      if ('message' in data) { yield { name, size: entry.uncompressedSize, problem: data }; continue }
      yield { name, size: entry.uncompressedSize, bytes: data.bytes, ...(data.deflated ? { deflated: data.deflated } : {}) }
    }
  } finally {
    zip.close()
  }
}

/** Files expanded and read ahead of the one being stored: expansion waits on zlib's threads, reading on ours. */
const READ_AHEAD = 16
const READ_AHEAD_BYTES = 32 * 1024 * 1024

/**
 * Every spectrum file of an upload, in order, each read and checked on a compute thread. More than
 * SPECTRA_PER_UPLOAD_MAX spectra in all, or a spectrum of more than SPECTRUM_PIXELS_MAX pixels,
 * answers 413 at once (`counted` is the spectra read so far).
 */
export async function* readUpload(pool: ComputePool, files: UploadedFile[], fileLimitBytes: number): AsyncGenerator<FileOutcome> {
  let count = 0
  // files are expanded and read on the compute threads ahead of the one being stored (up to READ_AHEAD
  // files and READ_AHEAD_BYTES), and yielded in order
  const queue: Array<{ i: number; raw: RawFile; out?: Promise<ReadSpectraOutput> }> = []
  const source = rawFiles(files, fileLimitBytes)
  let index = 0, drained = false
  const queuedBytes = () => queue.reduce((a, q) => a + q.raw.size, 0)
  try {
    for (;;) {
      while (!drained && (queue.length === 0 || (queue.length < READ_AHEAD && queuedBytes() < READ_AHEAD_BYTES))) {
        const next = await source.next()
        if (next.done) { drained = true; break }
        const raw = next.value
        const out = raw.problem ? undefined : pool.readSpectra(raw.bytes!, raw.deflated)
        // a read that is never awaited (the upload was refused first) must not reject unhandled
        out?.catch(() => {})
        queue.push({ i: index++, raw, out })
      }
      const item = queue.shift()
      if (!item) break
      const { i, raw } = item
      if (raw.problem) { yield { index: i, name: raw.name, size: raw.size, problems: [raw.problem] }; continue }
      const out = await item.out!
      if (out.ok) {
        count += out.spectra.length
        if (count > SPECTRA_PER_UPLOAD_MAX) throw tooLarge(`more than ${SPECTRA_PER_UPLOAD_MAX} spectra; one upload takes at most ${SPECTRA_PER_UPLOAD_MAX}`)
        yield { index: i, name: raw.name, size: raw.size, spectra: out.spectra }
      } else if ('tooLarge' in out) {
        throw tooLarge(`"${raw.name}" holds a spectrum of ${out.tooLarge.pixels.toLocaleString('en-US')} pixels; a spectrum may have at most ${SPECTRUM_PIXELS_MAX.toLocaleString('en-US')}`, `/files/${i}/spectra/${out.tooLarge.spectrum}`)
      } else {
        yield { index: i, name: raw.name, size: raw.size, problems: out.problems }
      }
    }
  } finally {
    await source.return(undefined)
  }
}

/** Every file of the upload as bytes or a problem: plain files, and the entries of zips. */
async function* rawFiles(files: UploadedFile[], fileLimitBytes: number): AsyncGenerator<RawFile> {
  for (const file of files) {
    if (isZip(file.originalname)) yield* zipEntries(file, fileLimitBytes)
    else if (!isSpectrumFile(file.originalname)) yield { name: file.originalname, size: file.size, problem: wrongKind(file.originalname) }
    else yield { name: file.originalname, size: file.size, bytes: new Uint8Array(await readFile(file.path)) }
  }
}

/** The staged files of a request, removed once it is answered. */
export async function removeStaged(files: UploadedFile[]) {
  await Promise.all(files.map((f) => rm(f.path, { force: true })))
}
