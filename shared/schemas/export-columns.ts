import { LINE_IDS as LINE_ID_LIST } from '../vocabulary/lines.ts'

/** One column of the CSV and VOTable exports, with its unit (VOUnit) and UCD (IVOA UCD1+). */
export interface ExportColumn {
  name: string
  description: string
  unit: string | null
  ucd: string
  datatype: 'char' | 'double' | 'int'
  group: 'identity' | 'classes' | 'dust' | 'fluxes' | 'ratios' | 'density' | 'temperature' | 'metallicity' | 'sfr' | 'black-hole' | 'flags'
  get: (g: ExportGalaxy, r: any) => string | number | null // eslint-disable-line @typescript-eslint/no-explicit-any
}
export interface ExportGalaxy { key: string; redshift: number | null; ra: number | null; dec: number | null; fluxUnit: number }

const FLUX_UNIT = 'erg.s**-1.cm**-2'
const LINE_UCD: Record<string, string> = { halpha: 'em.line.Halpha', hbeta: 'em.line.Hbeta', hgamma: 'em.line.Hgamma', hdelta: 'em.line.Hdelta', oiii_5007: 'em.line.OIII', oiii_4959: 'em.line.OIII', oiii_4363: 'em.line.OIII', halpha_broad: 'em.line.Halpha' }
const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null)

const lineColumns: ExportColumn[] = LINE_ID_LIST.flatMap((id) => {
  const ucd = LINE_UCD[id] ?? 'em.line'
  const d = (g: ExportGalaxy, r: any, k: 'flux' | 'error' | 'upperLimit') => { const v = num(r?.dereddened?.[id]?.[k]); return v === null ? null : v * g.fluxUnit } // eslint-disable-line @typescript-eslint/no-explicit-any
  return [
    { name: `${id}_flux_corr`, description: `${id} flux corrected for dust (observed if no E(B−V))`, unit: FLUX_UNIT, ucd: `phot.flux;${ucd}`, datatype: 'double', group: 'fluxes', get: (g, r) => d(g, r, 'flux') },
    { name: `${id}_flux_corr_err`, description: `1σ error of ${id}_flux_corr`, unit: FLUX_UNIT, ucd: `stat.error;phot.flux;${ucd}`, datatype: 'double', group: 'fluxes', get: (g, r) => d(g, r, 'error') },
    { name: `${id}_upper_limit`, description: `upper limit on the corrected ${id} flux (non-detection)`, unit: FLUX_UNIT, ucd: `phot.flux;stat.max;${ucd}`, datatype: 'double', group: 'fluxes', get: (g, r) => d(g, r, 'upperLimit') },
  ] satisfies ExportColumn[]
})

const ratio = (key: string, description: string): ExportColumn[] => [
  { name: key, description, unit: key.endsWith('Doublet') ? null : 'dex', ucd: 'phot.flux;arith.ratio', datatype: 'double', group: 'ratios', get: (_g, r) => num(r?.ratios?.[key]) },
  { name: `${key}_err`, description: `1σ error of ${key}`, unit: key.endsWith('Doublet') ? null : 'dex', ucd: 'stat.error;phot.flux;arith.ratio', datatype: 'double', group: 'ratios', get: (_g, r) => num(r?.ratioErrors?.[key]) },
  { name: `${key}_limit`, description: `"upper" or "lower" when ${key} is a limit`, unit: null, ucd: 'meta.code;stat.max', datatype: 'char', group: 'ratios', get: (_g, r) => r?.ratioLimits?.[key] ?? null },
]

const metal = (key: string, description: string): ExportColumn[] => [
  { name: `oh_${key}`, description: `12 + log(O/H), ${description}`, unit: 'dex', ucd: 'phys.abund.Z', datatype: 'double', group: 'metallicity', get: (_g, r) => num(r?.metallicity?.[key]) },
  { name: `oh_${key}_err`, description: `1σ error (flux errors only; the calibration's own scatter is not included)`, unit: 'dex', ucd: 'stat.error;phys.abund.Z', datatype: 'double', group: 'metallicity', get: (_g, r) => num(r?.metallicity?.[`${key}Error`]) },
]

