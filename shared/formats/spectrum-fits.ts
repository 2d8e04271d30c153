/**
 * 1-D spectra out of FITS files, in the two layouts spectra come in:
 *  - a 1-D image (the primary HDU or the first 1-D image extension) whose wavelengths follow from the
 *    header's spectral WCS, with the error, inverse variance or variance in a 1-D image extension
 *    named by EXTNAME;
 *  - a binary table with wavelength (or log10 wavelength), flux and error/ivar/variance columns,
 *    either one row per pixel or one row per spectrum holding vectors.
 * Wavelength axes follow Greisen et al. 2006, A&A 446, 747 (WCS Paper III): CTYPE1 'WAVE' is vacuum,
 * 'AWAV' air, the '-LOG' algorithm is λ = λ_r·exp(w/λ_r) with w = CDELT1·(p − CRPIX1); DC-FLAG = 1
 * (a convention older than Paper III, common practice) means CRVAL1/CDELT1 are in log10 Å.
 * See shared/science/README.md "Spectra files".
 */
import { FitsError, readFits, readImage, readTableColumn, readTextColumn, tableColumns, type FitsColumnInfo, type FitsHdu, type FitsValue } from './fits.ts'

export interface SpectrumFromFile {
  id?: string
  redshift?: number
  /** Flux density unit in erg s⁻¹ cm⁻² Å⁻¹ when the header says it (BUNIT/TUNITn), e.g. 1e-17. */
  fluxUnit?: number
  wavelengthMedium?: 'air' | 'vacuum'
  /** Observed wavelengths in Å, as stored (the caller checks that they increase). */
  wavelength: number[]
  /** Flux density; a bad pixel (NaN, BLANK) reads 0 with its error null or its ivar 0. */
  flux: number[]
  error?: (number | null)[]
  ivar?: number[]
  /** The instrumental line spread, when the file says it (JSON spectra). */
  resolution?: { fwhmAngstrom?: number; fwhmKmPerS?: number; resolvingPower?: number }
  /** Where each array came from, for the upload report. */
  source: string
}

const WAVE_NAMES = ['WAVELENGTH', 'WAVE', 'LAMBDA', 'LAM', 'WAVELEN', 'WL', 'AWAV']
const LOGWAVE_NAMES = ['LOGLAM', 'LOGLAMBDA', 'LOG_WAVE', 'LOGWAVE', 'LOG_LAMBDA', 'LOGWL']
const FLUX_NAMES = ['FLUX', 'FLUX_DENSITY', 'F_LAMBDA', 'FLAM', 'SPEC', 'SPECTRUM', 'F']
const ERROR_NAMES = ['ERROR', 'ERR', 'SIGMA', 'FLUX_ERR', 'FLUXERR', 'FLUX_ERROR', 'ERR_FLUX', 'E_FLUX', 'NOISE', 'UNC', 'UNCERTAINTY', 'STAT_ERR']
const IVAR_NAMES = ['IVAR', 'INVVAR', 'INV_VAR', 'FLUX_IVAR', 'WEIGHT_IVAR']
const VAR_NAMES = ['VAR', 'VARIANCE', 'FLUX_VAR']
const ID_NAMES = ['ID', 'OBJID', 'OBJECT', 'NAME', 'TARGETID', 'SPECID']
const ID_KEYS = ['OBJECT', 'OBJNAME', 'TARGNAME', 'OBJ_ID']
const Z_KEYS = ['Z', 'REDSHIFT', 'Z_SYS', 'ZSYS']

/** Every spectrum in a FITS file; a FitsError says why none could be read. */
export function spectraFromFits(bytes: Uint8Array): SpectrumFromFile[] {
  const hdus = readFits(bytes)
  for (const hdu of hdus) {
    if (hdu.kind !== 'bintable') continue
    const found = spectraFromTable(bytes, hdu, hdus[0]!.header)
    if (found) return found
  }
  const image = hdus.find((h) => h.kind === 'image' && h.header.get('NAXIS') === 1 && Number(h.header.get('NAXIS1')) > 1)
  if (image) return [spectrumFromImage(bytes, image, hdus)]
  const twoD = hdus.find((h) => h.kind === 'image' && Number(h.header.get('NAXIS')) >= 2)
  if (twoD) throw new FitsError('the image is not one-dimensional; give one spectrum per 1-D image, or a table with wavelength and flux columns', twoD.index)
  throw new FitsError('no 1-D spectrum found: neither a 1-D image nor a binary table with wavelength and flux columns')
}

