/**
 * The result-field registry: every quantity a galaxy row carries, once, with where it is read from,
 * how it is stored, its unit (VOUnit) and UCD (IVOA UCD1+), its label and digits, whether lists can
 * filter and sort by it, and its export column. Everything that lists these quantities is derived
 * from this table:
 *
 * - storage: the `results` columns beside each result (server/db/schema.ts) and the values copied
 *   into them (server/services/result-columns.ts);
 * - lists: the list item (`galaxySummary`, shared/results/list.ts), its sort and range fields
 *   (shared/schemas/query.schema.ts) and their SQL (server/services/galaxy-filters.ts);
 * - exports: the CSV and VOTable columns with units and UCDs (shared/results/export-columns.ts);
 * - the galaxy table's columns (src/components/galaxies/galaxy-columns.ts);
 * - the OpenAPI response schemas of the list, the detail and the overview (shared/results/responses.ts).
 *
 * Adding a quantity: the science computes it into the result document; one entry here names its
 * path and says where it appears. A stored one also needs `npm run db:generate` (the column is made
 * from this entry). tests/unit/shared/result-registry.test.ts and tests/api/result-registry.test.ts
 * find each entry in storage, in both exports, in the list's filters and sort and in OpenAPI.
 */
import { metallicityCalibration, type MetallicityKey } from '../vocabulary/calibrations.ts'
import { DIAGRAM_CLASSES, diagramLabel, diagramShortLabel, type ClassDiagram } from '../vocabulary/classes.ts'
import { ionLabel, LINE_IDS, lineUcd, type LineId } from '../vocabulary/lines.ts'
import { ratioDefinition, ratioLabel, RATIOS, type RatioKey } from '../vocabulary/ratios.ts'
import type { GalaxyInputDto } from '../schemas/galaxy.schema.ts'

/** Groups of fields: the export screen's sections, in export order. */
export const FIELD_GROUPS = {
  identity: 'Identity', classes: 'Classes', dust: 'Dust', fluxes: 'Dereddened fluxes', ratios: 'Line ratios', density: 'Density',
  temperature: 'Temperature', metallicity: 'Metallicity', sfr: 'Luminosity and star formation', 'black-hole': 'Black hole', flags: 'Flags',
  measurements: 'Measurements',
} as const
export type FieldGroup = keyof typeof FIELD_GROUPS

/**
 * Order of the groups in lists (sort and range fields, the galaxy table): the physical quantities
 * first, the diagram coordinates after them. Exports keep the registry's own order.
 */
export const LIST_GROUP_ORDER: readonly FieldGroup[] = [
  'identity', 'classes', 'dust', 'density', 'temperature', 'metallicity', 'sfr', 'black-hole', 'ratios', 'fluxes', 'measurements', 'flags',
]

/**
 * What a value is, which decides how each place shows it:
 * - `text`: a string as it is;
 * - `number`: a finite number or null (exports and lists), `float4()` in a `real` column;
 * - `flux`: a number in the galaxy's flux unit, exported in erg s⁻¹ cm⁻² (times `fluxUnit`);
 * - `class`: a class name of `diagram`, stored as its code (shared/vocabulary/classes.ts);
 * - `limit`: 'upper', 'lower' or null, stored as two bits of the `limits` column;
 * - `flags`: the list of flags, exported as words, listed and stored as their count.
 */
export type ValueKind = 'text' | 'number' | 'flux' | 'class' | 'limit' | 'flags'

/** A copy of the value in a database column, for filters, sorting and the diagram endpoint. */
export interface FieldStorage {
  table: 'galaxies' | 'results'
  column: string
  type: 'text' | 'double precision' | 'real' | 'smallint'
  /** NOT NULL DEFAULT 0 (counts and bit fields) */
  notNull?: true
  /** `limit` fields: the bits of the shared `limits` column for an upper and a lower limit */
  bits?: { upper: number; lower: number }
}

/** The field's column in the CSV and VOTable exports. */
export interface FieldExport {
  /** CSV header and VOTable FIELD name */
  name: string
  description: string
  datatype: 'char' | 'double' | 'int'
}

