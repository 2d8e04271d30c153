/**
 * The object API: validate galaxies, pack them into kernel columns, run the kernel (and the Monte
 * Carlo), and build `GalaxyResult`s in which every number is finite or null.
 */
import { requireFinite, requirePositiveFinite, ScienceInputError } from '../flags.ts'
import { imfOf, METALLICITY_KEYS } from '../vocabulary/calibrations.ts'
import { DENSITY_LIMIT_FLAGS, FLAG_WORDS, ROW_FLAGS, belowMinSnrFlag, flagName, ratioLimitFlag } from '../vocabulary/flags.ts'
import { isLineId, LINE_COUNT, LINE_IDS, LINE_INDEX, type LineId } from '../vocabulary/lines.ts'
import { BALMER_DECREMENT_KEYS, RATIO_KEYS } from '../vocabulary/ratios.ts'
import { LINE_DETECTED, LINE_UPPER_LIMIT, RATIO_LOWER, RATIO_UPPER } from '../stats/limits.ts'
import { CLASS_CODE, className, DIAGRAM_CLASSES, CLASS_LINER, CLASS_SEYFERT, type ClassName, type NiiClass, type OverallClass, type SiiOiClass, type WhanClass } from '../vocabulary/classes.ts'
import {
  createKernelInput, createKernelOutput, FLAG_STRIDE, prepareSettings, runKernel, type KernelInput, type KernelOutput, type PreparedSettings,
} from './kernel.ts'
import {
  DENSITY_NOT_COMPUTED, FLOAT, FLOAT_COLUMN_COUNT, FLOAT_COLUMN_IS_VALUE, INT, INT_COLUMN_COUNT, RATIO_INDEX,
} from './kernel-layout.ts'
import { galaxySeed, monteCarloGalaxy, type MonteCarloSummary } from './monte-carlo.ts'
import { validateSettings } from './settings.ts'
import type {
  BlackHoleResult, ClassesResult, DensityResult, DereddenedLine, DiagnosticSettings, GalaxyInput, GalaxyResult,
  MetallicityResult, NiiDistances, RatioKey, SeyfertLinerDistances, SfrResult, TemperatureResult,
} from './types.ts'

// ── input validation and packing ─────────────────────────────────────────────────────────────────

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v)
}

function packGalaxy(g: GalaxyInput, settings: DiagnosticSettings, input: KernelInput, i: number, prefix: string): void {
  if (!isObject(g)) throw new ScienceInputError(prefix || '/', 'a galaxy must be an object')
  if (typeof g.id !== 'string' || g.id.length === 0) throw new ScienceInputError(`${prefix}/id`, 'id must be a non-empty string')
  if (g.redshift !== undefined) input.redshift[i] = requireFinite(`${prefix}/redshift`, g.redshift)
  if (g.fluxUnit !== undefined) input.fluxUnit[i] = requirePositiveFinite(`${prefix}/fluxUnit`, g.fluxUnit)
  if (!isObject(g.lines)) throw new ScienceInputError(`${prefix}/lines`, 'lines must be an object')
  for (const [id, value] of Object.entries(g.lines)) {
    const path = `${prefix}/lines/${id}`
    if (!isLineId(id)) throw new ScienceInputError(path, `unknown line identifier ${id}`)
    if (value === undefined) continue
    if (!isObject(value)) throw new ScienceInputError(path, `${path} must be { flux, error } or { upperLimit }`)
    const l = LINE_INDEX[id]
    if ('upperLimit' in value) {
      if ('flux' in value || 'error' in value) throw new ScienceInputError(path, `${path} has both upperLimit and flux/error`)
      input.kind[l][i] = 2
      input.value[l][i] = requirePositiveFinite(`${path}/upperLimit`, value.upperLimit)
    } else {
      const flux = requireFinite(`${path}/flux`, (value as { flux?: unknown }).flux)
      const error = requirePositiveFinite(`${path}/error`, (value as { error?: unknown }).error)
      if (flux < 0 && !settings.allowNegative) {
        throw new ScienceInputError(`${path}/flux`, `${path}/flux must not be negative unless allowNegative is set, got ${flux}`)
      }
      input.kind[l][i] = 1
      input.value[l][i] = flux
      input.error[l][i] = error
    }
  }
  if (g.ew !== undefined) {
    if (!isObject(g.ew)) throw new ScienceInputError(`${prefix}/ew`, 'ew must be an object')
    for (const [id, v] of Object.entries(g.ew)) {
      if (!isLineId(id)) throw new ScienceInputError(`${prefix}/ew/${id}`, `unknown line identifier ${id}`)
      if (v === undefined) continue
      const w = requireFinite(`${prefix}/ew/${id}`, v)
      if (id === 'halpha') input.ewHalpha[i] = w
      if (id === 'nii_6584') input.ewNii[i] = w
    }
  }
  if (g.fwhm !== undefined) {
    if (!isObject(g.fwhm)) throw new ScienceInputError(`${prefix}/fwhm`, 'fwhm must be an object')
    for (const [id, v] of Object.entries(g.fwhm)) {
      if (!isLineId(id)) throw new ScienceInputError(`${prefix}/fwhm/${id}`, `unknown line identifier ${id}`)
      if (v === undefined) continue
      const w = requirePositiveFinite(`${prefix}/fwhm/${id}`, v)
      if (id === 'halpha_broad') input.fwhmBroad[i] = w
    }
  }
}

