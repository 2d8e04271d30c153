/**
 * 1-D spectra out of JSON files: the spectrum object of `POST /spectra/fit` (id, redshift, fluxUnit,
 * wavelengthMedium, wavelength, flux, error or ivar, resolution), an array of them, or a whole
 * `{ "spectra": [ … ] }` request body. Shapes are checked here; values are checked by the upload's
 * spectrum schema like every other format.
 */
import type { SpectrumFromFile } from './spectrum-fits.ts'

export class SpectrumJsonError extends Error {
  constructor(message: string, readonly path: string) {
    super(message)
    this.name = 'SpectrumJsonError'
  }
}

const numbers = (v: unknown, path: string, nulls: boolean): (number | null)[] => {
  if (!Array.isArray(v)) throw new SpectrumJsonError('must be an array of numbers', path)
  for (let i = 0; i < v.length; i++) {
    const x = v[i]
    if (!(typeof x === 'number' || (nulls && x === null))) throw new SpectrumJsonError(nulls ? 'must be a number or null' : 'must be a number', `${path}/${i}`)
  }
  return v as (number | null)[]
}

function one(v: unknown, path: string): SpectrumFromFile {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) throw new SpectrumJsonError('must be a spectrum object', path)
  const o = v as Record<string, unknown>
  const known = new Set(['id', 'redshift', 'fluxUnit', 'wavelengthMedium', 'wavelength', 'flux', 'error', 'ivar', 'resolution'])
  for (const k of Object.keys(o)) if (!known.has(k)) throw new SpectrumJsonError('is not a member of a spectrum', `${path}/${k.replace(/~/g, '~0').replace(/\//g, '~1')}`)
  if (o.id !== undefined && typeof o.id !== 'string') throw new SpectrumJsonError('must be a string', `${path}/id`)
  for (const k of ['redshift', 'fluxUnit'] as const) if (o[k] !== undefined && typeof o[k] !== 'number') throw new SpectrumJsonError('must be a number', `${path}/${k}`)
  if (o.wavelengthMedium !== undefined && o.wavelengthMedium !== 'air' && o.wavelengthMedium !== 'vacuum') throw new SpectrumJsonError('must be air or vacuum', `${path}/wavelengthMedium`)
  if ((o.error === undefined) === (o.ivar === undefined)) throw new SpectrumJsonError('give exactly one of error and ivar', path)
  let resolution: SpectrumFromFile['resolution']
  if (o.resolution !== undefined) {
    const r = o.resolution as Record<string, unknown> | null
    const keys = r && typeof r === 'object' ? Object.keys(r) : []
    if (keys.length !== 1 || !['fwhmAngstrom', 'fwhmKmPerS', 'resolvingPower'].includes(keys[0]!) || typeof r![keys[0]!] !== 'number') {
      throw new SpectrumJsonError('must be one of { fwhmAngstrom }, { fwhmKmPerS }, { resolvingPower }', `${path}/resolution`)
    }
    resolution = r as SpectrumFromFile['resolution']
  }
  return {
    ...(o.id !== undefined ? { id: o.id as string } : {}), ...(o.redshift !== undefined ? { redshift: o.redshift as number } : {}),
    ...(o.fluxUnit !== undefined ? { fluxUnit: o.fluxUnit as number } : {}),
    ...(o.wavelengthMedium !== undefined ? { wavelengthMedium: o.wavelengthMedium as 'air' | 'vacuum' } : {}),
    ...(resolution ? { resolution } : {}),
    wavelength: numbers(o.wavelength, `${path}/wavelength`, false) as number[],
    flux: numbers(o.flux, `${path}/flux`, false) as number[],
    ...(o.error !== undefined ? { error: numbers(o.error, `${path}/error`, true) } : { ivar: numbers(o.ivar, `${path}/ivar`, false) as number[] }),
    source: `JSON ${path}`,
  }
}

/**
 * Every spectrum in a JSON text.
 * @example spectraFromJson('{"id":"A","wavelength":[1,2],"flux":[3,4],"error":[1,1]}')[0].id // 'A'
 */
export function spectraFromJson(text: string): SpectrumFromFile[] {
  let v: unknown
  try {
    v = JSON.parse(text)
  } catch (e) {
    throw new SpectrumJsonError(`not valid JSON (${(e as Error).message})`, '')
  }
  // paths as the upload reports them for every format: /spectra/<k>/… within the file
  if (Array.isArray(v)) return v.map((s, i) => one(s, `/spectra/${i}`))
  if (v !== null && typeof v === 'object' && 'spectra' in v) {
    const list = (v as { spectra: unknown }).spectra
    if (!Array.isArray(list)) throw new SpectrumJsonError('must be an array of spectra', '/spectra')
    return list.map((s, i) => one(s, `/spectra/${i}`))
  }
  return [one(v, '/spectra/0')]
}

/** A JSON file: its first character that is not white space opens an object or an array. */
export function looksLikeJson(bytes: Uint8Array): boolean {
  for (let i = 0; i < Math.min(bytes.length, 4096); i++) {
    const c = bytes[i]!
    if (c === 0x20 || c === 0x09 || c === 0x0a || c === 0x0d || (i < 3 && (c === 0xef || c === 0xbb || c === 0xbf))) continue
    return c === 0x7b || c === 0x5b
  }
  return false
}