/** The field's column in the dashboard's galaxy table. */
export interface FieldTable {
  /** the column's key (kept in the browser's saved column choice); default: the field's key */
  key?: string
  label: string
  /** significant digits, or decimals with `fixed` */
  digits?: number
  /** fixed decimals even for tiny values (logarithms) */
  fixed?: boolean
  /** the key of the field holding this one's 1σ error, shown beside it */
  error?: string
  defaultOn?: boolean
}

export interface ResultField {
  /**
   * The API name: the list item's key, the sort and range field, the client's value. A field that
   * is only exported is keyed by its export column name.
   */
  key: string
  kind: ValueKind
  /** the galaxy record (key, redshift, ra, dec), the stored input, or the result document */
  from: 'galaxy' | 'input' | 'result'
  path: readonly string[]
  /** computed from the input instead of read at `path` */
  compute?: (input: GalaxyInputDto) => number | null
  diagram?: ClassDiagram
  group: FieldGroup
  description: string
  unit: string | null
  ucd: string
  stored?: FieldStorage
  export?: FieldExport
  /** why a field has no export column (every field has one or the other) */
  notExported?: string
  /** where the list item (GET …/galaxies) has it */
  list?: readonly string[]
  /** `?sort=key` / `?sort=-key` */
  sort?: true
  /** `?range=key:min:max` */
  range?: true
  /** the query parameter filtering by these classes (a list of class names) */
  classParam?: string
  table?: FieldTable
  /** the overview's histogram of the stored column: equal-width bins over [lo, hi], of log10 with `log` */
  histogram?: { lo: number; hi: number; bins: number; log?: true }
}

const FLUX_UNIT = 'erg.s**-1.cm**-2'
const HALPHA_UCD = lineUcd('halpha')
const results = (column: string, type: 'real' | 'smallint' = 'real'): FieldStorage => ({ table: 'results', column, type })
const dbl = (name: string, description: string): FieldExport => ({ name, description, datatype: 'double' })
const chr = (name: string, description: string): FieldExport => ({ name, description, datatype: 'char' })

const lineFields = (id: LineId): ResultField[] => {
  const ucd = lineUcd(id)
  const f = (k: 'flux' | 'error' | 'upperLimit', name: string, description: string, u: string): ResultField =>
    ({ key: name, kind: 'flux', from: 'result', path: ['dereddened', id, k], group: 'fluxes', description, unit: FLUX_UNIT, ucd: u, export: dbl(name, description) })
  return [
    f('flux', `${id}_flux_corr`, `${id} flux corrected for dust (observed if no E(B−V))`, `phot.flux;${ucd}`),
    f('error', `${id}_flux_corr_err`, `1σ error of ${id}_flux_corr`, `stat.error;phot.flux;${ucd}`),
    f('upperLimit', `${id}_upper_limit`, `upper limit on the corrected ${id} flux (non-detection)`, `phot.flux;stat.max;${ucd}`),
  ]
}

/**
 * A ratio, its error and its limit; the four BPT coordinates are stored, listed and filterable. The
 * logarithmic BPT ratios are of observed fluxes, the density doublets linear (shared/science/README.md §2.1).
 */
interface Coordinate { column: string; bits: { upper: number; lower: number } }
const ratioFields = (key: RatioKey, coordinate?: Coordinate): ResultField[] => {
  const unit = RATIOS.find((r) => r.key === key)!.unit
  const description = `${ratioDefinition(key)} ${unit === 'dex' ? '(observed)' : '(linear)'}`
  return [
    {
      key, kind: 'number', from: 'result', path: ['ratios', key], group: 'ratios', description, unit, ucd: 'phot.flux;arith.ratio', export: dbl(key, description),
      ...(coordinate ? { stored: results(coordinate.column), list: ['ratios', key], sort: true, range: true, table: { label: ratioLabel(key), digits: 3, fixed: true } } as const : {}),
    },
    {
      key: `${key}Error`, kind: 'number', from: 'result', path: ['ratioErrors', key], group: 'ratios', description: `1σ error of ${key}`, unit,
      ucd: 'stat.error;phot.flux;arith.ratio', export: dbl(`${key}_err`, `1σ error of ${key}`), ...(coordinate ? { stored: results(`${coordinate.column}_err`) } : {}),
    },
    {
      key: `${key}Limit`, kind: 'limit', from: 'result', path: ['ratioLimits', key], group: 'ratios', description: `"upper" or "lower" when ${key} is a limit`, unit: null,
      ucd: 'meta.code;stat.max', export: chr(`${key}_limit`, `"upper" or "lower" when ${key} is a limit`),
      ...(coordinate ? { stored: { table: 'results', column: 'limits', type: 'smallint', notNull: true, bits: coordinate.bits } } as const : {}),
    },
  ]
}

