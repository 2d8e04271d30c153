/**
 * Which kernel column each number of a result document comes from, learnt from `buildResult` itself
 * (one source of truth): a probe row whose float column c holds 1000 + c is built into documents, and
 * every leaf holding such a number names its column. With the map, the stored copies of result fields
 * are read straight off a kernel row (no document built on the write path), and a stored document
 * (older storage) is turned back into a kernel row, kept only if it rebuilds to the same document.
 */
import type { KernelOutput, PreparedSettings } from '../diagnostics/kernel.ts'
import { FLAG_STRIDE } from '../diagnostics/kernel.ts'
import { DENSITY_NOT_COMPUTED, FLOAT_COLUMN_COUNT, INT, INT_COLUMN_COUNT, RATIO_INDEX } from '../diagnostics/kernel-layout.ts'
import type { MonteCarloSummary } from '../diagnostics/monte-carlo.ts'
import { buildResult, type RowInput } from '../diagnostics/pipeline.ts'
import type { GalaxyResult } from '../diagnostics/types.ts'
import { LINE_DETECTED, LINE_UPPER_LIMIT, RATIO_LOWER, RATIO_UPPER } from '../stats/limits.ts'
import { CLASS_CODE, CLASS_LINER, CLASS_SEYFERT, classCode, className, type ClassName } from '../vocabulary/classes.ts'
import { DENSITY_LIMIT_FLAGS, FLAG_BIT, FLAG_WORDS, belowMinSnrFlag, flagName } from '../vocabulary/flags.ts'
import { LINE_COUNT, LINE_IDS, LINE_INDEX, isLineId } from '../vocabulary/lines.ts'
import { BALMER_DECREMENT_KEYS, RATIO_KEYS } from '../vocabulary/ratios.ts'
import type { GalaxyInputDto } from '../schemas/galaxy.schema.ts'
import { RESULTS_COLUMNS } from './storage.ts'
import { at, finite, rawValue } from './values.ts'
import type { ResultField } from './registry.ts'
import { FLOAT4_MAX, FLOAT4_MIN_NORMAL, MC_DIAGRAMS } from './stored-row.ts'

type SfrCalibration = PreparedSettings['settings']['sfrCalibration']
const PROBE_BASE = 1000

/** Paths of a document (keys joined by '/') to the float column whose value they hold unscaled. */
export interface DocumentMap {
  columnAt: ReadonlyMap<string, number>
  /** per float column, every path showing it (a line's flux shows as `flux` or `upperLimit`) */
  pathsOf: ReadonlyArray<ReadonlyArray<readonly string[]>>
}

function probeRow(lineState: number): KernelOutput {
  const out: KernelOutput = { n: 1, float: Float64Array.from({ length: FLOAT_COLUMN_COUNT }, (_, c) => PROBE_BASE + c), int: new Int8Array(INT_COLUMN_COUNT), flags: new Uint32Array(FLAG_STRIDE) }
  for (let l = 0; l < LINE_COUNT; l++) out.int[INT.state[l]] = lineState
  out.int[INT.source] = 1
  out.int[INT.niiNearest] = 1
  return out
}

function leaves(v: unknown, path: string[], visit: (path: string[], n: number) => void): void {
  if (typeof v === 'number') visit(path, v)
  else if (v && typeof v === 'object' && !Array.isArray(v)) for (const [k, x] of Object.entries(v)) leaves(x, [...path, k], visit)
}

const maps = new Map<SfrCalibration, DocumentMap>()

/** The document map under an SFR calibration (which column `sfr.sfrHalpha` shows depends on it). */
export function documentMap(sfrCalibration: SfrCalibration): DocumentMap {
  const known = maps.get(sfrCalibration)
  if (known) return known
  // k(λ) = 1e-9 keeps A_λ = k·E(B−V) off the probe values; the broad FWHM is not a kernel column
  const prep = { k: new Float64Array(LINE_COUNT).fill(1e-9), settings: { sfrCalibration } } as unknown as PreparedSettings
  const input: RowInput = { id: 'probe', kind: () => 1, fwhmBroad: -1 }
  const columnAt = new Map<string, number>()
  const pathsOf: string[][][] = Array.from({ length: FLOAT_COLUMN_COUNT }, () => [])
  for (const state of [LINE_DETECTED, LINE_UPPER_LIMIT]) {
    leaves(buildResult(input, probeRow(state), 0, prep, null), [], (path, n) => {
      const c = n - PROBE_BASE
      if (!Number.isInteger(c) || c < 0 || c >= FLOAT_COLUMN_COUNT) return
      const key = path.join('/')
      if (columnAt.has(key)) return
      columnAt.set(key, c)
      pathsOf[c].push(path)
    })
  }
  const map = { columnAt, pathsOf }
  maps.set(sfrCalibration, map)
  return map
}

