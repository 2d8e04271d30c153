// Reading one uploaded spectrum file on a compute thread (server/compute/worker.mjs loads this
// file): FITS or a text table, then the checks a spectrum must pass before it is stored. Pure: the
// same function runs in-process. The arrays come back in their stored form (typed arrays).
import { FitsError } from '../../shared/formats/fits.ts'
import { spectraFromFile, SpectrumTextError } from '../../shared/formats/spectrum-text.ts'
import { SpectrumJsonError } from '../../shared/formats/spectrum-json.ts'
import type { SpectrumFromFile } from '../../shared/formats/spectrum-fits.ts'
import { FLUX_MAX } from '../../shared/schemas/galaxy.schema.ts'
import { SpectrumSchema } from '../../shared/schemas/spectra.schema.ts'
import { toJsonPointer } from '../http/problem.ts'
import { SPECTRUM_PIXELS_MAX, SPECTRUM_PIXELS_MIN } from '../../shared/schemas/project-spectra.schema.ts'

export interface ReadSpectraTask { kind: 'read-spectra'; bytes: Uint8Array }

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

function check(s: SpectrumFromFile, k: number, problems: ReadProblem[]): ReadSpectrum | undefined {
  const at = `/spectra/${k}`
  const n = s.wavelength.length
  const before = problems.length
  if (n < SPECTRUM_PIXELS_MIN) problems.push({ path: `${at}/wavelength`, message: `${n} pixels; a spectrum needs at least ${SPECTRUM_PIXELS_MIN}` })
  if (s.flux.length !== n) problems.push({ path: `${at}/flux`, message: `${s.flux.length} flux values for ${n} wavelengths` })
  for (let j = 0; j < n && problems.length === before; j++) {
    const w = s.wavelength[j]!
    if (!(Number.isFinite(w) && w > 0)) problems.push({ path: `${at}/wavelength/${j}`, message: `wavelength ${w} is not a positive number` })
    else if (j > 0 && !(w > s.wavelength[j - 1]!)) problems.push({ path: `${at}/wavelength/${j}`, message: `the wavelengths must increase (pixel ${j}: ${w} Å after ${s.wavelength[j - 1]} Å)` })
  }
  for (let j = 0; j < s.flux.length && problems.length === before; j++) {
    if (!(Math.abs(s.flux[j]!) <= FLUX_MAX)) problems.push({ path: `${at}/flux/${j}`, message: `flux ${s.flux[j]} is beyond ±${FLUX_MAX}` })
  }
  const kind = s.ivar ? 'ivar' : s.error ? 'error' : undefined
  if (!kind) problems.push({ path: `${at}/error`, message: 'no error, inverse-variance or variance column: the fit needs the noise of each pixel' })
  const noise = new Float32Array(n)
  let good = 0
  if (kind === 'ivar') {
    for (let j = 0; j < n; j++) {
      const v = s.ivar![j]!
      if (!(v >= 0 && v <= NOISE_MAX)) { problems.push({ path: `${at}/ivar/${j}`, message: `inverse variance ${v} is not a number from 0 to ${NOISE_MAX}` }); break }
      noise[j] = v
      if (v > 0) good++
    }
  } else if (kind === 'error') {
    for (let j = 0; j < n; j++) {
      const e = s.error![j]
      if (e === null || e === undefined) { noise[j] = NaN; continue }
      if (!(e > 0 && e <= NOISE_MAX && 1 / (e * e) <= NOISE_MAX)) { problems.push({ path: `${at}/error/${j}`, message: `error ${e} is not a number above 0 and at most ${NOISE_MAX}` }); break }
      noise[j] = e
      good++
    }
  }
  if (kind && problems.length === before && good < SPECTRUM_PIXELS_MIN) {
    problems.push({ path: `${at}/${kind}`, message: `only ${good} pixels have a usable error; a spectrum needs at least ${SPECTRUM_PIXELS_MIN}` })
  }
  if (problems.length > before) return undefined
  // and the science library's spectrum schema (the bounds of every value)
  const checked = SpectrumSchema.safeParse({
    id: 'spectrum', redshift: 0, wavelength: s.wavelength, flux: s.flux, ...(s.resolution ? { resolution: s.resolution } : {}),
    ...(kind === 'ivar' ? { ivar: Array.from(noise) } : { error: Array.from(noise, (e) => (Number.isNaN(e) ? null : e)) }),
  })
  if (!checked.success) {
    for (const issue of checked.error.issues.slice(0, 5)) problems.push({ path: `${at}${toJsonPointer(issue.path)}`, message: issue.message })
    return undefined
  }
  return {
    ...(s.id !== undefined ? { id: s.id } : {}), ...(s.redshift !== undefined ? { redshift: s.redshift } : {}),
    ...(s.fluxUnit !== undefined ? { fluxUnit: s.fluxUnit } : {}), ...(s.wavelengthMedium ? { wavelengthMedium: s.wavelengthMedium } : {}),
    ...(s.resolution ? { resolution: s.resolution } : {}), source: s.source, pixels: n, wavelength: Float64Array.from(s.wavelength), flux: Float32Array.from(s.flux), noiseKind: kind!, noise,
  }
}

export function readSpectraTask(task: ReadSpectraTask): ReadSpectraOutput {
  let found: SpectrumFromFile[]
  try {
    found = spectraFromFile(task.bytes)
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
