// Reading one uploaded spectrum file on a compute thread (server/compute/worker.mjs loads this
// file): FITS or a text table, then the checks a spectrum must pass before it is stored. Pure: the
// same function runs in-process. The arrays come back in their stored form (typed arrays).
import { crc32, inflateRawSync } from 'node:zlib'
import { FitsError } from '../../shared/formats/fits.ts'
import { spectraFromFile, SpectrumTextError } from '../../shared/formats/spectrum-text.ts'
import { SpectrumJsonError } from '../../shared/formats/spectrum-json.ts'
import type { SpectrumFromFile } from '../../shared/formats/spectrum-fits.ts'
import { ERROR_MIN, FLUX_MAX } from '../../shared/schemas/galaxy.schema.ts'
import { IVAR_MAX, ResolutionSchema, WAVELENGTH_MAX, WAVELENGTH_MIN } from '../../shared/schemas/spectra.schema.ts'
import { toJsonPointer } from '../http/problem.ts'
import { SPECTRUM_PIXELS_MAX, SPECTRUM_PIXELS_MIN } from '../../shared/schemas/project-spectra.schema.ts'

/** A zip entry's data as stored in the archive (method 8, deflate), expanded here and checked against the directory. */
export interface DeflatedEntry { size: number; crc32: number }
export interface ReadSpectraTask { kind: 'read-spectra'; bytes: Uint8Array; deflated?: DeflatedEntry }

/** One spectrum as it will be stored. */
export interface ReadSpectrum {
  id?: string
  redshift?: number
  fluxUnit?: number
  wavelengthMedium?: 'air' | 'vacuum'
  resolution?: SpectrumFromFile['resolution']
  source: string
  pixels: number
  wavelength: Float64Array
  flux: Float32Array
  noiseKind: 'error' | 'ivar'
  /** 1σ (NaN: a bad pixel) or inverse variance (0: a bad pixel) */
  noise: Float32Array
}

/** Why a file cannot be stored: the path is relative to the file (`/spectra/0/wavelength/17`). */
export interface ReadProblem { path: string; message: string; line?: number }

export type ReadSpectraOutput =
  | { ok: true; spectra: ReadSpectrum[] }
  | { ok: false; problems: ReadProblem[]; line?: number }
  /** more pixels than a spectrum may have: the upload answers 413 */
  | { ok: false; tooLarge: { pixels: number; spectrum: number } }

/** Largest error or inverse variance kept (Float32 holds up to 3.4e38; 1/σ² must stay finite too). */
const NOISE_MAX = 1e30

// the bounds as local constants: the per-pixel loops below read them 10⁴ times a spectrum
const W_MIN = WAVELENGTH_MIN, W_MAX = WAVELENGTH_MAX, F_MAX = FLUX_MAX, E_MIN = ERROR_MIN, IV_MAX = IVAR_MAX