export const EXPORT_COLUMNS: ExportColumn[] = [
  { name: 'galaxy_id', description: 'the pipeline\'s galaxy ID', unit: null, ucd: 'meta.id;meta.main', datatype: 'char', group: 'identity', get: (g) => g.key },
  { name: 'redshift', description: 'redshift', unit: null, ucd: 'src.redshift', datatype: 'double', group: 'identity', get: (g) => g.redshift },
  { name: 'ra', description: 'right ascension (ICRS)', unit: 'deg', ucd: 'pos.eq.ra;meta.main', datatype: 'double', group: 'identity', get: (g) => g.ra },
  { name: 'dec', description: 'declination (ICRS)', unit: 'deg', ucd: 'pos.eq.dec;meta.main', datatype: 'double', group: 'identity', get: (g) => g.dec },
  ...(['overall', 'nii', 'sii', 'oi', 'whan'] as const).map((d): ExportColumn => ({
    name: `class_${d}`, description: d === 'overall' ? 'combined class (Kewley et al. 2006 scheme)' : d === 'whan' ? 'WHAN class (Cid Fernandes et al. 2011)' : `class on the [${d.toUpperCase()}] diagram`,
    unit: null, ucd: 'src.class', datatype: 'char', group: 'classes', get: (_g, r) => r?.classes?.[d] ?? null,
  })),
  { name: 'balmer_decrement', description: 'observed Hα/Hβ (or Hγ/Hβ when flagged)', unit: null, ucd: 'phot.flux;arith.ratio;em.line.Halpha', datatype: 'double', group: 'dust', get: (_g, r) => num(r?.extinction?.balmerDecrement) },
  { name: 'ebv', description: 'colour excess E(B−V) of the gas, foreground screen', unit: 'mag', ucd: 'phot.color.excess', datatype: 'double', group: 'dust', get: (_g, r) => num(r?.extinction?.ebv) },
  { name: 'ebv_err', description: '1σ error of ebv (of the unclipped estimate)', unit: 'mag', ucd: 'stat.error;phot.color.excess', datatype: 'double', group: 'dust', get: (_g, r) => num(r?.extinction?.ebvError) },
  { name: 'av', description: 'V-band extinction A_V = R_V·E(B−V)', unit: 'mag', ucd: 'phys.absorption;em.opt.V', datatype: 'double', group: 'dust', get: (_g, r) => num(r?.extinction?.av) },
  ...lineColumns,
  ...ratio('niiHa', 'log [N II]6584/Hα (observed)'), ...ratio('oiiiHb', 'log [O III]5007/Hβ (observed)'),
  ...ratio('siiHa', 'log ([S II]6717+6731)/Hα (observed)'), ...ratio('oiHa', 'log [O I]6300/Hα (observed)'),
  ...ratio('siiDoublet', '[S II] 6717/6731 (linear)'), ...ratio('oiiDoublet', '[O II] 3729/3726 (linear)'),
  { name: 'ne_sii', description: 'electron density from [S II] (Sanders et al. 2016 fit)', unit: 'cm**-3', ucd: 'phys.density;phys.electron', datatype: 'double', group: 'density', get: (_g, r) => num(r?.density?.sii?.ne) },
  { name: 'ne_sii_err', description: '1σ error of ne_sii', unit: 'cm**-3', ucd: 'stat.error;phys.density;phys.electron', datatype: 'double', group: 'density', get: (_g, r) => num(r?.density?.sii?.neError) },
  { name: 'ne_oii', description: 'electron density from [O II]', unit: 'cm**-3', ucd: 'phys.density;phys.electron', datatype: 'double', group: 'density', get: (_g, r) => num(r?.density?.oii?.ne) },
  { name: 'ne_oii_err', description: '1σ error of ne_oii', unit: 'cm**-3', ucd: 'stat.error;phys.density;phys.electron', datatype: 'double', group: 'density', get: (_g, r) => num(r?.density?.oii?.neError) },
  { name: 'te_oiii', description: 'electron temperature from [O III] (4959+5007)/4363', unit: 'K', ucd: 'phys.temperature;phys.electron', datatype: 'double', group: 'temperature', get: (_g, r) => num(r?.temperature?.oiii?.te) },
  { name: 'te_oiii_err', description: '1σ error of te_oiii', unit: 'K', ucd: 'stat.error;phys.temperature;phys.electron', datatype: 'double', group: 'temperature', get: (_g, r) => num(r?.temperature?.oiii?.teError) },
  { name: 'te_nii', description: 'electron temperature from [N II] (6548+6584)/5755', unit: 'K', ucd: 'phys.temperature;phys.electron', datatype: 'double', group: 'temperature', get: (_g, r) => num(r?.temperature?.nii?.te) },
  ...metal('n2Pp04', 'N2, Pettini & Pagel 2004'), ...metal('o3n2Pp04', 'O3N2, Pettini & Pagel 2004'), ...metal('n2M13', 'N2, Marino et al. 2013'),
  ...metal('o3n2M13', 'O3N2, Marino et al. 2013'), ...metal('n2s2haD16', 'N2S2Hα, Dopita et al. 2016'),
  { name: 'lum_dist', description: 'luminosity distance, flat ΛCDM', unit: 'Mpc', ucd: 'pos.distance;pos.lumDist', datatype: 'double', group: 'sfr', get: (_g, r) => num(r?.sfr?.luminosityDistanceMpc) },
  { name: 'lum_halpha', description: 'dust-corrected Hα luminosity', unit: 'erg.s**-1', ucd: 'phys.luminosity;em.line.Halpha', datatype: 'double', group: 'sfr', get: (_g, r) => num(r?.sfr?.luminosityHalpha) },
  { name: 'sfr_halpha', description: 'Hα star-formation rate (calibration of the revision)', unit: 'solMass.yr**-1', ucd: 'phys.SFR', datatype: 'double', group: 'sfr', get: (_g, r) => num(r?.sfr?.sfrHalpha) },
  { name: 'sfr_halpha_err', description: '1σ error of sfr_halpha', unit: 'solMass.yr**-1', ucd: 'stat.error;phys.SFR', datatype: 'double', group: 'sfr', get: (_g, r) => num(r?.sfr?.sfrHalphaError) },
  { name: 'log_mbh', description: 'log black-hole mass from broad Hα (Greene & Ho 2005)', unit: 'dex(solMass)', ucd: 'phys.mass;meta.modelled', datatype: 'double', group: 'black-hole', get: (_g, r) => num(r?.blackHoleMass?.log10Mass) },
  { name: 'flags', description: 'flags, separated by spaces', unit: null, ucd: 'meta.code.qual', datatype: 'char', group: 'flags', get: (_g, r) => (Array.isArray(r?.flags) ? r.flags.join(' ') : '') },
]
