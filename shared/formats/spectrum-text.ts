/**
 * 1-D spectra out of text tables (CSV, TSV, whitespace-separated ASCII): a wavelength column, a flux
 * column and an error, inverse-variance or variance column, found by name when the table has a header
 * (a first non-numeric line, or a `#` comment line just before the numbers) and by position when it
 * has none (wavelength, flux, error). `;`-separated files may use decimal commas. Units in brackets
 * after a name (`flux [1e-17 erg/s/cm2/A]`, `wave (nm)`) are read.
 */
import { fluxUnitOf, spectraFromFits, type SpectrumFromFile } from './spectrum-fits.ts'
import { looksLikeJson, spectraFromJson } from './spectrum-json.ts'

export class SpectrumTextError extends Error {
  constructor(message: string, readonly line?: number) {
    super(line === undefined ? message : `line ${line}: ${message}`)
    this.name = 'SpectrumTextError'
  }
}

const NAMES = {
  wavelength: ['wavelength', 'wave', 'lambda', 'lam', 'wavelen', 'wl', 'awav', 'λ'],
  logWavelength: ['loglam', 'loglambda', 'log_wave', 'logwave', 'log_lambda', 'logwl'],
  flux: ['flux', 'flux_density', 'f_lambda', 'flam', 'spec', 'spectrum', 'f', 'fλ'],
  error: ['error', 'err', 'sigma', 'flux_err', 'fluxerr', 'flux_error', 'err_flux', 'e_flux', 'noise', 'unc', 'uncertainty', 'eflux', 'dflux'],
  ivar: ['ivar', 'invvar', 'inv_var', 'flux_ivar'],
  variance: ['var', 'variance', 'flux_var'],
} as const

type Role = keyof typeof NAMES

interface Column { role: Role | undefined; name: string; unit: string | undefined }

function splitter(sample: string): { split: (line: string) => string[]; decimalComma: boolean } {
  if (sample.includes('\t')) return { split: (l) => l.split('\t').map((c) => c.trim()), decimalComma: false }
  if (sample.includes(';')) return { split: (l) => l.split(';').map((c) => c.trim()), decimalComma: /\d,\d/.test(sample) }
  if (sample.includes(',')) return { split: (l) => l.split(',').map((c) => c.trim()), decimalComma: false }
  return { split: (l) => l.trim().split(/\s+/), decimalComma: false }
}

function describe(cell: string): Column {
  const m = /^(.*?)\s*[[(]\s*([^\])]*)\s*[\])]\s*$/.exec(cell)
  const name = (m ? m[1]! : cell).trim().replace(/^["']|["']$/g, '')
  const key = name.toLowerCase()
  const role = (Object.keys(NAMES) as Role[]).find((r) => (NAMES[r] as readonly string[]).includes(key))
  return { role, name, unit: m ? m[2]!.trim() : undefined }
}

const NUMBER = /^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eEdD][-+]?\d+)?$/
const MISSING = new Set(['nan', 'null', 'na', '', '-', 'inf', '-inf', '+inf'])

