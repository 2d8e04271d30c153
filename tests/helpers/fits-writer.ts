/**
 * A minimal FITS writer for benchmarks and tests: a 1-D float32 primary image with a linear
 * spectral WCS and a second 1-D image of the noise (FITS Standard 4.0, Pence et al. 2010, A&A 524,
 * A42: 80-character cards in 2,880-byte blocks, big-endian IEEE data; Greisen et al. 2006 for
 * CTYPE1 'AWAV'). Only what an uploaded spectrum needs; the reader's tests use files written by
 * astropy instead (tests/fixtures/formats/fits).
 */

const BLOCK = 2880

type Card = [key: string, value: string | number | boolean, comment?: string]

function card([key, value, comment]: Card): string {
  const v = typeof value === 'boolean' ? (value ? 'T' : 'F').padStart(20)
    : typeof value === 'number' ? (Number.isInteger(value) ? String(value) : value.toExponential(12).toUpperCase()).padStart(20)
      : `'${value.replace(/'/g, "''").padEnd(8)}'`.padEnd(20)
  return `${key.padEnd(8)}= ${v}${comment ? ` / ${comment}` : ''}`.slice(0, 80).padEnd(80)
}

function header(cards: Card[]): Uint8Array {
  const text = cards.map(card).join('') + 'END'.padEnd(80)
  const padded = text.padEnd(Math.ceil(text.length / BLOCK) * BLOCK)
  return new TextEncoder().encode(padded)
}

function data(values: ArrayLike<number>): Uint8Array {
  const bytes = new Uint8Array(Math.ceil((values.length * 4) / BLOCK) * BLOCK)
  const view = new DataView(bytes.buffer)
  for (let i = 0; i < values.length; i++) view.setFloat32(i * 4, values[i]!, false)
  return bytes
}

export interface FitsSpectrum {
  object: string
  redshift: number
  /** first pixel's wavelength and the step, Å (air) */
  start: number
  step: number
  flux: ArrayLike<number>
  /** the second HDU: `ivar` (inverse variance) or `error` (1σ) */
  noise: { kind: 'ivar' | 'error'; values: ArrayLike<number> }
  /** BUNIT, e.g. '1e-17 erg/s/cm2/Angstrom'; omitted when undefined */
  bunit?: string
}

/** One spectrum as a FITS file: the flux in the primary HDU, the noise in an IMAGE extension. */
export function fitsSpectrum(s: FitsSpectrum): Uint8Array {
  const n = s.flux.length
  const primary = header([
    ['SIMPLE', true], ['BITPIX', -32], ['NAXIS', 1], ['NAXIS1', n], ['EXTEND', true],
    ['CTYPE1', 'AWAV'], ['CUNIT1', 'Angstrom'], ['CRPIX1', 1], ['CRVAL1', s.start], ['CDELT1', s.step],
    ...(s.bunit ? [['BUNIT', s.bunit] as Card] : []), ['OBJECT', s.object], ['Z', s.redshift],
  ])
  const ext = header([
    ['XTENSION', 'IMAGE'], ['BITPIX', -32], ['NAXIS', 1], ['NAXIS1', n], ['PCOUNT', 0], ['GCOUNT', 1], ['EXTNAME', s.noise.kind.toUpperCase()],
  ])
  const parts = [primary, data(s.flux), ext, data(s.noise.values)]
  const out = new Uint8Array(parts.reduce((a, p) => a + p.length, 0))
  let at = 0
  for (const p of parts) { out.set(p, at); at += p.length }
  return out
}
