import { LINE_IDS } from '../vocabulary/lines.ts'

/**
 * The columns of the line-measurement exports (`…/exports/lines.csv` and `lines.vot`): one row per
 * galaxy with a line fit, each with its unit (VOUnit) and UCD (IVOA UCD1+). Fluxes are exported in
 * erg s⁻¹ cm⁻² (the fit's flux units times the spectrum's flux unit); velocities are offsets from
 * the redshift, widths are Gaussian σ, equivalent widths rest-frame and emission positive.
 */
export interface LineExportColumn {
  name: string
  description: string
  unit: string | null
  ucd: string
  datatype: 'char' | 'double' | 'int'
  get: (row: LineExportRow) => string | number | boolean | null
}

/** What a row is made from: the galaxy, its spectrum's flux unit and the stored fit result. */
export interface LineExportRow {
  galaxyId: string
  spectrumId: number
  redshift: number
  fluxUnit: number
  // the stored fit result (the science library's shape)
  result: any // eslint-disable-line @typescript-eslint/no-explicit-any
}

const FLUX = 'erg.s**-1.cm**-2'
const KMS = 'km.s**-1'
const LINE_UCD: Record<string, string> = { halpha: 'em.line.Halpha', hbeta: 'em.line.Hbeta', hgamma: 'em.line.Hgamma', hdelta: 'em.line.Hdelta', oiii_5007: 'em.line.OIII', oiii_4959: 'em.line.OIII', oiii_4363: 'em.line.OIII', halpha_broad: 'em.line.Halpha' }
const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null)

const lineColumns = (id: string): LineExportColumn[] => {
  const em = LINE_UCD[id] ?? 'em.line'
  const v = (r: LineExportRow, k: string) => (r.result?.lines?.[id]?.detected ? num(r.result.lines[id][k]) : null)
  const flux = (r: LineExportRow, k: string) => { const x = k === 'upperLimit' ? num(r.result?.lines?.[id]?.upperLimit) : v(r, k); return x === null ? null : x * r.fluxUnit }
  const col = (suffix: string, description: string, unit: string | null, ucd: string, get: LineExportColumn['get']): LineExportColumn =>
    ({ name: `${id}_${suffix}`, description: `${id}: ${description}`, unit, ucd, datatype: 'double', get })
  return [
    col('flux', 'line flux (observed, not corrected for dust)', FLUX, `phot.flux;${em}`, (r) => flux(r, 'flux')),
    col('flux_err', '1σ error of the flux', FLUX, `stat.error;phot.flux;${em}`, (r) => flux(r, 'error')),
    col('upper_limit', 'flux upper limit of a non-detection', FLUX, `phot.flux;stat.max;${em}`, (r) => flux(r, 'upperLimit')),
    col('snr', 'flux over its error', null, `stat.snr;${em}`, (r) => v(r, 'snr')),
    col('ew', 'rest-frame equivalent width, emission positive', 'Angstrom', `spect.line.eqWidth;${em}`, (r) => v(r, 'ew')),
    col('ew_err', '1σ error of the equivalent width', 'Angstrom', `stat.error;spect.line.eqWidth;${em}`, (r) => v(r, 'ewError')),
    col('velocity', 'velocity offset from the redshift', KMS, `spect.dopplerVeloc;${em}`, (r) => v(r, 'velocity')),
    col('velocity_err', '1σ error of the velocity', KMS, `stat.error;spect.dopplerVeloc;${em}`, (r) => v(r, 'velocityError')),
    col('sigma', 'observed Gaussian σ of the line', KMS, `phys.veloc.dispersion;${em}`, (r) => v(r, 'sigma')),
    col('sigma_err', '1σ error of sigma', KMS, `stat.error;phys.veloc.dispersion;${em}`, (r) => v(r, 'sigmaError')),
    col('sigma_intrinsic', 'σ with the instrumental σ removed in quadrature', KMS, `phys.veloc.dispersion;${em};meta.modelled`, (r) => v(r, 'sigmaIntrinsic')),
  ]
}

