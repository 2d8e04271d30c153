import type { ProblemFieldError } from '../../api/http'

/** Which files an upload of spectra takes, checked before sending (the server checks again). */

export const SPECTRUM_EXTENSIONS = ['.fits', '.fit', '.fts', '.csv', '.txt', '.dat', '.tsv', '.ascii', '.zip'] as const

/** 64 MB a file (the server answers 413 above it). */
export const MAX_SPECTRUM_FILE_BYTES = 64 * 1024 * 1024

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
  if (f.size > MAX_SPECTRUM_FILE_BYTES) return 'larger than 64 MB'
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

/**
 * The messages of a refused upload per file: `/files/3` and `/files/3/spectra/0/wavelength/12` both
 * belong to the fourth file; errors without a file index are returned under -1.
 */
export function errorsByFile(errors: readonly ProblemFieldError[]): Map<number, string[]> {
  const out = new Map<number, string[]>()
  for (const e of errors) {
    const m = /^\/files\/(\d+)(\/.*)?$/.exec(e.path)
    const index = m ? Number(m[1]) : -1
    const where = m?.[2] ? `${m[2].slice(1)}: ` : ''
    const list = out.get(index) ?? []
    list.push(`${where}${e.message}`)
    out.set(index, list)
  }
  return out
}

/** "12.3 MB", "840 kB", "512 B" */
export function fmtBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1)} MB`
  if (n >= 1024) return `${Math.round(n / 1024)} kB`
  return `${n} B`
}
