/**
 * Column layout of the columnar kernel's output, generated from one table per matrix. Each table
 * entry is either `ONE` (a single column) or a list of keys (a family of adjacent columns, one per
 * key, indexed like the list: per line in `LINES` order, per ratio in `RATIO_KEYS` order, per
 * metallicity calibration). `FLOAT` and `INT` give every column's number as a typed constant
 * (`FLOAT.ebv`, `FLOAT.flux[l]`), so the kernel and its readers never look columns up by string.
 */
import { METALLICITY_KEYS } from '../vocabulary/calibrations.ts'
import { LINE_IDS } from '../vocabulary/lines.ts'
import { RATIO_KEYS, type RatioKey } from '../vocabulary/ratios.ts'

/** Table entry of a single column. */
export const ONE = 1
type ColumnTable = Readonly<Record<string, typeof ONE | readonly string[]>>

/** Column numbers of a table: a number per single column, an array (indexed like its keys) per family. */
export type ColumnOffsets<T extends ColumnTable> = {
  readonly [K in keyof T]: T[K] extends readonly string[] ? readonly number[] : number
}

/** A table's column numbers, and one name per column (`key`, or `key:member` in a family). */
export interface ColumnLayout<T extends ColumnTable> {
  offsets: ColumnOffsets<T>
  names: readonly string[]
}

/**
 * Number the columns of a table in its (insertion) order.
 * @example columnLayout({ a: ONE, b: ['x', 'y'] }).names.join(' ') // 'a b:x b:y'
 */
export function columnLayout<T extends ColumnTable>(table: T): ColumnLayout<T> {
  const names: string[] = []
  const entries = Object.entries(table).map(([key, entry]): [string, number | readonly number[]] =>
    entry === ONE ? [key, names.push(key) - 1] : [key, Object.freeze(entry.map((member) => names.push(`${key}:${member}`) - 1))])
  // Object.fromEntries keeps the object in V8's fast-properties mode (one store per key would turn an
  // object of this many keys into a dictionary, and every column look-up in the kernel into a hash probe)
  return { offsets: Object.freeze(Object.fromEntries(entries)) as ColumnOffsets<T>, names: Object.freeze(names) }
}

/** Number of ratios the kernel forms (shared/vocabulary/ratios.ts, in its order). */
export const RATIO_COUNT = RATIO_KEYS.length
/** Index of every ratio key in the ratio families. */
export const RATIO_INDEX = Object.freeze(Object.fromEntries(RATIO_KEYS.map((k, i) => [k, i]))) as Readonly<Record<RatioKey, number>>

/**
 * Float output columns (row-major: column c of row i at i·FLOAT_COLUMN_COUNT + c). NaN means "no
 * value". A key ending in "Error" is a first-order 1σ error and gets no Monte Carlo percentiles.
 */
const FLOAT_TABLE = {
  // dust (shared/science/README.md §1.2)
  balmerDecrement: ONE, balmerDecrementError: ONE, ebv: ONE, ebvError: ONE, av: ONE, avError: ONE,
  // dereddened fluxes or limits, per line (§1.2, §9)
  flux: LINE_IDS, fluxError: LINE_IDS,
  // observed ratios (§2.1)
  ratio: RATIO_KEYS, ratioError: RATIO_KEYS,
  // distances to the demarcation lines (§2.6)
  niiKa03: ONE, niiKa03Error: ONE, niiKe01: ONE, niiKe01Error: ONE, niiS07: ONE, niiS07Error: ONE, niiNearestDistance: ONE,
  siiKe01: ONE, siiKe01Error: ONE, siiKe06: ONE, siiKe06Error: ONE,
  oiKe01: ONE, oiKe01Error: ONE, oiKe06: ONE, oiKe06Error: ONE,
  // density (§3) and temperature (§4)
  neSii: ONE, neSiiError: ONE, neOii: ONE, neOiiError: ONE,
  teOiii: ONE, teOiiiError: ONE, teOiiiNeUsed: ONE, teNii: ONE, teNiiError: ONE, teNiiNeUsed: ONE,
  // metallicity per calibration (§5)
  z: METALLICITY_KEYS, zError: METALLICITY_KEYS,
  // distance, luminosity, SFR (§6) and black-hole mass (§7)
  luminosityDistance: ONE, lHalpha: ONE, lHalphaError: ONE, sfrK98: ONE, sfrK98Error: ONE, sfrKe12: ONE, sfrKe12Error: ONE,
  bhMass: ONE, bhLog10Mass: ONE, bhLog10MassError: ONE, bhLBroad: ONE,
} as const satisfies ColumnTable

/**
 * Int8 output columns. `source`: 0 none, 1 Hα/Hβ, 2 Hγ/Hβ; `state`: LINE_* after thresholding;
 * `limit`: RATIO_*; classes: CLASS_* codes; `niiNearest`: 0 none, 1 Ka03, 2 Ke01; densities:
 * DENSITY_OK, DENSITY_LOW_LIMIT, DENSITY_HIGH_LIMIT or DENSITY_NOT_COMPUTED.
 */
const INT_TABLE = {
  source: ONE, state: LINE_IDS, limit: RATIO_KEYS,
  classNii: ONE, classSii: ONE, classOi: ONE, classWhan: ONE, classOverall: ONE, niiSubtype: ONE,
  niiNearest: ONE, densitySii: ONE, densityOii: ONE,
} as const satisfies ColumnTable

const floatLayout = columnLayout(FLOAT_TABLE)
const intLayout = columnLayout(INT_TABLE)

/** Column number of every float output column. */
export const FLOAT = floatLayout.offsets
/** Names of the float output columns, by column number. */
export const FLOAT_COLUMNS = floatLayout.names
/** Number of float output columns. */
export const FLOAT_COLUMN_COUNT = FLOAT_COLUMNS.length
/** Float columns that are values (get Monte Carlo percentiles), as a 0/1 mask by column. */
export const FLOAT_COLUMN_IS_VALUE: Uint8Array = Uint8Array.from(FLOAT_COLUMNS, (n) => (/Error(:|$)/.test(n) ? 0 : 1))

/** Column number of every Int8 output column. */
export const INT = intLayout.offsets
/** Names of the Int8 output columns, by column number. */
export const INT_COLUMNS = intLayout.names
/** Number of Int8 output columns. */
export const INT_COLUMN_COUNT = INT_COLUMNS.length

/** Density status code: the doublet was not measured (the result's density block is null). */
export const DENSITY_NOT_COMPUTED = 3