function pick(columns: FitsColumnInfo[], names: string[]): FitsColumnInfo | undefined {
  for (const n of names) {
    const c = columns.find((col) => col.name.toUpperCase() === n)
    if (c) return c
  }
  return undefined
}

function spectraFromTable(bytes: Uint8Array, hdu: FitsHdu, primary: Map<string, FitsValue>): SpectrumFromFile[] | null {
  const columns = tableColumns(hdu)
  const wave = pick(columns, WAVE_NAMES), logWave = wave ? undefined : pick(columns, LOGWAVE_NAMES)
  const flux = pick(columns, FLUX_NAMES)
  if (!(wave || logWave) || !flux) return null
  const waveColumn = (wave ?? logWave)!
  if (waveColumn.repeat !== flux.repeat) throw new FitsError(`columns ${waveColumn.name} and ${flux.name} have ${waveColumn.repeat} and ${flux.repeat} values a row`, hdu.index)
  const error = pick(columns, ERROR_NAMES), ivar = pick(columns, IVAR_NAMES), variance = pick(columns, VAR_NAMES)
  const rows = Number(hdu.header.get('NAXIS2'))
  const waveValues = readTableColumn(bytes, hdu, waveColumn)
  const fluxValues = readTableColumn(bytes, hdu, flux)
  const noise = error ?? ivar ?? variance
  const noiseValues = noise ? readTableColumn(bytes, hdu, noise) : undefined
  const scale = waveScale(wave?.unit, hdu.index)
  const header = mergedHeader(primary, hdu.header)
  const base = {
    fluxUnit: fluxUnitOf(flux.unit ?? stringKey(header, 'BUNIT')), wavelengthMedium: mediumOf(header, waveColumn.name),
    redshift: numberOf(header, Z_KEYS),
  }
  const perPixel = waveColumn.repeat === 1
  const count = perPixel ? 1 : rows
  const length = perPixel ? rows : waveColumn.repeat
  const idColumn = perPixel ? undefined : pick(columns.filter((c) => c.type === 'A' || 'IJK'.includes(c.type)), ID_NAMES)
  const ids = idColumn ? (idColumn.type === 'A' ? readTextColumn(bytes, hdu, idColumn) : Array.from(readTableColumn(bytes, hdu, idColumn), String)) : undefined
  const out: SpectrumFromFile[] = []
  for (let s = 0; s < count; s++) {
    const at = s * length
    const wl: number[] = new Array(length)
    for (let i = 0; i < length; i++) {
      const v = waveValues[at + i]!
      wl[i] = logWave ? 10 ** v : v * scale
    }
    const id = ids?.[s] || stringOf(header, ID_KEYS)
    out.push(withNoise({
      ...base, ...(id ? { id: count > 1 && !ids ? `${id}-${s + 1}` : id } : {}), wavelength: wl,
      source: `HDU ${hdu.index} columns ${[waveColumn, flux, noise].filter(Boolean).map((c) => c!.name).join(', ')}${count > 1 ? ` row ${s + 1}` : ''}`,
    }, fluxValues.subarray(at, at + length), noiseValues?.subarray(at, at + length), noise === error ? 'error' : noise === ivar ? 'ivar' : 'variance'))
  }
  return out
}

