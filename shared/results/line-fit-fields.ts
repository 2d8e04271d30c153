import { LINE_IDS, lineLabel, lineUcd, type LineId } from '../vocabulary/lines.ts'
import { exportColumnsOf } from './export-columns.ts'
import type { ResultField } from './registry.ts'

/**
 * The quantities of a galaxy's line fit (the stored fit result of its spectrum, shared/spectra/types.ts
 * SpectrumFitResult), in the registry's form: path, unit (VOUnit), UCD (IVOA UCD1+) and export
 * column. `from: 'result'` reads the fit result; `from: 'galaxy'` the row (galaxy ID, spectrum,
 * redshift, flux unit). They make the columns of `…/exports/lines.csv` and `lines.vot`. Fluxes are in
 * the spectrum's flux units × Å and export in erg s⁻¹ cm⁻²; velocities are offsets from the
 * redshift; σ is the Gaussian width; equivalent widths are rest-frame, emission positive.
 */

const FLUX = 'erg.s**-1.cm**-2'
const KMS = 'km.s**-1'

const field = (key: string, kind: ResultField['kind'], from: 'galaxy' | 'result', path: readonly string[], description: string, unit: string | null, ucd: string,
  datatype: 'char' | 'double' | 'int' = 'double', group: ResultField['group'] = 'measurements'): ResultField =>
  ({ key, kind, from, path, group, description, unit, ucd, export: { name: key, description, datatype } })

const lineFields = (id: LineId): ResultField[] => {
  const em = lineUcd(id)
  const f = (suffix: string, kind: 'flux' | 'number', k: string, description: string, unit: string | null, ucd: string) =>
    field(`${id}_${suffix}`, kind, 'result', ['lines', id, k], `${lineLabel(id)}: ${description}`, unit, ucd)
  return [
    f('flux', 'flux', 'flux', 'line flux (observed, not corrected for dust)', FLUX, `phot.flux;${em}`),
    f('flux_err', 'flux', 'error', '1σ error of the flux', FLUX, `stat.error;phot.flux;${em}`),
    f('upper_limit', 'flux', 'upperLimit', 'flux upper limit of a non-detection', FLUX, `phot.flux;stat.max;${em}`),
    f('snr', 'number', 'snr', 'flux over its error', null, `stat.snr;${em}`),
    f('ew', 'number', 'ew', 'rest-frame equivalent width, emission positive', 'Angstrom', `spect.line.eqWidth;${em}`),
    f('ew_err', 'number', 'ewError', '1σ error of the equivalent width', 'Angstrom', `stat.error;spect.line.eqWidth;${em}`),
    f('velocity', 'number', 'velocity', 'velocity offset from the redshift', KMS, `spect.dopplerVeloc;${em}`),
    f('velocity_err', 'number', 'velocityError', '1σ error of the velocity', KMS, `stat.error;spect.dopplerVeloc;${em}`),
    f('sigma', 'number', 'sigma', 'observed Gaussian σ of the line', KMS, `phys.veloc.dispersion;${em}`),
    f('sigma_err', 'number', 'sigmaError', '1σ error of sigma', KMS, `stat.error;phys.veloc.dispersion;${em}`),
    f('sigma_intrinsic', 'number', 'sigmaIntrinsic', 'σ with the instrumental σ removed in quadrature', KMS, `phys.veloc.dispersion;${em};meta.modelled`),
  ]
}

const nad = (key: string, k: string, description: string, unit: string | null, ucd: string) =>
  field(key, 'number', 'result', ['absorption', 'nad', k], `Na I D: ${description}`, unit, ucd)

export const LINE_FIT_FIELDS: readonly ResultField[] = [
  field('galaxy_id', 'text', 'galaxy', ['key'], 'the pipeline\'s galaxy ID', null, 'meta.id;meta.main', 'char', 'identity'),
  field('spectrum_id', 'number', 'galaxy', ['spectrumId'], 'the stored spectrum the lines were measured on', null, 'meta.id;spect', 'int', 'identity'),
  field('redshift', 'number', 'galaxy', ['redshift'], 'redshift the spectrum was fitted at', null, 'src.redshift', 'double', 'identity'),
  field('chi2', 'number', 'result', ['fit', 'chi2'], 'χ² of the fit over the fitted pixels', null, 'stat.fit.chi2'),
  field('dof', 'number', 'result', ['fit', 'dof'], 'degrees of freedom of the fit', null, 'stat.fit.dof', 'int'),
  field('components', 'number', 'result', ['fit', 'components'], 'narrow components per line in the fit', null, 'meta.number;stat.fit', 'int'),
  field('broad_halpha', 'text', 'result', ['fit', 'broadHalpha'], 'whether the fit has a broad Hα component (true or false)', null, 'meta.code;em.line.Halpha', 'char'),
  ...LINE_IDS.flatMap(lineFields),
  nad('nad_ew', 'ew', 'rest-frame equivalent width of D1+D2, absorption positive (includes stellar absorption)', 'Angstrom', 'spect.line.eqWidth;phys.absorption'),
  nad('nad_ew_err', 'ewError', '1σ error of nad_ew', 'Angstrom', 'stat.error;spect.line.eqWidth;phys.absorption'),
  nad('nad_ew_upper_limit', 'ewUpperLimit', 'upper limit on the equivalent width of a non-detection', 'Angstrom', 'spect.line.eqWidth;stat.max;phys.absorption'),
  nad('nad_doublet_ratio', 'doubletRatio', 'EW(D2)/EW(D1)', null, 'arith.ratio;spect.line.eqWidth'),
  nad('nad_doublet_ratio_err', 'doubletRatioError', '1σ error of nad_doublet_ratio', null, 'stat.error;arith.ratio;spect.line.eqWidth'),
  nad('nad_log_n', 'logN', 'log10 column density of Na I from the doublet ratio (curve of growth)', 'dex(cm**-2)', 'phys.columnDensity'),
  nad('nad_log_n_err', 'logNError', '1σ error of nad_log_n', 'dex(cm**-2)', 'stat.error;phys.columnDensity'),
  nad('nad_b', 'b', 'Doppler parameter b of the curve of growth', KMS, 'phys.veloc.dispersion;phys.absorption'),
  nad('nad_b_err', 'bError', '1σ error of nad_b', KMS, 'stat.error;phys.veloc.dispersion;phys.absorption'),
  nad('nad_velocity', 'velocity', 'velocity offset of the absorption from the redshift', KMS, 'spect.dopplerVeloc;phys.absorption'),
  field('flags', 'flags', 'result', ['flags'], 'flags of the fit, separated by spaces', null, 'meta.code.qual', 'char', 'flags'),
]

/** The columns of the line-measurement exports. */
export const LINE_EXPORT_COLUMNS = exportColumnsOf(LINE_FIT_FIELDS)