// ── stored copies straight from a kernel row ─────────────────────────────────────────────────────

/** How each `results` copy column is read off a kernel row (built once per SFR calibration). */
type CopyReader = (out: KernelOutput, i: number, g: GalaxyInputDto) => number | null

/** A number as a `real` copy column holds it: saturated at float4's largest, flushed to 0 below its smallest normal. */
export function float4(v: number | null | undefined): number | null {
  const n = finite(v)
  if (n === null) return null
  if (Math.abs(n) > FLOAT4_MAX) return Math.sign(n) * FLOAT4_MAX
  if (Math.abs(n) < FLOAT4_MIN_NORMAL) return 0
  return n
}

const CLASS_INT: Readonly<Record<string, number>> = { nii: INT.classNii, sii: INT.classSii, oi: INT.classOi, whan: INT.classWhan, overall: INT.classOverall }

function popcount(x: number): number {
  x -= (x >>> 1) & 0x55555555
  x = (x & 0x33333333) + ((x >>> 2) & 0x33333333)
  return (((x + (x >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24
}

function fieldReader(f: ResultField, map: DocumentMap): CopyReader {
  if (f.from === 'input' || f.compute) return (_o, _i, g) => float4(rawValue(f, { input: g }) as number | null)
  switch (f.kind) {
    case 'class': {
      const c = CLASS_INT[f.diagram!]
      return (o, i) => classCode(f.diagram!, className(o.int[i * INT_COLUMN_COUNT + c]))
    }
    case 'limit': {
      const c = INT.limit[RATIO_INDEX[f.path[f.path.length - 1] as keyof typeof RATIO_INDEX]]
      const bits = f.stored!.bits!
      return (o, i) => { const l = o.int[i * INT_COLUMN_COUNT + c]; return l === RATIO_UPPER ? bits.upper : l === RATIO_LOWER ? bits.lower : 0 }
    }
    case 'flags': {
      // the document's flags: the row's flag bits and one per ratio limit
      const limits = INT.limit
      return (o, i) => {
        let n = 0
        for (let w = 0; w < FLAG_STRIDE; w++) n += popcount(o.flags[i * FLAG_STRIDE + w])
        for (const c of limits) { const l = o.int[i * INT_COLUMN_COUNT + c]; if (l === RATIO_UPPER || l === RATIO_LOWER) n++ }
        return Math.min(n, 32767)
      }
    }
    default: {
      const c = map.columnAt.get(f.path.join('/'))
      if (c === undefined) throw new Error(`stored field "${f.key}" (${f.path.join('/')}) is no kernel column of the document`)
      return (o, i) => float4(o.float[i * FLOAT_COLUMN_COUNT + c])
    }
  }
}

/** Readers of every `results` copy column, in RESULTS_COLUMNS order (limit bit fields OR their fields). */
export function copyColumnReaders(sfrCalibration: SfrCalibration): CopyReader[] {
  const map = documentMap(sfrCalibration)
  return RESULTS_COLUMNS.map((col) => {
    const readers = col.fields.map((f) => fieldReader(f, map))
    if (readers.length === 1) return readers[0]
    return (o, i, g) => readers.reduce((bits, r) => bits | (r(o, i, g) ?? 0), 0)
  })
}

// ── a stored document back into a kernel row ─────────────────────────────────────────────────────

/** A kernel row, its input and Monte Carlo summary recovered from a document (null: it cannot be). */
export interface RecoveredRow { out: KernelOutput; input: RowInput; mc: MonteCarloSummary | null }

const isObj = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v)

/**
 * The kernel row a document was built from, as far as the document shows it (what it does not show
 * does not change the rebuilt document). Null when the document holds something this code would not
 * write (an unknown flag or class): such a document stays stored as it is.
 */
export function rowFromDocument(doc: GalaxyResult, sfrCalibration: SfrCalibration, draws: number): RecoveredRow | null {
  if (!isObj(doc) || !isObj(doc.classes) || !Array.isArray(doc.flags)) return null
  const map = documentMap(sfrCalibration)
  const out: KernelOutput = { n: 1, float: new Float64Array(FLOAT_COLUMN_COUNT).fill(NaN), int: new Int8Array(INT_COLUMN_COUNT), flags: new Uint32Array(FLAG_STRIDE) }
  const percentiles = new Float64Array(3 * FLOAT_COLUMN_COUNT).fill(NaN)
  for (let c = 0; c < FLOAT_COLUMN_COUNT; c++) {
    for (const path of map.pathsOf[c]) {
      const v = finite(at(doc, path))
      if (v === null) continue
      out.float[c] = v
      const p = at(doc, [...path.slice(0, -1), `${path[path.length - 1]}Percentiles`]) as { p16?: number; p50?: number; p84?: number } | undefined
      if (isObj(p)) { percentiles[3 * c] = p.p16 ?? NaN; percentiles[3 * c + 1] = p.p50 ?? NaN; percentiles[3 * c + 2] = p.p84 ?? NaN }
      break
    }
  }
  const kinds = new Int8Array(LINE_COUNT)
  for (const [id, e] of Object.entries(doc.dereddened ?? {})) {
    if (!isLineId(id) || !isObj(e)) return null
    const l = LINE_INDEX[id]
    kinds[l] = 1
    out.int[INT.state[l]] = 'upperLimit' in e ? LINE_UPPER_LIMIT : LINE_DETECTED
  }
  const source = doc.extinction?.source
  out.int[INT.source] = source ? BALMER_DECREMENT_KEYS.indexOf(source) + 1 : 0
  if (source && out.int[INT.source] === 0) return null
  for (let k = 0; k < RATIO_KEYS.length; k++) {
    const lim = doc.ratioLimits?.[RATIO_KEYS[k]]
    out.int[INT.limit[k]] = lim === 'upper' ? RATIO_UPPER : lim === 'lower' ? RATIO_LOWER : 0
  }
  for (const d of MC_DIAGRAMS) {
    const name = (doc.classes as unknown as Record<string, string>)[d]
    if (!(name in CLASS_CODE)) return null
    out.int[CLASS_INT[d]] = CLASS_CODE[name as ClassName]
  }
  out.int[INT.niiSubtype] = doc.classes.niiSubtype === 'seyfert' ? CLASS_SEYFERT : doc.classes.niiSubtype === 'liner' ? CLASS_LINER : 0
  const nearest = doc.distances?.nii?.nearest
  out.int[INT.niiNearest] = doc.distances?.nii ? (nearest === 'ka03' ? 1 : 2) : 0
  for (const [which, c] of [['sii', INT.densitySii], ['oii', INT.densityOii]] as const) {
    const block = doc.density?.[which]
    out.int[c] = !block ? DENSITY_NOT_COMPUTED : block.flag ? DENSITY_LIMIT_FLAGS.indexOf(block.flag as never) + 1 : 0
  }
  const ratioLimitFlags = new Set(RATIO_KEYS.flatMap((k) => ['upper', 'lower'].map((kind) => flagName('ratio-limit', `${k}:${kind}`))))
  for (const f of doc.flags) {
    const bit = FLAG_BIT[f]
    if (bit !== undefined) { out.flags[bit >>> 5] |= 1 << (bit & 31); continue }
    const l = LINE_IDS.findIndex((id) => belowMinSnrFlag(id) === f)
    if (l >= 0) { out.flags[FLAG_WORDS] |= 1 << l; continue }
    if (!ratioLimitFlags.has(f)) return null
  }
  let mc: MonteCarloSummary | null = null
  const probs = doc.classes.classProbabilities as Record<string, Record<string, number>> | undefined
  if (probs) {
    const classFractions = {} as MonteCarloSummary['classFractions']
    for (const d of MC_DIAGRAMS) {
      const f = new Float64Array(11)
      for (const [name, p] of Object.entries(probs[d] ?? {})) if (name in CLASS_CODE) f[CLASS_CODE[name as ClassName]] = p
      classFractions[d] = f
    }
    mc = { draws, percentiles, classFractions }
  }
  const fwhm = finite(doc.blackHoleMass?.fwhmKmPerS)
  return { out, input: { id: doc.id, kind: (l) => kinds[l], fwhmBroad: fwhm ?? NaN }, mc }
}