/** 12 + log(O/H) of one calibration and its error; the two Pettini & Pagel (2004) ones are stored and listed. */
const metallicityFields = (key: MetallicityKey, listed?: { column: string; defaultOn?: boolean }): ResultField[] => {
  const { index, source } = metallicityCalibration(key)
  const description = `12 + log(O/H), ${index}, ${source}`
  return [{
    key, kind: 'number', from: 'result', path: ['metallicity', key], group: 'metallicity', description, unit: 'dex', ucd: 'phys.abund.Z',
    export: dbl(`oh_${key}`, description),
    ...(listed ? { stored: results(listed.column), list: [key], sort: true, range: true, table: { label: `12+log O/H (${index})`, digits: 2, ...(listed.defaultOn ? { defaultOn: true } : {}) } } as const : {}),
  },
  {
    key: `${key}Error`, kind: 'number', from: 'result', path: ['metallicity', `${key}Error`], group: 'metallicity', unit: 'dex', ucd: 'stat.error;phys.abund.Z',
    description: '1σ error (flux errors only; the calibration\'s own scatter is not included)',
    export: dbl(`oh_${key}_err`, '1σ error (flux errors only; the calibration\'s own scatter is not included)'),
  }]
}

/** The overall class and WHAN name their scheme's paper; the BPT classes their diagram. */
const classDescription = (d: ClassDiagram): string => d === 'overall' ? 'combined class (Kewley et al. 2006 scheme)'
  : d === 'whan' ? 'WHAN class (Cid Fernandes et al. 2011)' : `class on the ${diagramLabel(d)}`
const CLASS_PARAMS = { overall: 'class', nii: 'classNii', sii: 'classSii', oi: 'classOi', whan: 'classWhan' } as const satisfies Record<ClassDiagram, string>
/** The query parameters of the class filters. */
export type ClassParam = (typeof CLASS_PARAMS)[ClassDiagram]

const classField = (d: ClassDiagram): ResultField => {
  const key = `class${d[0].toUpperCase()}${d.slice(1)}`
  return {
    key, kind: 'class', diagram: d, from: 'result', path: ['classes', d], group: 'classes', description: classDescription(d), unit: null, ucd: 'src.class',
    stored: results(`class_${d}`, 'smallint'), export: chr(`class_${d}`, classDescription(d)), list: ['classes', d], classParam: CLASS_PARAMS[d],
    table: { key: d, label: diagramShortLabel(d), ...(d === 'overall' || d === 'whan' ? { defaultOn: true } : {}) },
    ...(d === 'overall' ? { sort: true } : {}),
  }
}

/** S/N of a detected Balmer line; 0 for a limit, null when not measured. */
function balmerSnr(g: GalaxyInputDto, id: 'halpha' | 'hbeta'): number | null {
  const v = g.lines[id]
  if (!v) return null
  if (v.upperLimit !== undefined) return 0
  return v.flux! / v.error!
}
/** The lower S/N of Hα and Hβ (what `minSnr` filters by); null unless both were given. */
export function minBalmerSnr(g: GalaxyInputDto): number | null {
  const a = balmerSnr(g, 'halpha'), b = balmerSnr(g, 'hbeta')
  return a === null || b === null ? null : Math.min(a, b)
}