// ── result building ──────────────────────────────────────────────────────────────────────────────

const FLAG_NAMES = ROW_FLAGS
// which flags each result block repeats in its own `flags` (names checked against the flag registry)
const EXTINCTION_FLAGS = new Set([flagName('balmer-below-intrinsic'), flagName('balmer-from-hgamma'), flagName('no-balmer-decrement'), flagName('nonpositive-flux', 'balmer')])
const METALLICITY_FLAGS = new Set([flagName('metallicity-not-star-forming'), ...METALLICITY_KEYS.flatMap((k) => [flagName(`${k}-out-of-range`), flagName(`${k}-needs-detections`)])])
const SFR_FLAGS = new Set([flagName('sfr-not-star-forming'), flagName('sfr-not-dereddened'), flagName('sfr-needs-halpha'), flagName('luminosity-needs-redshift')])

const METALLICITY_ERROR_KEYS = METALLICITY_KEYS.map((k) => `${k}Error`)

// the result blocks' keys and the kernel columns they come from
const NII_DISTANCE_COLUMNS: Readonly<Record<string, number>> = {
  ka03: FLOAT.niiKa03, ka03Error: FLOAT.niiKa03Error, ke01: FLOAT.niiKe01, ke01Error: FLOAT.niiKe01Error,
  s07: FLOAT.niiS07, s07Error: FLOAT.niiS07Error, nearestDistance: FLOAT.niiNearestDistance,
}
const SEYFERT_LINER_COLUMNS = {
  sii: { ke01: FLOAT.siiKe01, ke01Error: FLOAT.siiKe01Error, ke06: FLOAT.siiKe06, ke06Error: FLOAT.siiKe06Error },
  oi: { ke01: FLOAT.oiKe01, ke01Error: FLOAT.oiKe01Error, ke06: FLOAT.oiKe06, ke06Error: FLOAT.oiKe06Error },
} as const
const DENSITY_COLUMNS = {
  sii: { status: INT.densitySii, ne: FLOAT.neSii, neError: FLOAT.neSiiError, ratio: RATIO_INDEX.siiDoublet },
  oii: { status: INT.densityOii, ne: FLOAT.neOii, neError: FLOAT.neOiiError, ratio: RATIO_INDEX.oiiDoublet },
} as const
const TEMPERATURE_COLUMNS = {
  oiii: { te: FLOAT.teOiii, teError: FLOAT.teOiiiError, neUsed: FLOAT.teOiiiNeUsed },
  nii: { te: FLOAT.teNii, teError: FLOAT.teNiiError, neUsed: FLOAT.teNiiNeUsed },
} as const

