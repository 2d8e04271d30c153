/**
 * The object API: validate galaxies, pack them into kernel columns, run the kernel (and the Monte
 * Carlo), and build `GalaxyResult`s in which every number is finite or null.
 */
import { requireFinite, requirePositiveFinite, ScienceInputError } from '../flags.ts'
import { METALLICITY_KEYS } from '../vocabulary/calibrations.ts'
import { FLAG_WORDS, ROW_FLAGS, belowMinSnrFlag, ratioLimitFlag } from '../vocabulary/flags.ts'
import { isLineId, LINE_COUNT, LINE_IDS, LINE_INDEX, type LineId } from '../vocabulary/lines.ts'
import { LINE_DETECTED, LINE_UPPER_LIMIT, RATIO_LOWER, RATIO_UPPER } from '../stats/limits.ts'
import { CLASS_CODE, className, DIAGRAM_CLASSES, CLASS_LINER, CLASS_SEYFERT, type ClassName, type NiiClass, type OverallClass, type SiiOiClass, type WhanClass } from '../vocabulary/classes.ts'
import {
  createKernelInput, createKernelOutput, DENSITY_NOT_COMPUTED, FC, FLAG_STRIDE, FLOAT_COLUMN_COUNT, FLOAT_COLUMN_IS_VALUE, IC,
  INT_COLUMN_COUNT, prepareSettings, RATIO_KEYS, runKernel, type KernelInput, type KernelOutput, type PreparedSettings,
} from './kernel.ts'
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
const EXTINCTION_FLAGS = new Set(['balmer-below-intrinsic', 'balmer-from-hgamma', 'no-balmer-decrement', 'nonpositive-flux:balmer'])
const METALLICITY_FLAGS = new Set(['metallicity-not-star-forming', ...METALLICITY_KEYS.flatMap((k) => [`${k}-out-of-range`, `${k}-needs-detections`])])
const SFR_FLAGS = new Set(['sfr-not-star-forming', 'sfr-not-dereddened', 'sfr-needs-halpha', 'luminosity-needs-redshift'])

// column numbers resolved once (building names per galaxy would allocate strings in the hot loop)
const COL_STATE = LINE_IDS.map((id) => IC[`state:${id}`])
const COL_FLUX = LINE_IDS.map((id) => FC[`flux:${id}`])
const COL_FLUX_ERROR = LINE_IDS.map((id) => FC[`fluxError:${id}`])
const COL_RATIO = RATIO_KEYS.map((k) => FC[`ratio:${k}`])
const COL_RATIO_ERROR = RATIO_KEYS.map((k) => FC[`ratioError:${k}`])
const COL_RATIO_LIMIT = RATIO_KEYS.map((k) => IC[`limit:${k}`])
const COL_METALLICITY = METALLICITY_KEYS.map((k) => FC[`z.${k}`])
const COL_METALLICITY_ERROR = METALLICITY_KEYS.map((k) => FC[`z.${k}Error`])
const METALLICITY_ERROR_KEYS = METALLICITY_KEYS.map((k) => `${k}Error`)

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