function check(s: SpectrumFromFile, k: number, problems: ReadProblem[]): ReadSpectrum | undefined {
  const at = `/spectra/${k}`
  const n = s.wavelength.length
  const before = problems.length
  if (n < SPECTRUM_PIXELS_MIN) problems.push({ path: `${at}/wavelength`, message: `${n} pixels; a spectrum needs at least ${SPECTRUM_PIXELS_MIN}` })
  if (s.flux.length !== n) problems.push({ path: `${at}/flux`, message: `${s.flux.length} flux values for ${n} wavelengths` })
  for (let j = 0; j < n && problems.length === before; j++) {
    const w = s.wavelength[j]!
    if (!(Number.isFinite(w) && w > 0)) problems.push({ path: `${at}/wavelength/${j}`, message: `wavelength ${w} is not a positive number` })
    else if (!(w >= W_MIN && w <= W_MAX)) problems.push({ path: `${at}/wavelength/${j}`, message: `wavelength ${w} Å is not from ${WAVELENGTH_MIN} to ${WAVELENGTH_MAX.toExponential(0)} Å` })
    else if (j > 0 && !(w > s.wavelength[j - 1]!)) problems.push({ path: `${at}/wavelength/${j}`, message: `the wavelengths must increase (pixel ${j}: ${w} Å after ${s.wavelength[j - 1]} Å)` })
  }
  for (let j = 0; j < s.flux.length && problems.length === before; j++) {
    if (!(Math.abs(s.flux[j]!) <= F_MAX)) problems.push({ path: `${at}/flux/${j}`, message: `flux ${s.flux[j]} is beyond ±${FLUX_MAX}` })
  }
  const kind = s.ivar ? 'ivar' : s.error ? 'error' : undefined
  if (!kind) problems.push({ path: `${at}/error`, message: 'no error, inverse-variance or variance column: the fit needs the noise of each pixel' })
  const noise = new Float32Array(n)
  let good = 0
  if (kind === 'ivar') {
    for (let j = 0; j < n; j++) {
      const v = s.ivar![j]!
      if (!(v >= 0 && v <= NOISE_MAX && v <= IV_MAX)) { problems.push({ path: `${at}/ivar/${j}`, message: `inverse variance ${v} is not a number from 0 to ${Math.min(NOISE_MAX, IVAR_MAX)}` }); break }
      noise[j] = v
      if (v > 0) good++
    }
  } else if (kind === 'error') {
    for (let j = 0; j < n; j++) {
      const e = s.error![j]
      if (e === null || e === undefined) { noise[j] = NaN; continue }
      if (!(e > 0 && e >= E_MIN && e <= NOISE_MAX && e <= F_MAX && 1 / (e * e) <= NOISE_MAX)) { problems.push({ path: `${at}/error/${j}`, message: `error ${e} is not a number above 0 and at most ${Math.min(NOISE_MAX, FLUX_MAX)}` }); break }
      noise[j] = e
      good++
    }
  }
  if (kind && problems.length === before && good < SPECTRUM_PIXELS_MIN) {
    problems.push({ path: `${at}/${kind}`, message: `only ${good} pixels have a usable error; a spectrum needs at least ${SPECTRUM_PIXELS_MIN}` })
  }
  if (problems.length > before) return undefined
  // the loops above hold every pixel to the bounds of the science library's spectrum schema (its
  // constants) at a fraction of a schema parse's cost; the resolution goes through the schema itself
  if (s.resolution) {
    const checked = ResolutionSchema.safeParse(s.resolution)
    if (!checked.success) {
      for (const issue of checked.error.issues.slice(0, 5)) problems.push({ path: `${at}/resolution${toJsonPointer(issue.path)}`, message: issue.message })
      return undefined
    }
  }
  return {
    ...(s.id !== undefined ? { id: s.id } : {}), ...(s.redshift !== undefined ? { redshift: s.redshift } : {}),
    ...(s.fluxUnit !== undefined ? { fluxUnit: s.fluxUnit } : {}), ...(s.wavelengthMedium ? { wavelengthMedium: s.wavelengthMedium } : {}),
    ...(s.resolution ? { resolution: s.resolution } : {}), source: s.source, pixels: n, wavelength: Float64Array.from(s.wavelength), flux: Float32Array.from(s.flux), noiseKind: kind!, noise,
  }
}

/** A deflated zip entry expanded, its size and CRC-32 held to the archive's directory (APPNOTE 4.4.7, 4.4.9). */
function expand(bytes: Uint8Array, d: DeflatedEntry): Uint8Array | ReadProblem {
  let out: Buffer
  try {
    out = inflateRawSync(bytes, { maxOutputLength: Math.max(1, d.size) })
  } catch (err) {
    return { path: '', message: `the entry cannot be expanded: ${(err as Error).message}` }
  }
  if (out.length !== d.size) return { path: '', message: `the entry expands to ${out.length} bytes, not the ${d.size} its archive lists` }
  if (crc32(out) !== d.crc32) return { path: '', message: 'the entry is damaged: its CRC-32 does not match its archive\'s' }
  return new Uint8Array(out.buffer, out.byteOffset, out.length)
}

export function readSpectraTask(task: ReadSpectraTask): ReadSpectraOutput {
  let bytes = task.bytes
  if (task.deflated) {
    const x = expand(bytes, task.deflated)
    if (!(x instanceof Uint8Array)) return { ok: false, problems: [x] }
    bytes = x
  }
  let found: SpectrumFromFile[]
  try {
    found = spectraFromFile(bytes)
  } catch (err) {
    if (err instanceof SpectrumTextError) return { ok: false, problems: [{ path: '', message: err.message, ...(err.line !== undefined ? { line: err.line } : {}) }] }
    if (err instanceof FitsError) return { ok: false, problems: [{ path: '', message: err.message }] }
    if (err instanceof SpectrumJsonError) return { ok: false, problems: [{ path: err.path, message: err.message }] }
    if (err instanceof RangeError) return { ok: false, problems: [{ path: '', message: `the file could not be read: ${err.message}` }] }
    throw err
  }
  return checkSpectra(found)
}

/** The checks a file's spectra must pass before they are stored, and their stored form. */
export function checkSpectra(found: SpectrumFromFile[]): ReadSpectraOutput {
  if (!found.length) return { ok: false, problems: [{ path: '', message: 'no spectrum in the file' }] }
  const large = found.findIndex((s) => s.wavelength.length > SPECTRUM_PIXELS_MAX)
  if (large >= 0) return { ok: false, tooLarge: { pixels: found[large]!.wavelength.length, spectrum: large } }
  const problems: ReadProblem[] = []
  const spectra = found.map((s, k) => check(s, k, problems))
  if (problems.length) return { ok: false, problems: problems.slice(0, 50) }
  return { ok: true, spectra: spectra as ReadSpectrum[] }
}