const nad = (k: string, name: string, description: string, unit: string | null, ucd: string): LineExportColumn =>
  ({ name, description: `Na I D: ${description}`, unit, ucd, datatype: 'double', get: (r) => num(r.result?.absorption?.nad?.[k]) })

export const LINE_EXPORT_COLUMNS: LineExportColumn[] = [
  { name: 'galaxy_id', description: 'the pipeline\'s galaxy ID', unit: null, ucd: 'meta.id;meta.main', datatype: 'char', get: (r) => r.galaxyId },
  { name: 'spectrum_id', description: 'the stored spectrum the lines were measured on', unit: null, ucd: 'meta.id;spect', datatype: 'int', get: (r) => r.spectrumId },
  { name: 'redshift', description: 'redshift the spectrum was fitted at', unit: null, ucd: 'src.redshift', datatype: 'double', get: (r) => r.redshift },
  { name: 'chi2', description: 'χ² of the fit over the fitted pixels', unit: null, ucd: 'stat.fit.chi2', datatype: 'double', get: (r) => num(r.result?.fit?.chi2) },
  { name: 'dof', description: 'degrees of freedom of the fit', unit: null, ucd: 'stat.fit.dof', datatype: 'int', get: (r) => num(r.result?.fit?.dof) },
  { name: 'components', description: 'narrow components per line in the fit', unit: null, ucd: 'meta.number;stat.fit', datatype: 'int', get: (r) => num(r.result?.fit?.components) },
  { name: 'broad_halpha', description: 'whether the fit has a broad Hα component (1) or not (0)', unit: null, ucd: 'meta.code;em.line.Halpha', datatype: 'int', get: (r) => (r.result?.fit ? (r.result.fit.broadHalpha ? 1 : 0) : null) },
  ...LINE_IDS.flatMap(lineColumns),
  nad('ew', 'nad_ew', 'rest-frame equivalent width of D1+D2, absorption positive (includes stellar absorption)', 'Angstrom', 'spect.line.eqWidth;phys.absorption'),
  nad('ewError', 'nad_ew_err', '1σ error of nad_ew', 'Angstrom', 'stat.error;spect.line.eqWidth;phys.absorption'),
  nad('ewUpperLimit', 'nad_ew_upper_limit', 'upper limit on the equivalent width of a non-detection', 'Angstrom', 'spect.line.eqWidth;stat.max;phys.absorption'),
  nad('doubletRatio', 'nad_doublet_ratio', 'EW(D2)/EW(D1)', null, 'arith.ratio;spect.line.eqWidth'),
  nad('doubletRatioError', 'nad_doublet_ratio_err', '1σ error of nad_doublet_ratio', null, 'stat.error;arith.ratio;spect.line.eqWidth'),
  nad('logN', 'nad_log_n', 'log10 column density of Na I from the doublet ratio', 'dex(cm**-2)', 'phys.columnDensity'),
  nad('logNError', 'nad_log_n_err', '1σ error of nad_log_n', 'dex(cm**-2)', 'stat.error;phys.columnDensity'),
  nad('b', 'nad_b', 'Doppler parameter b of the curve of growth', KMS, 'phys.veloc.dispersion;phys.absorption'),
  nad('bError', 'nad_b_err', '1σ error of nad_b', KMS, 'stat.error;phys.veloc.dispersion;phys.absorption'),
  nad('velocity', 'nad_velocity', 'velocity offset of the absorption from the redshift', KMS, 'spect.dopplerVeloc;phys.absorption'),
  { name: 'flags', description: 'flags of the fit, separated by spaces', unit: null, ucd: 'meta.code.qual', datatype: 'char', get: (r) => (Array.isArray(r.result?.flags) ? r.result.flags.join(' ') : '') },
]