export const RESULT_FIELDS: readonly ResultField[] = [
  {
    key: 'id', kind: 'text', from: 'galaxy', path: ['key'], group: 'identity', description: 'the pipeline\'s galaxy ID', unit: null, ucd: 'meta.id;meta.main',
    stored: { table: 'galaxies', column: 'key', type: 'text' }, export: chr('galaxy_id', 'the pipeline\'s galaxy ID'), list: ['id'], sort: true,
    table: { label: 'Galaxy', defaultOn: true },
  },
  {
    key: 'redshift', kind: 'number', from: 'galaxy', path: ['redshift'], group: 'identity', description: 'redshift', unit: null, ucd: 'src.redshift',
    stored: { table: 'galaxies', column: 'redshift', type: 'double precision' }, export: dbl('redshift', 'redshift'), list: ['redshift'], sort: true, range: true,
    table: { label: 'z', digits: 4, fixed: true, defaultOn: true },
  },
  {
    key: 'ra', kind: 'number', from: 'galaxy', path: ['ra'], group: 'identity', description: 'right ascension (ICRS)', unit: 'deg', ucd: 'pos.eq.ra;meta.main',
    stored: { table: 'galaxies', column: 'ra', type: 'double precision' }, export: dbl('ra', 'right ascension (ICRS)'),
  },
  {
    key: 'dec', kind: 'number', from: 'galaxy', path: ['dec'], group: 'identity', description: 'declination (ICRS)', unit: 'deg', ucd: 'pos.eq.dec;meta.main',
    stored: { table: 'galaxies', column: 'dec', type: 'double precision' }, export: dbl('dec', 'declination (ICRS)'),
  },
  ...(Object.keys(DIAGRAM_CLASSES) as ClassDiagram[]).map(classField),
  {
    key: 'balmerDecrement', kind: 'number', from: 'result', path: ['extinction', 'balmerDecrement'], group: 'dust', description: 'observed Hα/Hβ (or Hγ/Hβ when flagged)',
    unit: null, ucd: `phot.flux;arith.ratio;${HALPHA_UCD}`, export: dbl('balmer_decrement', 'observed Hα/Hβ (or Hγ/Hβ when flagged)'),
  },
  {
    key: 'ebv', kind: 'number', from: 'result', path: ['extinction', 'ebv'], group: 'dust', description: 'colour excess E(B−V) of the gas, foreground screen',
    unit: 'mag', ucd: 'phot.color.excess', stored: results('ebv'), export: dbl('ebv', 'colour excess E(B−V) of the gas, foreground screen'),
    list: ['ebv'], sort: true, range: true, table: { label: 'E(B−V)', digits: 3, error: 'ebvError', defaultOn: true }, histogram: { lo: 0, hi: 1.5, bins: 30 },
  },
  {
    key: 'ebvError', kind: 'number', from: 'result', path: ['extinction', 'ebvError'], group: 'dust', description: '1σ error of ebv (of the unclipped estimate)',
    unit: 'mag', ucd: 'stat.error;phot.color.excess', stored: results('ebv_error'), export: dbl('ebv_err', '1σ error of ebv (of the unclipped estimate)'), list: ['ebvError'],
  },
  {
    key: 'av', kind: 'number', from: 'result', path: ['extinction', 'av'], group: 'dust', description: 'V-band extinction A_V = R_V·E(B−V)',
    unit: 'mag', ucd: 'phys.absorption;em.opt.V', stored: results('av'), export: dbl('av', 'V-band extinction A_V = R_V·E(B−V)'),
    list: ['av'], sort: true, range: true, table: { label: 'A_V', digits: 2 },
  },
  ...LINE_IDS.flatMap(lineFields),
  ...ratioFields('niiHa', { column: 'x_nii', bits: { upper: 1, lower: 2 } }),
  ...ratioFields('oiiiHb', { column: 'y_oiii', bits: { upper: 64, lower: 128 } }),
  ...ratioFields('siiHa', { column: 'x_sii', bits: { upper: 4, lower: 8 } }),
  ...ratioFields('oiHa', { column: 'x_oi', bits: { upper: 16, lower: 32 } }),
  ...ratioFields('siiDoublet'),
  ...ratioFields('oiiDoublet'),
  {
    key: 'neSii', kind: 'number', from: 'result', path: ['density', 'sii', 'ne'], group: 'density', description: `electron density from ${ionLabel('sii')} (Sanders et al. 2016 fit)`,
    unit: 'cm**-3', ucd: 'phys.density;phys.electron', stored: results('ne_sii'), export: dbl('ne_sii', `electron density from ${ionLabel('sii')} (Sanders et al. 2016 fit)`),
    list: ['neSii'], sort: true, range: true, table: { label: `n_e ${ionLabel('sii')} (cm⁻³)`, digits: 0, defaultOn: true }, histogram: { lo: 0, hi: 4, bins: 32, log: true },
  },
  {
    key: 'neSiiError', kind: 'number', from: 'result', path: ['density', 'sii', 'neError'], group: 'density', description: '1σ error of ne_sii',
    unit: 'cm**-3', ucd: 'stat.error;phys.density;phys.electron', export: dbl('ne_sii_err', '1σ error of ne_sii'),
  },
  {
    key: 'neOii', kind: 'number', from: 'result', path: ['density', 'oii', 'ne'], group: 'density', description: `electron density from ${ionLabel('oii')}`,
    unit: 'cm**-3', ucd: 'phys.density;phys.electron', stored: results('ne_oii'), export: dbl('ne_oii', `electron density from ${ionLabel('oii')}`), range: true,
  },
  {
    key: 'neOiiError', kind: 'number', from: 'result', path: ['density', 'oii', 'neError'], group: 'density', description: '1σ error of ne_oii',
    unit: 'cm**-3', ucd: 'stat.error;phys.density;phys.electron', export: dbl('ne_oii_err', '1σ error of ne_oii'),
  },
  {
    key: 'teOiii', kind: 'number', from: 'result', path: ['temperature', 'oiii', 'te'], group: 'temperature', description: `electron temperature from ${ionLabel('oiii')} (4959+5007)/4363`,
    unit: 'K', ucd: 'phys.temperature;phys.electron', stored: results('te_oiii'), export: dbl('te_oiii', `electron temperature from ${ionLabel('oiii')} (4959+5007)/4363`),
    list: ['teOiii'], sort: true, range: true, table: { label: `T_e ${ionLabel('oiii')} (K)`, digits: 0 },
  },
  {
    key: 'teOiiiError', kind: 'number', from: 'result', path: ['temperature', 'oiii', 'teError'], group: 'temperature', description: '1σ error of te_oiii',
    unit: 'K', ucd: 'stat.error;phys.temperature;phys.electron', export: dbl('te_oiii_err', '1σ error of te_oiii'),
  },
  {
    key: 'teNii', kind: 'number', from: 'result', path: ['temperature', 'nii', 'te'], group: 'temperature', description: `electron temperature from ${ionLabel('nii')} (6548+6584)/5755`,
    unit: 'K', ucd: 'phys.temperature;phys.electron', export: dbl('te_nii', `electron temperature from ${ionLabel('nii')} (6548+6584)/5755`),
  },
  ...metallicityFields('n2Pp04', { column: 'n2_pp04', defaultOn: true }),
  ...metallicityFields('o3n2Pp04', { column: 'o3n2_pp04' }),
  ...metallicityFields('n2M13'),
  ...metallicityFields('o3n2M13'),
  ...metallicityFields('n2s2haD16'),
  {
    key: 'luminosityDistanceMpc', kind: 'number', from: 'result', path: ['sfr', 'luminosityDistanceMpc'], group: 'sfr', description: 'luminosity distance, flat ΛCDM',
    unit: 'Mpc', ucd: 'pos.distance;pos.lumDist', export: dbl('lum_dist', 'luminosity distance, flat ΛCDM'),
  },
  {
    key: 'luminosityHalpha', kind: 'number', from: 'result', path: ['sfr', 'luminosityHalpha'], group: 'sfr', description: 'dust-corrected Hα luminosity',
    unit: 'erg.s**-1', ucd: `phys.luminosity;${HALPHA_UCD}`, export: dbl('lum_halpha', 'dust-corrected Hα luminosity'),
  },
  {
    key: 'sfrHalpha', kind: 'number', from: 'result', path: ['sfr', 'sfrHalpha'], group: 'sfr', description: 'Hα star-formation rate (calibration of the revision)',
    unit: 'solMass.yr**-1', ucd: 'phys.SFR', stored: results('sfr_halpha'), export: dbl('sfr_halpha', 'Hα star-formation rate (calibration of the revision)'),
    list: ['sfrHalpha'], sort: true, range: true, table: { label: 'SFR (M☉/yr)', digits: 3, defaultOn: true },
  },
  {
    key: 'sfrHalphaError', kind: 'number', from: 'result', path: ['sfr', 'sfrHalphaError'], group: 'sfr', description: '1σ error of sfr_halpha',
    unit: 'solMass.yr**-1', ucd: 'stat.error;phys.SFR', export: dbl('sfr_halpha_err', '1σ error of sfr_halpha'),
  },
  {
    key: 'log10BlackHoleMass', kind: 'number', from: 'result', path: ['blackHoleMass', 'log10Mass'], group: 'black-hole', description: 'log black-hole mass from broad Hα (Greene & Ho 2005)',
    unit: 'dex(solMass)', ucd: 'phys.mass;meta.modelled', export: dbl('log_mbh', 'log black-hole mass from broad Hα (Greene & Ho 2005)'),
  },
  {
    key: 'flagCount', kind: 'flags', from: 'result', path: ['flags'], group: 'flags', description: 'flags, separated by spaces', unit: null, ucd: 'meta.code.qual',
    stored: { table: 'results', column: 'flag_count', type: 'smallint', notNull: true }, export: chr('flags', 'flags, separated by spaces'),
    list: ['flagCount'], sort: true, table: { label: 'Flags', digits: 0, defaultOn: true },
  },
  {
    key: 'ewHalpha', kind: 'number', from: 'input', path: ['ew', 'halpha'], group: 'measurements', description: 'equivalent width of Hα as given, emission positive',
    unit: 'Angstrom', ucd: `spect.line.eqWidth;${HALPHA_UCD}`, stored: results('ew_halpha'), range: true,
    notExported: 'an input of the galaxy rather than a derived quantity; the exports hold derived values',
  },
  {
    key: 'snrMin', kind: 'number', from: 'input', path: [], compute: minBalmerSnr, group: 'measurements', description: 'the lower S/N of Hα and Hβ (0 when either is a limit)',
    unit: null, ucd: 'stat.snr', stored: results('snr_min'), range: true,
    notExported: 'a property of the input fluxes, which are not exported; it serves the minSnr filter',
  },
]

/** Fields in list order (see LIST_GROUP_ORDER); the registry's order within a group. */
export const LIST_ORDER: readonly ResultField[] = LIST_GROUP_ORDER.flatMap((g) => RESULT_FIELDS.filter((f) => f.group === g))

const BY_KEY = new Map(RESULT_FIELDS.map((f) => [f.key, f]))
/** The field of a key; throws for a key the registry does not have (a typo in a derivation). */
export function resultField(key: string): ResultField {
  const f = BY_KEY.get(key)
  if (!f) throw new Error(`no result field "${key}" in shared/results/registry.ts`)
  return f
}

/** Names of the `?sort=` fields and of the `?range=` fields, in list order. */
export const SORT_KEYS = LIST_ORDER.filter((f) => f.sort).map((f) => f.key) as [string, ...string[]]
export const RANGE_KEYS = LIST_ORDER.filter((f) => f.range).map((f) => f.key) as [string, ...string[]]

/** The class filters: query parameter, class diagram and field, in registry order. */
export const CLASS_FILTERS = RESULT_FIELDS.filter((f) => f.classParam)
  .map((f) => ({ param: f.classParam as ClassParam, diagram: f.diagram!, field: f }))