class RowReader {
  readonly fo: number
  readonly io: number
  constructor(readonly out: KernelOutput, readonly row: number, readonly mc: MonteCarloSummary | null) {
    this.fo = row * FLOAT_COLUMN_COUNT
    this.io = row * INT_COLUMN_COUNT
  }
  num(c: number): number | null {
    const v = this.out.float[this.fo + c]
    return Number.isFinite(v) ? v : null
  }
  int(c: number): number {
    return this.out.int[this.io + c]
  }
  /** target[key] = value of float column c, plus `<key>Percentiles` in Monte Carlo runs. */
  put(target: Record<string, unknown>, key: string, c: number, scale = 1): number | null {
    const v = this.num(c)
    target[key] = v === null ? null : v * scale
    if (v !== null && this.mc) {
      if (FLOAT_COLUMN_IS_VALUE[c]) {
        const p = this.mc.percentiles
        if (Number.isFinite(p[3 * c])) target[`${key}Percentiles`] = { p16: p[3 * c] * scale, p50: p[3 * c + 1] * scale, p84: p[3 * c + 2] * scale }
      }
    }
    return v
  }
}

function rowFlags(out: KernelOutput, row: number): string[] {
  const base = row * FLAG_STRIDE
  const flags: string[] = []
  for (let b = 0; b < FLAG_NAMES.length; b++) {
    if (out.flags[base + (b >>> 5)] & (1 << (b & 31))) flags.push(FLAG_NAMES[b])
  }
  const below = out.flags[base + FLAG_WORDS]
  for (let l = 0; l < LINE_COUNT; l++) if (below & (1 << l)) flags.push(belowMinSnrFlag(LINE_IDS[l]))
  return flags
}

function probabilities<T extends ClassName>(names: readonly T[], fractions: Float64Array): Record<T, number> {
  return Object.fromEntries(names.map((n) => [n, fractions[CLASS_CODE[n]]])) as Record<T, number>
}

/** What a result needs of its galaxy's input beside the kernel row: which lines were given, the broad-line FWHM. */
export interface RowInput {
  id: string
  /** kind of line l as given (0 not given, 1 flux, 2 upper limit) */
  kind(l: number): number
  /** FWHM of the broad Hα component in km/s (NaN when not given) */
  fwhmBroad: number
}

/** The input of galaxy i of a packed batch. */
export function packedRowInput(id: string, input: KernelInput, i: number): RowInput {
  return { id, kind: (l) => input.kind[l][i], fwhmBroad: input.fwhmBroad[i] }
}

/**
 * The result document of row i of a kernel output (and its Monte Carlo summary): the same document
 * whether the row was just computed or read back from storage (server/services/stored-results).
 */