/** The spectrum in a text table; SpectrumTextError names the line of the first problem. */
export function spectrumFromText(text: string): SpectrumFromFile {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/)
  let lastComment: { text: string; line: number } | undefined
  let header: Column[] | undefined
  let firstData = -1
  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i]!.trim()
    if (raw === '') continue
    if (raw.startsWith('#') || raw.startsWith('%') || raw.startsWith('!')) { lastComment = { text: raw.replace(/^[#%!]+\s*/, ''), line: i + 1 }; continue }
    const { split } = splitter(raw)
    const cells = split(raw)
    if (cells.every((c) => NUMBER.test(c.replace(',', '.')) || MISSING.has(c.toLowerCase()))) { firstData = i; break }
    if (header) throw new SpectrumTextError(`expected numbers after the header, found "${raw.slice(0, 60)}"`, i + 1)
    header = cells.map(describe)
  }
  if (firstData < 0) throw new SpectrumTextError('no rows of numbers found')
  const { split, decimalComma } = splitter(lines[firstData]!)
  if (!header && lastComment) {
    const named = splitter(lastComment.text).split(lastComment.text).map(describe)
    if (named.some((c) => c.role === 'wavelength' || c.role === 'logWavelength') && named.some((c) => c.role === 'flux')) header = named
  }
  const width = split(lines[firstData]!.trim()).length
  const columns = header ?? positional(width)
  const index = (role: Role) => columns.findIndex((c) => c.role === role)
  const wave = index('wavelength') >= 0 ? index('wavelength') : index('logWavelength')
  const flux = index('flux')
  if (wave < 0 || flux < 0) {
    throw new SpectrumTextError(`no ${wave < 0 ? 'wavelength' : 'flux'} column: name one ${wave < 0 ? 'wavelength, wave or lambda' : 'flux'} (columns: ${columns.map((c) => c.name).join(', ')})`)
  }
  const noiseRole: Role | undefined = (['error', 'ivar', 'variance'] as const).find((r) => index(r) >= 0)
  const noise = noiseRole ? index(noiseRole) : -1
  const log = columns[wave]!.role === 'logWavelength'
  const waveScale = unitScale(columns[wave]!.unit)
  const wavelength: number[] = [], fluxes: number[] = [], noises: number[] = []
  const toNumber = (cell: string | undefined) => {
    if (cell === undefined) return NaN
    const c = decimalComma ? cell.replace(',', '.') : cell
    return NUMBER.test(c) ? Number(c.replace(/[dD]/, 'e')) : NaN
  }
  for (let i = firstData; i < lines.length; i++) {
    const raw = lines[i]!.trim()
    if (raw === '' || raw.startsWith('#') || raw.startsWith('%') || raw.startsWith('!')) continue
    const cells = split(raw)
    if (cells.length < Math.max(wave, flux, noise) + 1) throw new SpectrumTextError(`${cells.length} values where ${columns.length} columns were announced`, i + 1)
    const w = toNumber(cells[wave])
    if (!Number.isFinite(w)) throw new SpectrumTextError(`the wavelength "${cells[wave]}" is not a number`, i + 1)
    const cellsOk = (cell: string | undefined) => cell !== undefined && (NUMBER.test(decimalComma ? cell.replace(',', '.') : cell) || MISSING.has(cell.toLowerCase()))
    if (!cellsOk(cells[flux]) || (noise >= 0 && !cellsOk(cells[noise]))) throw new SpectrumTextError(`"${raw.slice(0, 60)}" holds a value that is not a number`, i + 1)
    wavelength.push(log ? 10 ** w : w * waveScale)
    fluxes.push(toNumber(cells[flux]))
    if (noise >= 0) noises.push(toNumber(cells[noise]))
  }
  const unit = fluxUnitOf(columns[flux]!.unit)
  const base: Omit<SpectrumFromFile, 'flux'> = {
    wavelength, ...(unit !== undefined ? { fluxUnit: unit } : {}),
    source: `columns ${[columns[wave]!, columns[flux]!, noise >= 0 ? columns[noise]! : undefined].filter(Boolean).map((c) => c!.name).join(', ')}`,
  }
  const flux0 = fluxes.map((f) => (Number.isFinite(f) ? f : 0))
  if (noise < 0) return { ...base, flux: flux0 }
  if (noiseRole === 'ivar') return { ...base, flux: flux0, ivar: noises.map((v, i) => (Number.isFinite(v) && v > 0 && Number.isFinite(fluxes[i]!) ? v : 0)) }
  const error = noises.map((v, i) => {
    const e = noiseRole === 'variance' ? Math.sqrt(v) : v
    return Number.isFinite(e) && e > 0 && Number.isFinite(fluxes[i]!) ? e : null
  })
  return { ...base, flux: flux0, error }
}

function positional(width: number): Column[] {
  if (width < 2) throw new SpectrumTextError('a spectrum needs at least two columns: wavelength and flux')
  const roles: Role[] = ['wavelength', 'flux', 'error']
  return Array.from({ length: width }, (_, i) => ({ role: roles[i], name: ['wavelength', 'flux', 'error'][i] ?? `column ${i + 1}`, unit: undefined }))
}

function unitScale(unit: string | undefined): number {
  if (!unit) return 1
  const u = unit.toLowerCase()
  const scale: Record<string, number> = { a: 1, aa: 1, 'å': 1, angstrom: 1, angstroms: 1, nm: 10, um: 1e4, 'µm': 1e4, micron: 1e4 }
  if (u in scale) return scale[u]!
  throw new SpectrumTextError(`the wavelength unit "${unit}" is not one of Å, nm, µm`)
}

export type SpectrumFileKind = 'fits' | 'json' | 'text'

/** FITS by its first card (FITS 4.0 §3.3.1), JSON by its opening brace or bracket, text otherwise. */
export function spectrumFileKind(bytes: Uint8Array): SpectrumFileKind {
  const head = String.fromCharCode(...bytes.subarray(0, 9))
  return head === 'SIMPLE  =' ? 'fits' : looksLikeJson(bytes) ? 'json' : 'text'
}

/** Every spectrum in one uploaded file (FITS, JSON or a text table). */
export function spectraFromFile(bytes: Uint8Array): SpectrumFromFile[] {
  const kind = spectrumFileKind(bytes)
  if (kind === 'fits') return spectraFromFits(bytes)
  const text = new TextDecoder('utf-8', { fatal: false }).decode(bytes)
  return kind === 'json' ? spectraFromJson(text.replace(/^\uFEFF/, '')) : [spectrumFromText(text)]
}