function spectrumFromImage(bytes: Uint8Array, hdu: FitsHdu, hdus: FitsHdu[]): SpectrumFromFile {
  const image = readImage(bytes, hdu)
  const n = image.shape[0]!
  const header = mergedHeader(hdus[0]!.header, hdu.header)
  const wavelength = wcsWavelengths(hdu.header, n, hdu.index)
  let noise: { kind: 'error' | 'ivar' | 'variance'; data: Float64Array; hdu: number } | undefined
  for (const other of hdus) {
    if (other === hdu || other.kind !== 'image' || other.header.get('NAXIS') !== 1 || other.header.get('NAXIS1') !== n) continue
    const name = String(other.header.get('EXTNAME') ?? '').trim().toUpperCase()
    const kind = ERROR_NAMES.includes(name) ? 'error' : IVAR_NAMES.includes(name) ? 'ivar' : VAR_NAMES.includes(name) ? 'variance' : undefined
    if (kind) { noise = { kind, data: readImage(bytes, other).data, hdu: other.index }; break }
  }
  const id = stringOf(header, ID_KEYS), redshift = numberOf(header, Z_KEYS)
  return withNoise({
    ...(id ? { id } : {}), ...(redshift !== undefined ? { redshift } : {}),
    fluxUnit: fluxUnitOf(stringKey(header, 'BUNIT')), wavelengthMedium: mediumOf(header, String(hdu.header.get('CTYPE1') ?? '')),
    wavelength, source: `HDU ${hdu.index} image${noise ? `, ${noise.kind} in HDU ${noise.hdu}` : ''}`,
  }, image.data, noise?.data, noise?.kind ?? 'error')
}

/** Wavelengths in Å of the pixels 1…n of a 1-D image from its spectral WCS. */
export function wcsWavelengths(h: Map<string, FitsValue>, n: number, index = 0): number[] {
  const crval = h.get('CRVAL1'), step = h.get('CDELT1') ?? h.get('CD1_1')
  if (typeof crval !== 'number' || typeof step !== 'number') throw new FitsError('the image has no wavelength solution (CRVAL1 and CDELT1 or CD1_1)', index)
  const crpix = typeof h.get('CRPIX1') === 'number' ? (h.get('CRPIX1') as number) : 1
  const ctype = String(h.get('CTYPE1') ?? '').trim().toUpperCase()
  const algorithm = ctype.slice(5)
  if (ctype && !/^(WAVE|AWAV|LINEAR|PIXEL|WAVELENGTH|LAMBDA)/.test(ctype)) throw new FitsError(`CTYPE1 = '${ctype}' is not a wavelength axis`, index)
  if (algorithm && algorithm !== 'LOG' && /^(WAVE|AWAV)-/.test(ctype)) throw new FitsError(`the spectral algorithm ${algorithm} of CTYPE1 is not read (only linear and -LOG)`, index)
  const unit = waveScale(typeof h.get('CUNIT1') === 'string' ? (h.get('CUNIT1') as string) : undefined, index)
  const log10 = h.get('DC-FLAG') === 1
  const out: number[] = new Array(n)
  for (let p = 1; p <= n; p++) {
    const w = step * (p - crpix)
    out[p - 1] = log10 ? 10 ** (crval + w) : algorithm === 'LOG' ? unit * crval * Math.exp(w / crval) : unit * (crval + w)
  }
  return out
}

/** Å per unit of a wavelength unit string (FITS 4.0 Table 26 spellings); no unit means Å. */
function waveScale(unit: string | undefined, index: number): number {
  if (!unit) return 1
  const u = unit.trim().toLowerCase()
  const scale: Record<string, number> = { angstrom: 1, angstroms: 1, a: 1, 'å': 1, aa: 1, nm: 10, um: 1e4, micron: 1e4, m: 1e10, cm: 1e8 }
  if (u in scale) return scale[u]!
  throw new FitsError(`the wavelength unit '${unit}' is not one of Angstrom, nm, um, m`, index)
}

/**
 * The flux-density scale in erg s⁻¹ cm⁻² Å⁻¹ from a unit string such as '1e-17 erg/s/cm2/Angstrom',
 * '10**(-17) erg/(s cm2 Angstrom)' or 'erg/s/cm^2/A'; undefined when the string is absent or not
 * recognised (the caller keeps its own fluxUnit then).
 */
