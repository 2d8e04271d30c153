/**
 * A result as it is stored: the kernel's row itself, not the document made of it. The numbers go in
 * `measures` (real[], every float column of the kernel plus the inputs a document repeats), the codes
 * and flags in `codes` (bytes), the Monte Carlo summary in `mc_percentiles` and `mc_classes` (real[]).
 * A `StoredLayout` names every element, so rows written by an older layout are read by name after
 * the kernel gains or reorders columns; `buildResult` (shared/diagnostics/pipeline.ts) turns a row
 * back into the document, so what is read is what would have been computed, at float4 precision.
 */
import { FLAG_STRIDE, type KernelOutput } from '../diagnostics/kernel.ts'
import { FLOAT_COLUMN_COUNT, FLOAT_COLUMN_IS_VALUE, FLOAT_COLUMNS, INT_COLUMN_COUNT, INT_COLUMNS } from '../diagnostics/kernel-layout.ts'
import type { MonteCarloSummary } from '../diagnostics/monte-carlo.ts'
import type { RowInput } from '../diagnostics/pipeline.ts'
import { CLASS_CODE, DIAGRAM_CLASSES, type ClassName } from '../vocabulary/classes.ts'
import { FLAG_WORDS, ROW_FLAGS, belowMinSnrFlag } from '../vocabulary/flags.ts'
import { LINE_COUNT, LINE_IDS } from '../vocabulary/lines.ts'

/** The Monte Carlo diagrams (MonteCarloSummary.classFractions keys), in stored order. */
export const MC_DIAGRAMS = ['nii', 'sii', 'oi', 'whan', 'overall'] as const

/** Names of every stored element, in stored order: what a `result_layouts` row holds. */
export interface StoredLayout {
  /** `measures`: the kernel's float columns, then `input:fwhmBroad` */
  floats: string[]
  /** per `floats` entry, the factor it is stored times (luminosities in erg/s exceed float4's range) */
  scales: number[]
  /** `codes`, after the given-lines mask (one bit per `lines` entry, uint32 LE): one int8 per name */
  ints: string[]
  lines: string[]
  /** `codes`, after the ints: flag words (uint32 LE), one name per bit ('' for an unused bit) */
  flags: string[]
  /** `mc_percentiles`: p16, p50, p84 of each of these float columns */
  percentiles: string[]
  /** `mc_classes`: fraction of draws per `diagram:class` */
  classes: string[]
}

const PERCENTILE_COLUMNS = FLOAT_COLUMNS.filter((_, c) => FLOAT_COLUMN_IS_VALUE[c])

/** The layout this code writes. */
const FLOATS = [...FLOAT_COLUMNS, 'input:fwhmBroad']
/** Luminosities (erg s⁻¹, ≈ 10⁴⁰–10⁴³) are stored in units of 10⁴⁰ erg s⁻¹: a real holds at most 3.4·10³⁸. */
const LUMINOSITY_SCALE = 1e-40
const isLuminosity = (name: string) => /^(lHalpha|bhLBroad)/.test(name)

export const CURRENT_LAYOUT: StoredLayout = Object.freeze({
  floats: FLOATS,
  scales: FLOATS.map((n) => (isLuminosity(n) ? LUMINOSITY_SCALE : 1)),
  ints: [...INT_COLUMNS],
  lines: [...LINE_IDS],
  flags: [...Array.from({ length: 32 * FLAG_WORDS }, (_, b) => ROW_FLAGS[b] ?? ''), ...Array.from({ length: 32 }, (_, l) => (l < LINE_COUNT ? belowMinSnrFlag(LINE_IDS[l]) : ''))],
  percentiles: PERCENTILE_COLUMNS,
  classes: MC_DIAGRAMS.flatMap((d) => (DIAGRAM_CLASSES[d] as readonly string[]).map((c) => `${d}:${c}`)),
})

/** Element counts of the current layout. */
export const MEASURE_COUNT = CURRENT_LAYOUT.floats.length
const FWHM_AT = FLOAT_COLUMN_COUNT
export const CODES_BYTES = 4 + INT_COLUMN_COUNT + 4 * FLAG_STRIDE
export const PERCENTILE_COUNT = 3 * PERCENTILE_COLUMNS.length
export const MC_CLASS_COUNT = CURRENT_LAYOUT.classes.length

/** One stored result as the database returns it. */
export interface StoredResult {
  measures: ReadonlyArray<number | null>
  /** the measures as doubles when one of them is beyond a real's range (else null) */
  measuresExact?: ReadonlyArray<number | null> | null
  codes: Uint8Array
  mcPercentiles: ReadonlyArray<number | null> | null
  mcClasses: ReadonlyArray<number | null> | null
}