export function buildResult(g: RowInput, out: KernelOutput, i: number, prep: PreparedSettings, mc: MonteCarloSummary | null): GalaxyResult {
  const r = new RowReader(out, i, mc)
  const flags = rowFlags(out, i)
  const sourceCode = r.int(INT.source)

  const extinction: Record<string, unknown> = {}
  r.put(extinction, 'balmerDecrement', FLOAT.balmerDecrement)
  r.put(extinction, 'balmerDecrementError', FLOAT.balmerDecrementError)
  const ebv = r.put(extinction, 'ebv', FLOAT.ebv)
  r.put(extinction, 'ebvError', FLOAT.ebvError)
  r.put(extinction, 'av', FLOAT.av)
  r.put(extinction, 'avError', FLOAT.avError)
  extinction.source = BALMER_DECREMENT_KEYS[sourceCode - 1] ?? null // kernel code 0: none
  extinction.flags = flags.filter((f) => EXTINCTION_FLAGS.has(f))

  const dereddened: Partial<Record<LineId, DereddenedLine>> = {}
  for (let l = 0; l < LINE_COUNT; l++) {
    if (g.kind(l) === 0) continue
    const id = LINE_IDS[l]
    const state = r.int(INT.state[l])
    const entry: Record<string, unknown> = {}
    if (state === LINE_DETECTED) {
      r.put(entry, 'flux', FLOAT.flux[l])
      r.put(entry, 'error', FLOAT.fluxError[l])
      // A_λ = k(λ)·E(B−V): percentiles scale with those of E(B−V) (k > 0)
      r.put(entry, 'aLambda', FLOAT.ebv, prep.k[l])
      if (ebv === null) entry.aLambda = null
    } else if (state === LINE_UPPER_LIMIT) {
      r.put(entry, 'upperLimit', FLOAT.flux[l])
    } else continue
    dereddened[id] = entry as DereddenedLine
  }

  const ratios: Record<string, unknown> = {}
  const ratioErrors: Record<string, number | null> = {}
  const ratioLimits: Partial<Record<RatioKey, 'upper' | 'lower'>> = {}
  for (let k = 0; k < RATIO_KEYS.length; k++) {
    const key = RATIO_KEYS[k]
    r.put(ratios, key, FLOAT.ratio[k])
    ratioErrors[key] = r.num(FLOAT.ratioError[k])
    const lim = r.int(INT.limit[k])
    if (lim === RATIO_UPPER || lim === RATIO_LOWER) {
      const kind = lim === RATIO_UPPER ? 'upper' : 'lower'
      ratioLimits[key] = kind
      flags.push(ratioLimitFlag(key, kind))
    }
  }

  const subtype = r.int(INT.niiSubtype)
  const classes: ClassesResult = {
    nii: className(r.int(INT.classNii)) as NiiClass,
    sii: className(r.int(INT.classSii)) as SiiOiClass,
    oi: className(r.int(INT.classOi)) as SiiOiClass,
    whan: className(r.int(INT.classWhan)) as WhanClass,
    overall: className(r.int(INT.classOverall)) as OverallClass,
    niiSubtype: subtype === CLASS_SEYFERT ? 'seyfert' : subtype === CLASS_LINER ? 'liner' : null,
  }
  if (mc) {
    classes.classProbabilities = {
      nii: probabilities(DIAGRAM_CLASSES.nii, mc.classFractions.nii),
      sii: probabilities(DIAGRAM_CLASSES.sii, mc.classFractions.sii),
      oi: probabilities(DIAGRAM_CLASSES.oi, mc.classFractions.oi),
      whan: probabilities(DIAGRAM_CLASSES.whan, mc.classFractions.whan),
      overall: probabilities(DIAGRAM_CLASSES.overall, mc.classFractions.overall),
    }
  }

  let nii: NiiDistances | null = null
  const nearest = r.int(INT.niiNearest)
  if (nearest !== 0) {
    const d: Record<string, unknown> = {}
    for (const key of ['ka03', 'ka03Error', 'ke01', 'ke01Error', 's07', 's07Error']) r.put(d, key, NII_DISTANCE_COLUMNS[key])
    d.nearest = nearest === 1 ? 'ka03' : 'ke01'
    r.put(d, 'nearestDistance', NII_DISTANCE_COLUMNS.nearestDistance)
    nii = d as NiiDistances
  }
  const seyfertLiner = (diagram: 'sii' | 'oi'): SeyfertLinerDistances | null => {
    const columns = SEYFERT_LINER_COLUMNS[diagram]
    if (r.num(columns.ke01) === null) return null
    const d: Record<string, unknown> = {}
    for (const [key, c] of Object.entries(columns)) r.put(d, key, c)
    d.nearest = 'ke01'
    r.put(d, 'nearestDistance', columns.ke01)
    return d as SeyfertLinerDistances
  }

  const densityBlock = (which: 'sii' | 'oii'): DensityResult | null => {
    const columns = DENSITY_COLUMNS[which]
    const status = r.int(columns.status)
    if (status === DENSITY_NOT_COMPUTED) return null
    const d: Record<string, unknown> = {}
    r.put(d, 'ne', columns.ne)
    r.put(d, 'neError', columns.neError)
    r.put(d, 'ratio', FLOAT.ratio[columns.ratio])
    d.ratioError = r.num(FLOAT.ratioError[columns.ratio])
    d.flag = DENSITY_LIMIT_FLAGS[status - 1] ?? null // status 1: low limit, 2: high limit (kernel-layout.ts)
    return d as DensityResult
  }

  const temperatureBlock = (ion: 'oiii' | 'nii'): TemperatureResult | null => {
    const own = flags.filter((f) => f.startsWith('te-') && f.endsWith(`:${ion}`)).map((f) => f.slice(0, -(ion.length + 1)))
    const columns = TEMPERATURE_COLUMNS[ion]
    const te = r.num(columns.te)
    if (te === null && own.length === 0) return null
    const d: Record<string, unknown> = {}
    r.put(d, 'te', columns.te)
    r.put(d, 'teError', columns.teError)
    r.put(d, 'neUsed', columns.neUsed)
    d.flags = own
    return d as TemperatureResult
  }

  const metallicity: Record<string, unknown> = {}
  for (let m = 0; m < METALLICITY_KEYS.length; m++) {
    r.put(metallicity, METALLICITY_KEYS[m], FLOAT.z[m])
    r.put(metallicity, METALLICITY_ERROR_KEYS[m], FLOAT.zError[m])
  }
  metallicity.flags = flags.filter((f) => METALLICITY_FLAGS.has(f))

  const kennicutt98 = prep.settings.sfrCalibration === 'kennicutt98'
  const sfr: Record<string, unknown> = {}
  r.put(sfr, 'luminosityDistanceMpc', FLOAT.luminosityDistance)
  r.put(sfr, 'luminosityHalpha', FLOAT.lHalpha)
  r.put(sfr, 'luminosityHalphaError', FLOAT.lHalphaError)
  r.put(sfr, 'sfrHalpha', kennicutt98 ? FLOAT.sfrK98 : FLOAT.sfrKe12)
  r.put(sfr, 'sfrHalphaError', kennicutt98 ? FLOAT.sfrK98Error : FLOAT.sfrKe12Error)
  r.put(sfr, 'sfrK98', FLOAT.sfrK98)
  r.put(sfr, 'sfrK98Error', FLOAT.sfrK98Error)
  r.put(sfr, 'sfrKe12', FLOAT.sfrKe12)
  r.put(sfr, 'sfrKe12Error', FLOAT.sfrKe12Error)
  sfr.imf = imfOf(prep.settings.sfrCalibration)
  sfr.flags = flags.filter((f) => SFR_FLAGS.has(f))

  let blackHoleMass: BlackHoleResult | null = null
  if (r.num(FLOAT.bhMass) !== null) {
    const d: Record<string, unknown> = {}
    r.put(d, 'massSolar', FLOAT.bhMass)
    r.put(d, 'log10Mass', FLOAT.bhLog10Mass)
    r.put(d, 'log10MassError', FLOAT.bhLog10MassError)
    r.put(d, 'luminosityBroadHalpha', FLOAT.bhLBroad)
    d.fwhmKmPerS = g.fwhmBroad
    d.flags = []
    blackHoleMass = d as BlackHoleResult
  }

  return {
    id: g.id,
    extinction: extinction as GalaxyResult['extinction'],
    dereddened,
    ratios: ratios as GalaxyResult['ratios'],
    ratioErrors: ratioErrors as GalaxyResult['ratioErrors'],
    ratioLimits,
    classes,
    distances: { nii, sii: seyfertLiner('sii'), oi: seyfertLiner('oi') },
    density: { sii: densityBlock('sii'), oii: densityBlock('oii') },
    temperature: { oiii: temperatureBlock('oiii'), nii: temperatureBlock('nii') },
    metallicity: metallicity as MetallicityResult,
    sfr: sfr as SfrResult,
    blackHoleMass,
    flags: [...new Set(flags)],
  }
}