export function fluxUnitOf(unit: string | undefined): number | undefined {
  if (!unit) return undefined
  const m = /^\s*(?:10\s*(?:\*\*|\^)\s*\(?\s*([-+]?\d+)\s*\)?|([0-9.]+(?:[eE][-+]?\d+)?))?\s*\*?\s*(.*)$/.exec(unit)!
  const factor = m[1] !== undefined ? Number(`1e${m[1]}`) : m[2] !== undefined ? Number(m[2]) : 1
  // the dimension part as a set of base words: exponents and separators dropped (erg s-1 cm-2 Å-1 ≡ erg/s/cm^2/A)
  const words = m[3]!.toLowerCase().replace(/\*\*|\^/g, '').split(/[\s/().*·]+/).filter(Boolean).map((t) => t.replace(/[-+]?\d+$/, ''))
  const angstrom = ['a', 'aa', 'angstrom', 'å', 'ang', 'angstroms']
  const dims = words.map((w) => (angstrom.includes(w) ? 'angstrom' : w)).sort().join(' ')
  return dims === 'angstrom cm erg s' && Number.isFinite(factor) && factor > 0 ? factor : undefined
}

function mediumOf(h: Map<string, FitsValue>, axisName: string): 'air' | 'vacuum' | undefined {
  const axis = axisName.trim().toUpperCase()
  if (axis.startsWith('AWAV')) return 'air'
  if (axis.startsWith('WAVE') && h.has('CTYPE1') && String(h.get('CTYPE1')).toUpperCase().startsWith('WAVE')) return 'vacuum'
  const airOrVac = String(h.get('AIRORVAC') ?? h.get('WAVEMED') ?? '').trim().toLowerCase()
  if (airOrVac.startsWith('air')) return 'air'
  if (airOrVac.startsWith('vac')) return 'vacuum'
  if (h.get('VACUUM') === true) return 'vacuum'
  if (h.get('VACUUM') === false) return 'air'
  return undefined
}

function mergedHeader(primary: Map<string, FitsValue>, own: Map<string, FitsValue>): Map<string, FitsValue> {
  return new Map([...primary, ...own])
}

function stringKey(h: Map<string, FitsValue>, key: string): string | undefined {
  const v = h.get(key)
  return typeof v === 'string' && v.trim() ? v.trim() : undefined
}

function stringOf(h: Map<string, FitsValue>, keys: string[]): string | undefined {
  for (const k of keys) {
    const v = h.get(k)
    if (typeof v === 'string' && v.trim()) return v.trim()
    if (typeof v === 'number' && Number.isInteger(v)) return String(v)
  }
  return undefined
}

function numberOf(h: Map<string, FitsValue>, keys: string[]): number | undefined {
  for (const k of keys) {
    const v = h.get(k)
    if (typeof v === 'number' && Number.isFinite(v)) return v
  }
  return undefined
}

/** Attach flux and noise, turning bad pixels (NaN flux or noise, negative variance) into the public API's bad-pixel marks. */
function withNoise(
  s: Omit<SpectrumFromFile, 'flux'>, flux: Float64Array, noise: Float64Array | undefined, kind: 'error' | 'ivar' | 'variance',
): SpectrumFromFile {
  const n = flux.length
  const f: number[] = new Array(n)
  const clean = Object.fromEntries(Object.entries(s).filter(([, v]) => v !== undefined)) as Omit<SpectrumFromFile, 'flux'>
  if (kind === 'ivar' && noise) {
    const ivar: number[] = new Array(n)
    for (let i = 0; i < n; i++) {
      const good = Number.isFinite(flux[i]!) && Number.isFinite(noise[i]!) && noise[i]! > 0
      f[i] = Number.isFinite(flux[i]!) ? flux[i]! : 0
      ivar[i] = good ? noise[i]! : 0
    }
    return { ...clean, flux: f, ivar }
  }
  for (let i = 0; i < n; i++) f[i] = Number.isFinite(flux[i]!) ? flux[i]! : 0
  // without a noise array the file carries no error: the caller refuses it (errors are required)
  if (!noise) return { ...clean, flux: f }
  const error: (number | null)[] = new Array(n)
  for (let i = 0; i < n; i++) {
    const e = kind === 'variance' ? Math.sqrt(noise[i]!) : noise[i]!
    error[i] = Number.isFinite(flux[i]!) && Number.isFinite(e) && e > 0 ? e : null
  }
  return { ...clean, flux: f, error }
}