// ── writing ──────────────────────────────────────────────────────────────────────────────────────

/** `measures` of kernel row i: float4-representable numbers, NaN where there is none (stored NULL). */
export function measuresOf(out: KernelOutput, i: number, fwhmBroad: number, into = new Float64Array(MEASURE_COUNT)): Float64Array {
  into.set(out.float.subarray(i * FLOAT_COLUMN_COUNT, (i + 1) * FLOAT_COLUMN_COUNT))
  into[FWHM_AT] = fwhmBroad
  for (const c of SCALED) into[c] *= CURRENT_LAYOUT.scales[c]
  return into
}
const SCALED = CURRENT_LAYOUT.scales.flatMap((s, c) => (s !== 1 ? [c] : []))

/** `codes` of kernel row i: given-lines mask, int8 columns, flag words. */
export function codesOf(out: KernelOutput, i: number, given: RowInput['kind'], into = new Uint8Array(CODES_BYTES)): Uint8Array {
  const view = new DataView(into.buffer, into.byteOffset, into.byteLength)
  let mask = 0
  for (let l = 0; l < LINE_COUNT; l++) if (given(l) !== 0) mask |= 1 << l
  view.setUint32(0, mask >>> 0, true)
  for (let c = 0; c < INT_COLUMN_COUNT; c++) view.setInt8(4 + c, out.int[i * INT_COLUMN_COUNT + c])
  for (let w = 0; w < FLAG_STRIDE; w++) view.setUint32(4 + INT_COLUMN_COUNT + 4 * w, out.flags[i * FLAG_STRIDE + w], true)
  return into
}

/** `mc_percentiles` of a Monte Carlo summary (NaN where no draw was finite). */
export function percentilesOf(mc: MonteCarloSummary, into = new Float64Array(PERCENTILE_COUNT)): Float64Array {
  let k = 0
  for (let c = 0; c < FLOAT_COLUMN_COUNT; c++) {
    if (!FLOAT_COLUMN_IS_VALUE[c]) continue
    const scale = CURRENT_LAYOUT.scales[c]
    into[k++] = mc.percentiles[3 * c] * scale
    into[k++] = mc.percentiles[3 * c + 1] * scale
    into[k++] = mc.percentiles[3 * c + 2] * scale
  }
  return into
}

/** `mc_classes` of a Monte Carlo summary. */
export function classFractionsOf(mc: MonteCarloSummary, into = new Float64Array(MC_CLASS_COUNT)): Float64Array {
  let k = 0
  for (const d of MC_DIAGRAMS) for (const c of DIAGRAM_CLASSES[d] as readonly ClassName[]) into[k++] = mc.classFractions[d][CLASS_CODE[c]]
  return into
}

/** float4's largest finite value and its smallest normal one (the bounds of a `real`). */
export const FLOAT4_MAX = 3.4028234663852886e38
export const FLOAT4_MIN_NORMAL = 1.1754943508222875e-38

/** A number as a `real` array element holds it: rounded to float4, saturated at its largest; NaN and ±∞ are NULL. */
export function asReal(v: number): number | null {
  return Number.isFinite(v) ? Math.fround(v > FLOAT4_MAX ? FLOAT4_MAX : v < -FLOAT4_MAX ? -FLOAT4_MAX : v) : null
}
/** Whether a `real` holds every number of the measures to float4's relative precision. */
export function fitsReal(measures: ArrayLike<number>): boolean {
  for (let k = 0; k < measures.length; k++) {
    const a = Math.abs(measures[k])
    if (a > FLOAT4_MAX && a !== Infinity) return false
    if (a !== 0 && a < FLOAT4_MIN_NORMAL) return false
  }
  return true
}

// ── reading ──────────────────────────────────────────────────────────────────────────────────────

/** Where each current element sits in a stored layout (-1: that layout has none). */
export interface LayoutReader {
  float: Int32Array
  /** per current float column, 1 / the stored layout's scale of it */
  unscale: Float64Array
  int: Int32Array
  line: Int32Array
  /** per current flag bit (CURRENT_LAYOUT.flags), the stored bit */
  flag: Int32Array
  percentile: Int32Array
  /** per current percentile column, 1 / the stored layout's scale of it */
  percentileUnscale: Float64Array
  mcClass: Int32Array
  intCount: number
}

const indexIn = (current: readonly string[], stored: readonly string[]) => {
  const at = new Map(stored.map((n, k) => [n, k]))
  return Int32Array.from(current, (n) => (n === '' ? -1 : at.get(n) ?? -1))
}