// ── public entry points ──────────────────────────────────────────────────────────────────────────

/** A batch through the chain: its packed input, the kernel's rows and each galaxy's Monte Carlo summary (null without draws). */
export interface ChainRun {
  prep: PreparedSettings
  input: KernelInput
  out: KernelOutput
  mc: Array<MonteCarloSummary | null>
}

/**
 * Validates and packs the galaxies, runs the kernel and the Monte Carlo: everything but the result
 * documents (storage keeps the rows themselves; `buildResult` makes a document of any row).
 * @throws {ScienceInputError} with `path` prefixed by `prefix(i)`
 */
export function runChain(galaxies: GalaxyInput[], settings: DiagnosticSettings, prefix: (i: number) => string = (i) => `/${i}`): ChainRun {
  validateSettings(settings)
  if (!Array.isArray(galaxies)) throw new ScienceInputError('/', 'galaxies must be an array')
  const prep = prepareSettings(settings)
  const n = galaxies.length
  const input = createKernelInput(n)
  for (let i = 0; i < n; i++) packGalaxy(galaxies[i], settings, input, i, prefix(i))
  const out = createKernelOutput(n)
  runKernel(input, out, prep, { thresholdSnr: true, errors: true })
  const draws = settings.monteCarlo.draws
  const mc: Array<MonteCarloSummary | null> = new Array(n)
  for (let i = 0; i < n; i++) mc[i] = draws > 0 ? monteCarloGalaxy(input, i, out, prep, galaxySeed(settings.monteCarlo.seed, galaxies[i].id), draws) : null
  return { prep, input, out, mc }
}

