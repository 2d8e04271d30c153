import type { ProblemFieldError } from '../../api/http'

/** Which files an upload of spectra takes, checked before sending (the server checks again). */

/**
 * The schema's SPECTRUM_FILE_EXTENSIONS and `.zip` (a unit test holds them equal; the schema module
 * stays out of the bundle). The size limit is the server's setting: a file above it answers 413.
 */
export const SPECTRUM_EXTENSIONS = ['.fits', '.fit', '.fts', '.json', '.csv', '.txt', '.dat', '.tsv', '.ascii', '.zip'] as const

/** Most spectra in one upload (the schema's SPECTRA_PER_UPLOAD_MAX, held equal by a test). */
export const MAX_SPECTRA_PER_UPLOAD = 1000

/** The `accept` attribute of the file input. */
export const SPECTRUM_ACCEPT = SPECTRUM_EXTENSIONS.join(',')

export function extensionOf(name: string): string {
  const i = name.lastIndexOf('.')
  return i < 0 ? '' : name.slice(i).toLowerCase()
}

export interface FileCheck { name: string; size: number; reason: string | null }

/** The reason a file cannot be sent, or null. */
export function fileProblem(f: { name: string; size: number }): string | null {
  if (!(SPECTRUM_EXTENSIONS as readonly string[]).includes(extensionOf(f.name))) return `not a spectrum file (${SPECTRUM_EXTENSIONS.join(' ')})`
  if (f.size === 0) return 'the file is empty'
  return null
}

/** Files chosen, dropped or picked again: one per name (the last wins), in the order first seen. */
export function mergeFiles<T extends { name: string }>(current: readonly T[], added: readonly T[]): T[] {
  const byName = new Map<string, T>()
  for (const f of current) byName.set(f.name, f)
  for (const f of added) byName.set(f.name, f)
  return [...byName.values()]
}

export interface RefusedFile {
  /** the file's index in the upload, counting each entry of a zip as a file */
  index: number
  /** as the server names it: `spectra.zip/a.csv` for an entry of a zip; null when no message says */
  name: string | null
  messages: string[]
}

/**
 * The files a refused upload (422) names, from its errors: `/files/3` and `/files/3/spectra/0/id` both
 * belong to file 3, whose messages begin with its name ("a.csv: no wavelength column"). Errors with
 * no file index (a form field) come back under index −1.
 */
export function refusedFiles(errors: readonly ProblemFieldError[]): RefusedFile[] {
  const byIndex = new Map<number, RefusedFile>()
  for (const e of errors) {
    const m = /^\/files\/(\d+)(?:\/|$)/.exec(e.path)
    const index = m ? Number(m[1]) : -1
    const r = byIndex.get(index) ?? { index, name: null, messages: [] }
    const colon = e.message.indexOf(': ')
    const head = colon > 0 ? e.message.slice(0, colon) : ''
    // the server writes "<file name>: <message>"; a name has an extension, a message's opening words do not
    if (index >= 0 && head && /\.[A-Za-z0-9]{1,6}$/.test(head)) {
      r.name ??= head
      r.messages.push(e.message.slice(colon + 2))
    } else {
      r.messages.push(e.message)
    }
    byIndex.set(index, r)
  }
  return [...byIndex.values()].sort((a, b) => a.index - b.index)
}

/** Whether a chosen file is among the refused: itself, or (a zip) one of its entries. */
export function isRefused(chosenName: string, refused: readonly RefusedFile[]): boolean {
  return refused.some((r) => r.name !== null && (r.name === chosenName || r.name.startsWith(`${chosenName}/`)))
}

/** "12.3 MB", "840 kB", "512 B" */
export function fmtBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1)} MB`
  if (n >= 1024) return `${Math.round(n / 1024)} kB`
  return `${n} B`
}