/** How to read rows of `stored` into the current layout, by element name. */
export function layoutReader(stored: StoredLayout): LayoutReader {
  return {
    float: indexIn(CURRENT_LAYOUT.floats, stored.floats),
    unscale: Float64Array.from(indexIn(CURRENT_LAYOUT.floats, stored.floats), (k) => (k < 0 ? 1 : 1 / (stored.scales?.[k] ?? 1))),
    int: indexIn(CURRENT_LAYOUT.ints, stored.ints),
    line: indexIn(CURRENT_LAYOUT.lines, stored.lines),
    flag: indexIn(CURRENT_LAYOUT.flags, stored.flags),
    percentile: indexIn(CURRENT_LAYOUT.percentiles, stored.percentiles),
    percentileUnscale: Float64Array.from(CURRENT_LAYOUT.percentiles, (n) => { const k = stored.floats.indexOf(n); return k < 0 ? 1 : 1 / (stored.scales?.[k] ?? 1) }),
    mcClass: indexIn(CURRENT_LAYOUT.classes, stored.classes),
    intCount: stored.ints.length,
  }
}

/** A one-row kernel output, its input and Monte Carlo summary, refilled by `decodeStored`. */
export interface DecodedRow { out: KernelOutput; input: RowInput; mc: MonteCarloSummary | null }

/**
 * Row 0 of `into.out` (and its input and Monte Carlo summary) from a stored result. Elements the
 * stored layout lacks read as "no value" (NaN, code 0, flag clear).
 */
export function decodeStored(id: string, row: StoredResult, reader: LayoutReader, draws: number, into?: DecodedRow): DecodedRow {
  const out = into?.out ?? { n: 1, float: new Float64Array(FLOAT_COLUMN_COUNT), int: new Int8Array(INT_COLUMN_COUNT), flags: new Uint32Array(FLAG_STRIDE) }
  const m = row.measuresExact ?? row.measures
  for (let c = 0; c < FLOAT_COLUMN_COUNT; c++) {
    const k = reader.float[c]
    const v = k < 0 ? null : m[k]
    out.float[c] = v === null || v === undefined ? NaN : v * reader.unscale[c]
  }
  const fk = reader.float[FWHM_AT]
  const fwhm = fk < 0 ? null : m[fk]
  const codes = new DataView(row.codes.buffer, row.codes.byteOffset, row.codes.byteLength)
  const mask = codes.getUint32(0, true)
  const kinds = new Int8Array(LINE_COUNT)
  for (let l = 0; l < LINE_COUNT; l++) kinds[l] = reader.line[l] >= 0 && (mask >>> reader.line[l]) & 1 ? 1 : 0
  for (let c = 0; c < INT_COLUMN_COUNT; c++) out.int[c] = reader.int[c] < 0 ? 0 : codes.getInt8(4 + reader.int[c])
  out.flags.fill(0)
  const flagsAt = 4 + reader.intCount
  for (let b = 0; b < reader.flag.length; b++) {
    const s = reader.flag[b]
    if (s < 0 || flagsAt + 4 * (s >>> 5) + 4 > codes.byteLength) continue
    if ((codes.getUint32(flagsAt + 4 * (s >>> 5), true) >>> (s & 31)) & 1) out.flags[b >>> 5] |= 1 << (b & 31)
  }
  let mc: MonteCarloSummary | null = null
  if (row.mcPercentiles && row.mcClasses) {
    const percentiles = new Float64Array(3 * FLOAT_COLUMN_COUNT).fill(NaN)
    let k = 0
    for (let c = 0; c < FLOAT_COLUMN_COUNT; c++) {
      if (!FLOAT_COLUMN_IS_VALUE[c]) continue
      const unscale = reader.percentileUnscale[k]
      const s = reader.percentile[k++]
      for (let q = 0; q < 3; q++) { const v = s < 0 ? null : row.mcPercentiles[3 * s + q]; percentiles[3 * c + q] = v === null || v === undefined ? NaN : v * unscale }
    }
    const classFractions = {} as MonteCarloSummary['classFractions']
    let j = 0
    for (const d of MC_DIAGRAMS) {
      const f = new Float64Array(11)
      for (const c of DIAGRAM_CLASSES[d] as readonly ClassName[]) { const s = reader.mcClass[j++]; f[CLASS_CODE[c]] = (s < 0 ? null : row.mcClasses[s]) ?? 0 }
      classFractions[d] = f
    }
    mc = { draws, percentiles, classFractions }
  }
  return { out, input: { id, kind: (l) => kinds[l], fwhmBroad: fwhm ?? NaN }, mc }
}