function buildResult(g: GalaxyInput, input: KernelInput, i: number, out: KernelOutput, prep: PreparedSettings, mc: MonteCarloSummary | null): GalaxyResult {
  const r = new RowReader(out, i, mc)
  const flags = rowFlags(out, i)
  const sourceCode = r.int(IC['source'])

  const extinction: Record<string, unknown> = {}
  r.put(extinction, 'balmerDecrement', FC['balmerDecrement'])
  r.put(extinction, 'balmerDecrementError', FC['balmerDecrementError'])
  const ebv = r.put(extinction, 'ebv', FC['ebv'])
  r.put(extinction, 'ebvError', FC['ebvError'])
  r.put(extinction, 'av', FC['av'])
  r.put(extinction, 'avError', FC['avError'])
  extinction.source = sourceCode === 1 ? 'halpha-hbeta' : sourceCode === 2 ? 'hgamma-hbeta' : null
  extinction.flags = flags.filter((f) => EXTINCTION_FLAGS.has(f))

  const dereddened: Partial<Record<LineId, DereddenedLine>> = {}
  for (let l = 0; l < LINE_COUNT; l++) {
    if (input.kind[l][i] === 0) continue
    const id = LINE_IDS[l]
    const state = r.int(COL_STATE[l])
    const entry: Record<string, unknown> = {}
    if (state === LINE_DETECTED) {
      r.put(entry, 'flux', COL_FLUX[l])
      r.put(entry, 'error', COL_FLUX_ERROR[l])
      // A_λ = k(λ)·E(B−V): percentiles scale with those of E(B−V) (k > 0)
      r.put(entry, 'aLambda', FC['ebv'], prep.k[l])
      if (ebv === null) entry.aLambda = null
    } else if (state === LINE_UPPER_LIMIT) {
      r.put(entry, 'upperLimit', COL_FLUX[l])
    } else continue
    dereddened[id] = entry as DereddenedLine
  }

  const ratios: Record<string, unknown> = {}
  const ratioErrors: Record<string, number | null> = {}
  const ratioLimits: Partial<Record<RatioKey, 'upper' | 'lower'>> = {}
  for (let k = 0; k < RATIO_KEYS.length; k++) {
    const key = RATIO_KEYS[k]
    r.put(ratios, key, COL_RATIO[k])
    ratioErrors[key] = r.num(COL_RATIO_ERROR[k])
    const lim = r.int(COL_RATIO_LIMIT[k])
    if (lim === RATIO_UPPER || lim === RATIO_LOWER) {
      const kind = lim === RATIO_UPPER ? 'upper' : 'lower'
      ratioLimits[key] = kind
      flags.push(ratioLimitFlag(key, kind))
    }
  }

  const subtype = r.int(IC['class.niiSubtype'])
  const classes: ClassesResult = {
    nii: className(r.int(IC['class.nii'])) as NiiClass,
    sii: className(r.int(IC['class.sii'])) as SiiOiClass,
    oi: className(r.int(IC['class.oi'])) as SiiOiClass,
    whan: className(r.int(IC['class.whan'])) as WhanClass,
    overall: className(r.int(IC['class.overall'])) as OverallClass,
    niiSubtype: subtype === CLASS_SEYFERT ? 'seyfert' : subtype === CLASS_LINER ? 'liner' : null,
  }
  if (mc) {
    classes.classProbabilities = {
      nii: probabilities(DIAGRAM_CLASSES.nii, mc.classFractions['class.nii']),
      sii: probabilities(DIAGRAM_CLASSES.sii, mc.classFractions['class.sii']),
      oi: probabilities(DIAGRAM_CLASSES.oi, mc.classFractions['class.oi']),
      whan: probabilities(DIAGRAM_CLASSES.whan, mc.classFractions['class.whan']),
      overall: probabilities(DIAGRAM_CLASSES.overall, mc.classFractions['class.overall']),
    }
  }

  let nii: NiiDistances | null = null
  const nearest = r.int(IC['nii.nearest'])
  if (nearest !== 0) {
    const d: Record<string, unknown> = {}
    for (const key of ['ka03', 'ka03Error', 'ke01', 'ke01Error', 's07', 's07Error']) r.put(d, key, FC[`nii.${key}`])
    d.nearest = nearest === 1 ? 'ka03' : 'ke01'
    r.put(d, 'nearestDistance', FC['nii.nearestDistance'])
    nii = d as NiiDistances
  }
  const seyfertLiner = (diagram: 'sii' | 'oi'): SeyfertLinerDistances | null => {
    if (r.num(FC[`${diagram}.ke01`]) === null) return null
    const d: Record<string, unknown> = {}
    for (const key of ['ke01', 'ke01Error', 'ke06', 'ke06Error']) r.put(d, key, FC[`${diagram}.${key}`])
    d.nearest = 'ke01'
    r.put(d, 'nearestDistance', FC[`${diagram}.ke01`])
    return d as SeyfertLinerDistances
  }

  const densityBlock = (which: 'sii' | 'oii', ratioKey: RatioKey): DensityResult | null => {
    const status = r.int(IC[`density.${which}`])
    if (status === DENSITY_NOT_COMPUTED) return null
    const d: Record<string, unknown> = {}
    r.put(d, 'ne', FC[`density.${which}.ne`])
    r.put(d, 'neError', FC[`density.${which}.neError`])
    r.put(d, 'ratio', FC[`ratio:${ratioKey}`])
    d.ratioError = r.num(FC[`ratioError:${ratioKey}`])
    d.flag = status === 1 ? 'low-density-limit' : status === 2 ? 'high-density-limit' : null
    return d as DensityResult
  }

  const temperatureBlock = (ion: 'oiii' | 'nii'): TemperatureResult | null => {
    const own = flags.filter((f) => f.startsWith('te-') && f.endsWith(`:${ion}`)).map((f) => f.slice(0, -(ion.length + 1)))
    const te = r.num(FC[`te.${ion}`])
    if (te === null && own.length === 0) return null
    const d: Record<string, unknown> = {}
    r.put(d, 'te', FC[`te.${ion}`])
    r.put(d, 'teError', FC[`te.${ion}Error`])
    r.put(d, 'neUsed', FC[`te.${ion}.neUsed`])
    d.flags = own
    return d as TemperatureResult
  }

  const metallicity: Record<string, unknown> = {}
  for (let m = 0; m < METALLICITY_KEYS.length; m++) {
    r.put(metallicity, METALLICITY_KEYS[m], COL_METALLICITY[m])
    r.put(metallicity, METALLICITY_ERROR_KEYS[m], COL_METALLICITY_ERROR[m])
  }
  metallicity.flags = flags.filter((f) => METALLICITY_FLAGS.has(f))

  const kennicutt98 = prep.settings.sfrCalibration === 'kennicutt98'
  const sfr: Record<string, unknown> = {}
  r.put(sfr, 'luminosityDistanceMpc', FC['sfr.dl'])
  r.put(sfr, 'luminosityHalpha', FC['sfr.lHa'])
  r.put(sfr, 'luminosityHalphaError', FC['sfr.lHaError'])
  r.put(sfr, 'sfrHalpha', FC[kennicutt98 ? 'sfr.k98' : 'sfr.ke12'])
  r.put(sfr, 'sfrHalphaError', FC[kennicutt98 ? 'sfr.k98Error' : 'sfr.ke12Error'])
  r.put(sfr, 'sfrK98', FC['sfr.k98'])
  r.put(sfr, 'sfrK98Error', FC['sfr.k98Error'])
  r.put(sfr, 'sfrKe12', FC['sfr.ke12'])
  r.put(sfr, 'sfrKe12Error', FC['sfr.ke12Error'])
  sfr.imf = kennicutt98 ? 'salpeter' : 'kroupa'
  sfr.flags = flags.filter((f) => SFR_FLAGS.has(f))

  let blackHoleMass: BlackHoleResult | null = null
  if (r.num(FC['bh.mass']) !== null) {
    const d: Record<string, unknown> = {}
    r.put(d, 'massSolar', FC['bh.mass'])
    r.put(d, 'log10Mass', FC['bh.log10Mass'])
    r.put(d, 'log10MassError', FC['bh.log10MassError'])
    r.put(d, 'luminosityBroadHalpha', FC['bh.lBroad'])
    d.fwhmKmPerS = input.fwhmBroad[i]
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
    density: { sii: densityBlock('sii', 'siiDoublet'), oii: densityBlock('oii', 'oiiDoublet') },
    temperature: { oiii: temperatureBlock('oiii'), nii: temperatureBlock('nii') },
    metallicity: metallicity as MetallicityResult,
    sfr: sfr as SfrResult,
    blackHoleMass,
    flags: [...new Set(flags)],
  }
}

// ── public entry points ──────────────────────────────────────────────────────────────────────────

function run(galaxies: GalaxyInput[], settings: DiagnosticSettings, prefix: (i: number) => string): GalaxyResult[] {
  validateSettings(settings)
  if (!Array.isArray(galaxies)) throw new ScienceInputError('/', 'galaxies must be an array')
  const prep = prepareSettings(settings)
  const n = galaxies.length
  const input = createKernelInput(n)
  for (let i = 0; i < n; i++) packGalaxy(galaxies[i], settings, input, i, prefix(i))
  const out = createKernelOutput(n)
  runKernel(input, out, prep, { thresholdSnr: true, errors: true })
  const draws = settings.monteCarlo.draws
  const results: GalaxyResult[] = new Array(n)
  for (let i = 0; i < n; i++) {
    const mc = draws > 0 ? monteCarloGalaxy(input, i, out, prep, galaxySeed(settings.monteCarlo.seed, galaxies[i].id), draws) : null
    results[i] = buildResult(galaxies[i], input, i, out, prep, mc)
  }
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