function run(galaxies: GalaxyInput[], settings: DiagnosticSettings, prefix: (i: number) => string): GalaxyResult[] {
  const { prep, input, out, mc } = runChain(galaxies, settings, prefix)
  const results: GalaxyResult[] = new Array(galaxies.length)
  for (let i = 0; i < galaxies.length; i++) results[i] = buildResult(packedRowInput(galaxies[i].id, input, i), out, i, prep, mc[i])
  return results
}

/**
 * All diagnostics of one galaxy under one set of assumptions (see `GalaxyResult` for the shape and
 * shared/science/README.md for every formula and convention).
 *
 * @param galaxy    the measurements
 * @param settings  complete assumptions (start from `DEFAULT_SETTINGS`)
 * @returns the result; every number finite or null
 * @throws {ScienceInputError} impossible input, `path` relative to the galaxy (e.g. `/lines/hbeta/error`)
 * @throws {ScienceSettingsError} impossible setting (`path` e.g. `/settings/rv`)
 * @throws {ExtinctionRangeError} a line outside the extinction law's range
 * @example diagnoseGalaxy({ id: 'LNS-0000001', lines: { halpha: { flux: 400, error: 4 }, hbeta: { flux: 100, error: 2 } } }, DEFAULT_SETTINGS).extinction.ebv // ≈ 0.339
 */
export function diagnoseGalaxy(galaxy: GalaxyInput, settings: DiagnosticSettings): GalaxyResult {
  return run([galaxy], settings, () => '')[0]
}

/**
 * `diagnoseGalaxy` for a batch, sharing the per-settings work (k(λ) of every line, the D_L cache by
 * redshift) and running the columnar kernel once for the whole batch.
 *
 * @param galaxies  the measurements
 * @param settings  complete assumptions
 * @returns one result per galaxy, in order
 * @throws {ScienceInputError} with `path` prefixed by the galaxy's index (`/3/lines/hbeta/flux`)
 */
export function diagnoseMany(galaxies: GalaxyInput[], settings: DiagnosticSettings): GalaxyResult[] {
  return run(galaxies, settings, (i) => `/${i}`)
}

/**
 * The deterministic chain on columnar input, for survey-scale batches and the benchmark: Float64Array /
 * Int8Array in, the kernel's row-major matrices out (NaN = no value there; see kernel.ts). No input
 * validation beyond the kernel's own: callers pass finite numbers, errors > 0, limits > 0.
 *
 * @param input     columnar input (`createKernelInput`)
 * @param settings  complete assumptions (validated here)
 * @param out       optional reusable output buffer with out.n ≥ input.n
 * @param prepared  optional result of `prepareSettings(settings)` to reuse across chunks
 * @returns the output buffer
 */
export function diagnoseColumns(input: KernelInput, settings: DiagnosticSettings, out?: KernelOutput, prepared?: PreparedSettings): KernelOutput {
  validateSettings(settings)
  const prep = prepared ?? prepareSettings(settings)
  const buffer = out ?? createKernelOutput(input.n)
  runKernel(input, buffer, prep, { thresholdSnr: true, errors: true })
  return buffer
}

