/**
 * The columnar kernel: the whole deterministic chain for many galaxies at once, Float64Array /
 * Int8Array in and out. `diagnoseGalaxy`, `diagnoseMany`, the Monte Carlo and the benchmark all run
 * through `runKernel`. The kernel holds no formula of its own: every number comes from the public
 * functions of shared/extinction, shared/stats and shared/diagnostics (one implementation, tested
 * there); the kernel decides which of them apply to a row and where their results go (the column
 * layout is `kernel-layout.ts`). Each step reads and writes one row context (`Row`); what differs
 * between ratios, diagrams, doublets and temperature ions is data (the RATIO_*, *_DIAGRAM, DENSITY_*
 * and TEMPERATURE_* specs), not arguments.
 * Inside the kernel NaN is the "no value" sentinel of float columns; `pipeline.ts` turns every NaN
 * into null plus a flag before anything leaves the library.
 */
import { extinctionK } from '../extinction/index.ts'
import { METALLICITY_KEYS } from '../vocabulary/calibrations.ts'
import type { ExtinctionLaw } from '../vocabulary/extinction-laws.ts'
import { flagBit } from '../vocabulary/flags.ts'
import * as __flags from '../vocabulary/flags.ts'
import { LINE_COUNT, LINE_INDEX, LINES } from '../vocabulary/lines.ts'
import {
  fluxWeightedK, linearisedLogVariance, linearisedLogVarianceOfLine, log10Error, relativeErrorOfRatio, relativeErrorOfSum,
} from '../stats/error-propagation.ts'
import * as __error_propagation from '../stats/error-propagation.ts'
import { isDetection, ratioLimitStatus, stateOfSum, upperLimitFromError } from '../stats/limits.ts'
import * as __limits from '../stats/limits.ts'
import {
  balmerCoefficient, colourExcessError, colourExcessFromBalmerRaw, colourExcessFromHgammaRaw, dereddeningFactor,
  INTRINSIC_HGAMMA_HBETA_CASE_B,
} from './balmer-decrement.ts'
import { blackHoleLog10MassError, blackHoleMassGreeneHo05 } from './black-hole.ts'
import { classifyNiiPoint, classifyOiPoint, classifySiiPoint, classProvenByLimits, niiSubtypeOfPoint, overallClass } from './bpt.ts'
import * as __classes from '../vocabulary/classes.ts'
import {
  distanceErrorAlongNormal, isBelowHyperbola, KA03, KA03_KE01_CROSSING_X, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, S07_NII,
  signedDistanceToHyperbola, signedDistanceToLine, signedDistanceToLineError, type HyperbolaCurve, type StraightLine,
} from './demarcation.ts'
import {
  DENSITY_LOW_LIMIT, DENSITY_OK, densityRangeStatus, densityRatioDerivative, electronDensityFromDoubletRatio, SANDERS16_OII,
  SANDERS16_SII, type DoubletFit,
} from './density.ts'
import * as __layout from './kernel-layout.ts'
import { createLuminosityDistanceCache, lineLuminosity, sfrKennicutt98, sfrKennicuttEvans12 } from './luminosity.ts'
import * as __metallicity from './metallicity.ts'
import { METALLICITY_CALIBRATIONS, n2Index, n2s2haIndex, o3n2Index } from './metallicity.ts'
import {
  doubletSumFromStrongLine, NII_6584_TO_6548, NII_TEMPERATURE_MODEL, OIII_5007_TO_4959, OIII_TEMPERATURE_MODEL, temperatureError,
  temperatureWithDensityIteration, type TemperatureRatioModel, type TemperatureSolution,
} from './temperature.ts'
import * as __whan from './whan.ts'
import { whanClass } from './whan.ts'
import type { DiagnosticSettings, RatioKey } from './types.ts'
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const FLAG_WORDS = __flags.FLAG_WORDS
const ROLE_DUST_DENOMINATOR = __error_propagation.ROLE_DUST_DENOMINATOR
const ROLE_DUST_NUMERATOR = __error_propagation.ROLE_DUST_NUMERATOR
const ROLE_OTHER = __error_propagation.ROLE_OTHER
const CLASS_AGN = __classes.CLASS_AGN
const CLASS_STAR_FORMING = __classes.CLASS_STAR_FORMING
const CLASS_UNCLASSIFIED = __classes.CLASS_UNCLASSIFIED
const LINE_ABSENT = __limits.LINE_ABSENT
const LINE_DETECTED = __limits.LINE_DETECTED
const LINE_NONPOSITIVE = __limits.LINE_NONPOSITIVE
const LINE_UPPER_LIMIT = __limits.LINE_UPPER_LIMIT
const RATIO_EXACT = __limits.RATIO_EXACT
const RATIO_NONE = __limits.RATIO_NONE
const FLOAT = __layout.FLOAT
const INT = __layout.INT
const FLOAT_COLUMN_COUNT = __layout.FLOAT_COLUMN_COUNT
const INT_COLUMN_COUNT = __layout.INT_COLUMN_COUNT
const RATIO_COUNT = __layout.RATIO_COUNT
const DENSITY_NOT_COMPUTED = __layout.DENSITY_NOT_COMPUTED
const D16_NII_HA_WEIGHT = __metallicity.D16_NII_HA_WEIGHT
const WHAN_PASSIVE_MAX_EW = __whan.WHAN.passiveMaxEw

// ── line and ratio indices (kernel column order = LINES, RATIO_KEYS) ────────────────────────────
const HA = LINE_INDEX.halpha, HB = LINE_INDEX.hbeta, HG = LINE_INDEX.hgamma
const O3_5007 = LINE_INDEX.oiii_5007, O3_4959 = LINE_INDEX.oiii_4959, O3_4363 = LINE_INDEX.oiii_4363
const N2_6584 = LINE_INDEX.nii_6584, N2_6548 = LINE_INDEX.nii_6548, N2_5755 = LINE_INDEX.nii_5755
const S2_6717 = LINE_INDEX.sii_6717, S2_6731 = LINE_INDEX.sii_6731, O1_6300 = LINE_INDEX.oi_6300
const O2_3726 = LINE_INDEX.oii_3726, O2_3729 = LINE_INDEX.oii_3729, HA_BROAD = LINE_INDEX.halpha_broad
const R_NII = __layout.RATIO_INDEX.niiHa, R_OIII = __layout.RATIO_INDEX.oiiiHb, R_SII = __layout.RATIO_INDEX.siiHa
const R_OI = __layout.RATIO_INDEX.oiHa, R_SIID = __layout.RATIO_INDEX.siiDoublet, R_OIID = __layout.RATIO_INDEX.oiiDoublet

/** Flag words per row: FLAG_WORDS fixed-flag words, then one word with the `below-min-snr` line bits. */
export const FLAG_STRIDE = FLAG_WORDS + 1

// bit numbers of the fixed flags used below
const B = (name: string) => flagBit(name)
const FB = {
  belowIntrinsic: B('balmer-below-intrinsic'), fromHgamma: B('balmer-from-hgamma'), noDecrement: B('no-balmer-decrement'),
  nonpositiveBalmer: B('nonpositive-flux:balmer'), crossing: B('curve-crossing-region'),
  whanNeedsEw: B('whan-needs-ew-halpha'), whanPassiveNeedsNii: B('whan-passive-needs-ew-nii'),
  whanMissing: B('missing-line:whan'), whanNotDecisive: B('limit-not-decisive:whan'), whanNonpositive: B('nonpositive-flux:whan'),
  overallNeedsNii: B('overall-needs-nii'), overallWithoutSii: B('overall-without-sii'), overallWithoutOi: B('overall-without-oi'),
  overallNiiOnly: B('overall-from-nii-only'), subtypeNotDecisive: B('limit-not-decisive:nii-subtype'),
  metNotSf: B('metallicity-not-star-forming'), sfrNotSf: B('sfr-not-star-forming'), sfrNotDered: B('sfr-not-dereddened'),
  sfrNeedsHa: B('sfr-needs-halpha'), needsZ: B('luminosity-needs-redshift'),
  metOut: METALLICITY_KEYS.map((k) => B(`${k}-out-of-range`)),
  metNeeds: METALLICITY_KEYS.map((k) => B(`${k}-needs-detections`)),
  bhNeedsFwhm: B('black-hole-needs-fwhm'), bhNeedsZ: B('black-hole-needs-redshift'), bhLimit: B('black-hole-broad-halpha-limit'),
}

// ── inputs, settings, outputs ──────────────────────────────────────────────────────────────────

/**
 * Columnar galaxy input. `kind[l][i]`: 0 absent, 1 a measured flux `value` ± `error`, 2 an upper limit
 * `value`. Absent optional numbers are NaN.
 */
export interface KernelInput {
  n: number
  kind: Int8Array[]
  value: Float64Array[]
  error: Float64Array[]
  redshift: Float64Array
  fluxUnit: Float64Array
  ewHalpha: Float64Array
  ewNii: Float64Array
  fwhmBroad: Float64Array
}

/** Allocate an empty columnar input of n rows (every line absent, optional numbers NaN, fluxUnit 1). */
export function createKernelInput(n: number): KernelInput {
  const nan = () => new Float64Array(n).fill(NaN)
  return {
    n,
    kind: LINES.map(() => new Int8Array(n)),
    value: LINES.map(() => new Float64Array(n)),
    error: LINES.map(() => new Float64Array(n)),
    redshift: nan(), fluxUnit: new Float64Array(n).fill(1), ewHalpha: nan(), ewNii: nan(), fwhmBroad: nan(),
  }
}

/** Kernel output: row-major float, int8 and flag matrices (columns: `FLOAT`, `INT` of kernel-layout.ts). */
export interface KernelOutput {
  n: number
  float: Float64Array
  int: Int8Array
  flags: Uint32Array
}

/** Allocate an output buffer for n rows (reusable across calls of the same or smaller n). */
export function createKernelOutput(n: number): KernelOutput {
  return {
    n,
    float: new Float64Array(n * FLOAT_COLUMN_COUNT),
    int: new Int8Array(n * INT_COLUMN_COUNT),
    flags: new Uint32Array(n * FLAG_STRIDE),
  }
}

/** A k(λ) outside a law's range for a line of the public API; the server maps it to a 422 naming both. */
export class ExtinctionRangeError extends RangeError {
  readonly line: string
  readonly law: ExtinctionLaw
  constructor(line: string, law: ExtinctionLaw, cause: RangeError) {
    super(`line ${line} is outside the valid range of the ${law} extinction law: ${cause.message}`)
    this.name = 'ExtinctionRangeError'
    this.line = line
    this.law = law
  }
}

/** Per-settings precomputation shared by every galaxy of a batch. */
export interface PreparedSettings {
  settings: DiagnosticSettings
  /** k(λ) of every line (kernel order), mag/mag */
  k: Float64Array
  /** 2.5/(k(Hβ) − k(Hα)) and 2.5/(k(Hγ) − k(Hβ)) */
  cHaHb: number
  cHgHb: number
  /** memoised D_L(z) in Mpc */
  luminosityDistance: (z: number) => number
}

/**
 * Precompute k(λ) for every line and the D_L cache for one set of assumptions.
 * @throws {ExtinctionRangeError} when a line falls outside the law's range
 */
export function prepareSettings(settings: DiagnosticSettings): PreparedSettings {
  const k = new Float64Array(LINE_COUNT)
  for (let l = 0; l < LINE_COUNT; l++) {
    try {
      k[l] = extinctionK(settings.extinctionLaw, LINES[l].airAngstrom, settings.rv)
    } catch (e) {
      if (e instanceof RangeError) throw new ExtinctionRangeError(LINES[l].id, settings.extinctionLaw, e)
      throw e
    }
  }
  return {
    settings,
    k,
    cHaHb: balmerCoefficient(k[HB], k[HA]),
    cHgHb: balmerCoefficient(k[HG], k[HB]),
    luminosityDistance: createLuminosityDistanceCache(settings.cosmology.h0, settings.cosmology.omegaM),
  }
}

/** How a kernel run treats its input (deterministic run or Monte Carlo draws). */
export interface KernelOptions {
  /**
   * true (deterministic runs): measured lines with F/σ < minSnr become upper limits minSnr·σ.
   * false (Monte Carlo draws): states are already fixed; a measured flux ≤ 0 makes its ratios undefined.
   */
  thresholdSnr: boolean
  /** compute first-order errors (off for Monte Carlo draws, whose spread is the error) */
  errors: boolean
}

// ── the row context ──────────────────────────────────────────────────────────────────────────────

/**
 * One row's inputs after thresholding, the intermediate values later steps read (dust, ratios, the
 * overall class, D_L) and where its outputs go. The kernel is synchronous, so one instance serves
 * every row of every run and a row allocates nothing.
 */
class Row {
  // the run
  prep!: PreparedSettings
  k: Float64Array = new Float64Array(LINE_COUNT)
  thresholdSnr = true
  withErrors = true
  // where this row's outputs go: its slices of the three matrices start at fo, io and bo
  float: Float64Array = new Float64Array(0)
  int: Int8Array = new Int8Array(0)
  flags: Uint32Array = new Uint32Array(0)
  fo = 0
  io = 0
  bo = 0
  // the row's inputs besides the lines
  redshift = NaN
  fluxUnit = 1
  ewHalpha = NaN
  ewNii = NaN
  fwhmBroad = NaN
  // lines after thresholding (LINES order)
  readonly state = new Int8Array(LINE_COUNT)
  /** observed flux, or the upper limit; NaN when absent */
  readonly flux = new Float64Array(LINE_COUNT)
  /** σ/F of detected lines */
  readonly rel = new Float64Array(LINE_COUNT)
  /** dereddened flux or limit; NaN for other states */
  readonly dered = new Float64Array(LINE_COUNT)
  // observed ratios (RATIO_KEYS order): value, RATIO_* state, first-order error
  readonly ratio = new Float64Array(RATIO_COUNT)
  readonly ratioState = new Int8Array(RATIO_COUNT)
  readonly ratioError = new Float64Array(RATIO_COUNT)
  // dust: the E(B−V) applied (≥ 0) and what its error depends on
  source = 0
  ebv = 0
  /** 2.5/Δk of the Balmer pair when E(B−V) > 0 depends on the fluxes, else 0 */
  dustC = 0
  /** lines of the Balmer ratio (ROLE_DUST_NUMERATOR, ROLE_DUST_DENOMINATOR), −1 without one */
  dustNumerator = -1
  dustDenominator = -1
  relD1 = 0
  relD2 = 0
  overall = CLASS_UNCLASSIFIED
  luminosityDistance = NaN
  // scratch: the terms of a linearised combination, a curve normal, a T_e solution
  readonly coefficient = new Float64Array(4)
  readonly termRelative = new Float64Array(4)
  readonly termRole = new Float64Array(4)
  readonly termK = new Float64Array(4)
  readonly normal = new Float64Array(3)
  readonly te: TemperatureSolution = { temperatureK: null, neCm3: 0, densityAssumed: false }

  start(out: KernelOutput, prep: PreparedSettings, options: KernelOptions): void {
    this.prep = prep
    this.k = prep.k
    this.thresholdSnr = options.thresholdSnr
    this.withErrors = options.errors
    this.float = out.float
    this.int = out.int
    this.flags = out.flags
  }

  /** Direct the outputs to output row o. */
  at(o: number): void {
    this.fo = o * FLOAT_COLUMN_COUNT
    this.io = o * INT_COLUMN_COUNT
    this.bo = o * FLAG_STRIDE
  }

  set(column: number, value: number): void {
    this.float[this.fo + column] = value
  }

  setInt(column: number, value: number): void {
    this.int[this.io + column] = value
  }

  flag(bit: number): void {
    this.flags[this.bo + (bit >>> 5)] |= 1 << (bit & 31)
  }

  role(line: number): number {
    return line === this.dustNumerator ? ROLE_DUST_NUMERATOR : line === this.dustDenominator ? ROLE_DUST_DENOMINATOR : ROLE_OTHER
  }

  /** Var(ln F_corr) of one dereddened line (shared/science/README.md §9). */
  lineLogVariance(line: number): number {
    return linearisedLogVarianceOfLine(this.rel[line], this.role(line), this.k[line], this.dustC, this.relD1, this.relD2)
  }

  /** Term j of a linearised combination: coefficient a on ln F_corr of one line. */
  term(j: number, line: number, a: number): void {
    this.coefficient[j] = a
    this.termRelative[j] = this.rel[line]
    this.termRole[j] = this.role(line)
    this.termK[j] = this.k[line]
  }

  /** Term j on a summed pseudo-line with its own σ/F and k (never a dust line). */
  sumTerm(j: number, a: number, relative: number, k: number): void {
    this.coefficient[j] = a
    this.termRelative[j] = relative
    this.termRole[j] = ROLE_OTHER
    this.termK[j] = k
  }

  /** Var of the combination of terms 0 … n−1 (shared/science/README.md §9). */
  combinationLogVariance(n: number): number {
    return linearisedLogVariance(n, this.coefficient, this.termRelative, this.termRole, this.termK, this.dustC, this.relD1, this.relD2)
  }
}

const row = new Row()

/**
 * Run the deterministic chain on input rows [start, end) into output rows [0, end − start) (see the
 * file comment and shared/science/README.md for every step). `out.n` must be ≥ end − start.
 */
export function runKernel(
  input: KernelInput, out: KernelOutput, prep: PreparedSettings, options: KernelOptions, start = 0, end = input.n,
): void {
  const n = end - start
  if (!(n >= 0) || start < 0 || end > input.n) throw new RangeError(`runKernel: bad row range [${start}, ${end}) of ${input.n}`)
  if (out.n < n) throw new RangeError(`runKernel: output has ${out.n} rows, needs ${n}`)
  out.float.fill(NaN, 0, n * FLOAT_COLUMN_COUNT)
  out.int.fill(0, 0, n * INT_COLUMN_COUNT)
  out.flags.fill(0, 0, n * FLAG_STRIDE)
  const r = row
  r.start(out, prep, options)
  for (let i = start; i < end; i++) {
    r.at(i - start)
    kernelRow(r, input, i)
  }
}

// The chain for one row (shared/science/README.md §1–§9, in this order).
function kernelRow(r: Row, input: KernelInput, i: number): void {
  readRow(r, input, i)
  dust(r)
  deredden(r)
  formRatio(r, RATIO_NII)
  formRatio(r, RATIO_OIII)
  formRatio(r, RATIO_SII)
  formRatio(r, RATIO_OI)
  formRatio(r, RATIO_SII_DOUBLET)
  formRatio(r, RATIO_OII_DOUBLET)
  classify(r)
  distances(r)
  const siiRatioForTe = density(r, DENSITY_SII)
  density(r, DENSITY_OII)
  temperature(r, TEMPERATURE_OIII, siiRatioForTe)
  temperature(r, TEMPERATURE_NII, siiRatioForTe)
  metallicity(r)
  luminosity(r)
  blackHole(r)
}

// ── 1. line states (shared/science/README.md §9) ─────────────────────────────────────────────────

function readRow(r: Row, input: KernelInput, i: number): void {
  const minSnr = r.prep.settings.minSnr
  const threshold = r.thresholdSnr
  const states = r.state
  const flux = r.flux
  const rel = r.rel
  const stateColumns = INT.state
  let belowSnr = 0
  for (let l = 0; l < LINE_COUNT; l++) {
    const kind = input.kind[l][i]
    let state = LINE_ABSENT
    flux[l] = NaN
    if (kind === 1) {
      const v = input.value[l][i]
      const e = input.error[l][i]
      if (threshold) {
        if (isDetection(v, e, minSnr)) {
          state = LINE_DETECTED
          flux[l] = v
          rel[l] = e / v
        } else {
          state = LINE_UPPER_LIMIT
          flux[l] = upperLimitFromError(e, minSnr)
          belowSnr |= 1 << l
        }
      } else if (v > 0) {
        state = LINE_DETECTED
        flux[l] = v
        rel[l] = e / v
      } else {
        state = LINE_NONPOSITIVE
        flux[l] = v
      }
    } else if (kind === 2) {
      state = LINE_UPPER_LIMIT
      flux[l] = input.value[l][i]
    }
    states[l] = state
    r.setInt(stateColumns[l], state)
  }
  r.flags[r.bo + FLAG_WORDS] = belowSnr
  r.redshift = input.redshift[i]
  r.fluxUnit = input.fluxUnit[i]
  r.ewHalpha = input.ewHalpha[i]
  r.ewNii = input.ewNii[i]
  r.fwhmBroad = input.fwhmBroad[i]
}

// ── 2. dust (shared/science/README.md §1.2) ──────────────────────────────────────────────────────

function dust(r: Row): void {
  const prep = r.prep
  const k = r.k
  const st = r.state
  const fl = r.flux
  const rel = r.rel
  let raw = NaN
  let c = 0
  r.source = 0
  r.ebv = 0
  r.dustC = 0
  r.dustNumerator = -1
  r.dustDenominator = -1
  if (st[HA] === LINE_DETECTED && st[HB] === LINE_DETECTED) {
    const decrement = fl[HA] / fl[HB]
    raw = colourExcessFromBalmerRaw(decrement, prep.settings.intrinsicBalmer, k[HB], k[HA])
    c = prep.cHaHb
    r.dustNumerator = HA
    r.dustDenominator = HB
    r.source = 1
    r.set(FLOAT.balmerDecrement, decrement)
    if (r.withErrors) r.set(FLOAT.balmerDecrementError, decrement * relativeErrorOfRatio(rel[HA], rel[HB]))
  } else if (st[HA] !== LINE_DETECTED && st[HG] === LINE_DETECTED && st[HB] === LINE_DETECTED) {
    const ratio = fl[HG] / fl[HB]
    raw = colourExcessFromHgammaRaw(ratio, INTRINSIC_HGAMMA_HBETA_CASE_B, k[HG], k[HB])
    c = prep.cHgHb
    r.dustNumerator = HB
    r.dustDenominator = HG
    r.source = 2
    r.flag(FB.fromHgamma)
    r.set(FLOAT.balmerDecrement, ratio)
    if (r.withErrors) r.set(FLOAT.balmerDecrementError, ratio * relativeErrorOfRatio(rel[HG], rel[HB]))
  } else {
    r.flag(FB.noDecrement)
    if (st[HA] === LINE_NONPOSITIVE || st[HB] === LINE_NONPOSITIVE) r.flag(FB.nonpositiveBalmer)
  }
  r.setInt(INT.source, r.source)
  const d1 = r.dustNumerator
  const d2 = r.dustDenominator
  if (r.source !== 0) {
    // below the intrinsic ratio: no correction, and the error of the unclipped estimate is kept
    if (raw >= 0) {
      r.ebv = raw
      r.dustC = c
    } else r.flag(FB.belowIntrinsic)
    const rv = prep.settings.rv
    r.set(FLOAT.ebv, r.ebv)
    r.set(FLOAT.av, rv * r.ebv)
    if (r.withErrors) {
      // the denominator line of the pair is the bluer one (Hβ of Hα/Hβ, Hγ of Hβ/Hγ)
      const e = colourExcessError(k[d2], k[d1], rel[d2], rel[d1])
      r.set(FLOAT.ebvError, e)
      r.set(FLOAT.avError, rv * e)
    }
  }
  r.relD1 = d1 >= 0 ? rel[d1] : 0
  r.relD2 = d2 >= 0 ? rel[d2] : 0
}

// ── 3. dereddened fluxes (shared/science/README.md §1.2, §9) ────────────────────────────────────

function deredden(r: Row): void {
  const ebv = r.ebv
  const states = r.state
  const flux = r.flux
  const dered = r.dered
  const k = r.k
  const withErrors = r.withErrors
  const fluxColumns = FLOAT.flux
  const errorColumns = FLOAT.fluxError
  for (let l = 0; l < LINE_COUNT; l++) {
    const state = states[l]
    if (state === LINE_DETECTED || state === LINE_UPPER_LIMIT) {
      // E(B−V) = 0 needs no exp (rows without a usable decrement)
      const v = flux[l] * (ebv > 0 ? dereddeningFactor(k[l], ebv) : 1)
      dered[l] = v
      r.set(fluxColumns[l], v)
      if (withErrors && state === LINE_DETECTED) r.set(errorColumns[l], v * Math.sqrt(r.lineLogVariance(l)))
    } else dered[l] = NaN
  }
}

// ── 4. observed ratios (public API `ratios`; shared/science/README.md §2.1, §9) ──────────────────

/** A ratio of two lines, or of the sum of two lines over one line, and where it goes. */
interface RatioSpec {
  /** ratio index (RATIO_KEYS order) */
  index: number
  numerator: number
  /** second line added to the numerator, or −1 */
  plus: number
  denominator: number
  /** log10 (the diagram ratios) or linear (the doublets) */
  logarithmic: boolean
  /** FLOAT columns of the value and its error, INT column of the limit status */
  value: number
  error: number
  limit: number
}

type RatioLines = Pick<RatioSpec, 'numerator' | 'plus' | 'denominator' | 'logarithmic'>
// every spec is built by this one literal, so the steps see a single object shape
const ratioSpec = (key: RatioKey, lines: RatioLines): RatioSpec => {
  const index = __layout.RATIO_INDEX[key]
  return {
    index, numerator: lines.numerator, plus: lines.plus, denominator: lines.denominator, logarithmic: lines.logarithmic,
    value: FLOAT.ratio[index], error: FLOAT.ratioError[index], limit: INT.limit[index],
  }
}
const RATIO_NII = ratioSpec('niiHa', { numerator: N2_6584, plus: -1, denominator: HA, logarithmic: true })
const RATIO_OIII = ratioSpec('oiiiHb', { numerator: O3_5007, plus: -1, denominator: HB, logarithmic: true })
const RATIO_SII = ratioSpec('siiHa', { numerator: S2_6717, plus: S2_6731, denominator: HA, logarithmic: true })
const RATIO_OI = ratioSpec('oiHa', { numerator: O1_6300, plus: -1, denominator: HA, logarithmic: true })
const RATIO_SII_DOUBLET = ratioSpec('siiDoublet', { numerator: S2_6717, plus: -1, denominator: S2_6731, logarithmic: false })
const RATIO_OII_DOUBLET = ratioSpec('oiiDoublet', { numerator: O2_3729, plus: -1, denominator: O2_3726, logarithmic: false })

function formRatio(r: Row, spec: RatioSpec): void {
  const st = r.state
  const fl = r.flux
  const rel = r.rel
  const a = spec.numerator
  const b = spec.plus
  const d = spec.denominator
  const q = spec.index
  let numeratorState: number
  let numerator: number
  let numeratorRel = 0
  if (b < 0) {
    numeratorState = st[a]
    numerator = fl[a]
    numeratorRel = rel[a]
  } else {
    numeratorState = stateOfSum(st[a], st[b])
    numerator = fl[a] + fl[b]
    if (numeratorState === LINE_DETECTED) numeratorRel = relativeErrorOfSum(fl[a], rel[a], fl[b], rel[b])
  }
  const status = ratioLimitStatus(numeratorState, st[d])
  r.ratioState[q] = status
  r.setInt(spec.limit, status)
  if (status === RATIO_NONE) {
    r.ratio[q] = NaN
    r.ratioError[q] = NaN
    return
  }
  const value = numerator / fl[d]
  const x = spec.logarithmic ? Math.log10(value) : value
  r.ratio[q] = x
  r.set(spec.value, x)
  if (status === RATIO_EXACT) {
    const relative = relativeErrorOfRatio(numeratorRel, rel[d])
    const e = spec.logarithmic ? log10Error(relative) : value * relative
    r.ratioError[q] = e
    if (r.withErrors) r.set(spec.error, e)
  } else r.ratioError[q] = NaN
}

// ── 5. classes (shared/science/README.md §2.3–2.5, §9) ─────────────────────────────────────────

/** One line-ratio diagram with y = log([O III]/Hβ). */
interface DiagramSpec {
  /** ratio index of x */
  x: number
  /** class of the point at face value (bpt.ts) */
  classify: (x: number, y: number) => number
  /** INT column of the class */
  column: number
  /** lines whose non-positive draw explains a missing class */
  lines: readonly number[]
  /** hyperbolas whose asymptote a classified point may lie beyond, and the flag bit for each */
  asymptotes: readonly HyperbolaCurve[]
  asymptoteFlags: readonly number[]
  missingFlag: number
  notDecisiveFlag: number
  nonpositiveFlag: number
}

interface DiagramParts {
  x: number
  classify: (x: number, y: number) => number
  column: number
  lines: readonly number[]
  /** the curves by the name their `beyond-asymptote:<diagram>-<curve>` flag uses */
  asymptotes: Readonly<Record<string, HyperbolaCurve>>
}
// the flag bits follow from the diagram's key (shared/flags.ts)
const diagramSpec = (key: 'nii' | 'sii' | 'oi', parts: DiagramParts): DiagramSpec => ({
  x: parts.x, classify: parts.classify, column: parts.column, lines: parts.lines,
  asymptotes: Object.values(parts.asymptotes),
  asymptoteFlags: Object.keys(parts.asymptotes).map((curve) => B(`beyond-asymptote:${key}-${curve}`)),
  missingFlag: B(`missing-line:${key}`), notDecisiveFlag: B(`limit-not-decisive:${key}`), nonpositiveFlag: B(`nonpositive-flux:${key}`),
})
const NII_DIAGRAM = diagramSpec('nii', {
  x: R_NII, classify: classifyNiiPoint, column: INT.classNii, lines: [N2_6584, HA, O3_5007, HB], asymptotes: { ka03: KA03, ke01: KE01_NII },
})
const SII_DIAGRAM = diagramSpec('sii', {
  x: R_SII, classify: classifySiiPoint, column: INT.classSii, lines: [S2_6717, HA, O3_5007, HB, S2_6731], asymptotes: { ke01: KE01_SII },
})
const OI_DIAGRAM = diagramSpec('oi', {
  x: R_OI, classify: classifyOiPoint, column: INT.classOi, lines: [O1_6300, HA, O3_5007, HB], asymptotes: { ke01: KE01_OI },
})

// Class of one diagram from (x, y) with limit states; flags why a point is unclassified.
function diagramClass(r: Row, spec: DiagramSpec): number {
  const xState = r.ratioState[spec.x]
  const yState = r.ratioState[R_OIII]
  let cls = CLASS_UNCLASSIFIED
  if (xState === RATIO_NONE || yState === RATIO_NONE) {
    let nonpositive = false
    for (let j = 0; j < spec.lines.length; j++) if (r.state[spec.lines[j]] === LINE_NONPOSITIVE) nonpositive = true
    r.flag(nonpositive ? spec.nonpositiveFlag : spec.missingFlag)
  } else {
    const x = r.ratio[spec.x]
    cls = classProvenByLimits(spec.classify(x, r.ratio[R_OIII]), xState, yState)
    if (cls === CLASS_UNCLASSIFIED) r.flag(spec.notDecisiveFlag)
    else for (let j = 0; j < spec.asymptotes.length; j++) if (x >= spec.asymptotes[j].x0) r.flag(spec.asymptoteFlags[j])
  }
  r.setInt(spec.column, cls)
  return cls
}

function whanDiagram(r: Row): number {
  const ewHalpha = r.ewHalpha
  let whan = CLASS_UNCLASSIFIED
  if (!(ewHalpha === ewHalpha)) r.flag(FB.whanNeedsEw)
  else {
    const xState = r.ratioState[R_NII]
    whan = whanClass(r.ratio[R_NII], xState, ewHalpha, r.ewNii)
    if (ewHalpha < WHAN_PASSIVE_MAX_EW && !(r.ewNii === r.ewNii)) r.flag(FB.whanPassiveNeedsNii)
    if (whan === CLASS_UNCLASSIFIED) {
      if (xState !== RATIO_NONE) r.flag(FB.whanNotDecisive)
      else r.flag(r.state[N2_6584] === LINE_NONPOSITIVE || r.state[HA] === LINE_NONPOSITIVE ? FB.whanNonpositive : FB.whanMissing)
    }
  }
  r.setInt(INT.classWhan, whan)
  return whan
}

function classify(r: Row): void {
  const nii = diagramClass(r, NII_DIAGRAM)
  let subtype = CLASS_UNCLASSIFIED
  if (nii !== CLASS_UNCLASSIFIED) {
    const x = r.ratio[R_NII]
    const y = r.ratio[R_OIII]
    // left of the Ka03/Ke01 crossing, a star-forming point on or above Ke01 lies between them (§2.2)
    if (nii === CLASS_STAR_FORMING && x < KA03_KE01_CROSSING_X && !isBelowHyperbola(KE01_NII, x, y)) r.flag(FB.crossing)
    if (nii === CLASS_AGN) subtype = classProvenByLimits(niiSubtypeOfPoint(x, y), r.ratioState[R_NII], r.ratioState[R_OIII])
  }
  const sii = diagramClass(r, SII_DIAGRAM)
  const oi = diagramClass(r, OI_DIAGRAM)
  whanDiagram(r)
  const overall = overallClass(nii, sii, oi, subtype)
  if (nii === CLASS_UNCLASSIFIED) r.flag(FB.overallNeedsNii)
  else if (sii === CLASS_UNCLASSIFIED && oi === CLASS_UNCLASSIFIED) {
    r.flag(FB.overallNiiOnly)
    if (nii === CLASS_AGN && subtype === CLASS_UNCLASSIFIED) r.flag(FB.subtypeNotDecisive)
  } else if (sii === CLASS_UNCLASSIFIED) r.flag(FB.overallWithoutSii)
  else if (oi === CLASS_UNCLASSIFIED) r.flag(FB.overallWithoutOi)
  r.setInt(INT.classOverall, overall)
  r.setInt(INT.niiSubtype, subtype)
  r.overall = overall
}

// ── distances to the demarcation lines (shared/science/README.md §2.6): measured points only ────

interface CurveDistance { curve: HyperbolaCurve; value: number; error: number }
interface LineDistance { line: StraightLine; value: number; error: number }

const NII_KA03: CurveDistance = { curve: KA03, value: FLOAT.niiKa03, error: FLOAT.niiKa03Error }
const NII_KE01: CurveDistance = { curve: KE01_NII, value: FLOAT.niiKe01, error: FLOAT.niiKe01Error }
const NII_S07: LineDistance = { line: S07_NII, value: FLOAT.niiS07, error: FLOAT.niiS07Error }
const SII_KE01: CurveDistance = { curve: KE01_SII, value: FLOAT.siiKe01, error: FLOAT.siiKe01Error }
const SII_KE06: LineDistance = { line: KE06_SII, value: FLOAT.siiKe06, error: FLOAT.siiKe06Error }
const OI_KE01: CurveDistance = { curve: KE01_OI, value: FLOAT.oiKe01, error: FLOAT.oiKe01Error }
const OI_KE06: LineDistance = { line: KE06_OI, value: FLOAT.oiKe06, error: FLOAT.oiKe06Error }

// Distance of (ratio q, [O III]/Hβ) to a hyperbola, with its error along the normal.
function curveDistance(r: Row, spec: CurveDistance, q: number): number {
  const n = r.normal
  const d = signedDistanceToHyperbola(spec.curve, r.ratio[q], r.ratio[R_OIII], n)
  r.set(spec.value, d)
  if (r.withErrors) r.set(spec.error, distanceErrorAlongNormal(n[1], n[2], r.ratioError[q], r.ratioError[R_OIII]))
  return d
}

function lineDistance(r: Row, spec: LineDistance, q: number): void {
  r.set(spec.value, signedDistanceToLine(spec.line, r.ratio[q], r.ratio[R_OIII]))
  if (r.withErrors) r.set(spec.error, signedDistanceToLineError(spec.line, r.ratioError[q], r.ratioError[R_OIII]))
}

function distances(r: Row): void {
  if (r.ratioState[R_OIII] !== RATIO_EXACT) return
  if (r.ratioState[R_NII] === RATIO_EXACT) {
    const dKa = curveDistance(r, NII_KA03, R_NII)
    const dKe = curveDistance(r, NII_KE01, R_NII)
    lineDistance(r, NII_S07, R_NII)
    const nearKa = Math.abs(dKa) <= Math.abs(dKe)
    r.setInt(INT.niiNearest, nearKa ? 1 : 2)
    r.set(FLOAT.niiNearestDistance, nearKa ? dKa : dKe)
  }
  if (r.ratioState[R_SII] === RATIO_EXACT) {
    curveDistance(r, SII_KE01, R_SII)
    lineDistance(r, SII_KE06, R_SII)
  }
  if (r.ratioState[R_OI] === RATIO_EXACT) {
    curveDistance(r, OI_KE01, R_OI)
    lineDistance(r, OI_KE06, R_OI)
  }
}

// ── 6. density from observed doublets (shared/science/README.md §3) ─────────────────────────────

interface DensitySpec {
  fit: DoubletFit
  numerator: number
  denominator: number
  /** ratio index of the doublet */
  ratio: number
  /** FLOAT columns of n_e and its error, INT column of the status */
  ne: number
  neError: number
  status: number
  needsFlag: number
  lowFlag: number
  highFlag: number
}

type DensityParts = Omit<DensitySpec, 'needsFlag' | 'lowFlag' | 'highFlag'>
// the flag bits follow from the ion (shared/flags.ts)
const densitySpec = (ion: 'sii' | 'oii', p: DensityParts): DensitySpec => ({
  fit: p.fit, numerator: p.numerator, denominator: p.denominator, ratio: p.ratio, ne: p.ne, neError: p.neError, status: p.status,
  needsFlag: B(`density-needs-lines:${ion}`), lowFlag: B(`low-density-limit:${ion}`), highFlag: B(`high-density-limit:${ion}`),
})
const DENSITY_SII = densitySpec('sii', {
  fit: SANDERS16_SII, numerator: S2_6717, denominator: S2_6731, ratio: R_SIID, ne: FLOAT.neSii, neError: FLOAT.neSiiError, status: INT.densitySii,
})
const DENSITY_OII = densitySpec('oii', {
  fit: SANDERS16_OII, numerator: O2_3729, denominator: O2_3726, ratio: R_OIID, ne: FLOAT.neOii, neError: FLOAT.neOiiError, status: INT.densityOii,
})

// Returns the observed ratio usable for the T_e iteration (NaN unless within the fit's range).
function density(r: Row, spec: DensitySpec): number {
  const st = r.state
  if (st[spec.numerator] !== LINE_DETECTED || st[spec.denominator] !== LINE_DETECTED) {
    r.setInt(spec.status, DENSITY_NOT_COMPUTED)
    if (st[spec.numerator] !== LINE_ABSENT || st[spec.denominator] !== LINE_ABSENT) r.flag(spec.needsFlag)
    return NaN
  }
  const R = r.ratio[spec.ratio]
  const status = densityRangeStatus(spec.fit, R)
  r.setInt(spec.status, status)
  if (status !== DENSITY_OK) {
    r.flag(status === DENSITY_LOW_LIMIT ? spec.lowFlag : spec.highFlag)
    return NaN
  }
  const t = r.prep.settings.electronTemperature
  r.set(spec.ne, electronDensityFromDoubletRatio(spec.fit, R, t))
  if (r.withErrors) r.set(spec.neError, densityRatioDerivative(spec.fit, R, t) * r.ratioError[spec.ratio])
  return R
}

// ── 7. temperatures from dereddened fluxes (shared/science/README.md §4) ────────────────────────

interface TemperatureSpec {
  model: TemperatureRatioModel
  strong: number
  weak: number
  auroral: number
  /** fixed strong/weak ratio used when the weak line is missing */
  strongToWeak: number
  /** FLOAT columns of T_e, its error and the n_e used */
  te: number
  teError: number
  neUsed: number
  needsFlag: number
  upperFlag: number
  assumedFlag: number
  fixedFlag: number
  outFlag: number
}

type TemperatureParts = Omit<TemperatureSpec, 'needsFlag' | 'upperFlag' | 'assumedFlag' | 'fixedFlag' | 'outFlag'>
// the flag bits follow from the ion (shared/flags.ts)
const temperatureSpec = (ion: 'oiii' | 'nii', p: TemperatureParts): TemperatureSpec => ({
  model: p.model, strong: p.strong, weak: p.weak, auroral: p.auroral, strongToWeak: p.strongToWeak, te: p.te, teError: p.teError,
  neUsed: p.neUsed,
  needsFlag: B(`te-needs-lines:${ion}`), upperFlag: B(`te-upper-limit:${ion}`), assumedFlag: B(`te-density-assumed:${ion}`),
  fixedFlag: B(`te-from-fixed-doublet-ratio:${ion}`), outFlag: B(`te-out-of-range:${ion}`),
})
const TEMPERATURE_OIII = temperatureSpec('oiii', {
  model: OIII_TEMPERATURE_MODEL, strong: O3_5007, weak: O3_4959, auroral: O3_4363, strongToWeak: OIII_5007_TO_4959,
  te: FLOAT.teOiii, teError: FLOAT.teOiiiError, neUsed: FLOAT.teOiiiNeUsed,
})
const TEMPERATURE_NII = temperatureSpec('nii', {
  model: NII_TEMPERATURE_MODEL, strong: N2_6584, weak: N2_6548, auroral: N2_5755, strongToWeak: NII_6584_TO_6548,
  te: FLOAT.teNii, teError: FLOAT.teNiiError, neUsed: FLOAT.teNiiNeUsed,
})

function temperature(r: Row, spec: TemperatureSpec, siiRatio: number): void {
  const st = r.state
  const dfl = r.dered
  const strong = spec.strong
  const weak = spec.weak
  const auroral = spec.auroral
  const sa = st[auroral]
  const ss = st[strong]
  if (sa === LINE_ABSENT && ss === LINE_ABSENT && st[weak] === LINE_ABSENT) return
  if (ss !== LINE_DETECTED || (sa !== LINE_DETECTED && sa !== LINE_UPPER_LIMIT)) {
    r.flag(spec.needsFlag)
    return
  }
  if (sa === LINE_UPPER_LIMIT) {
    r.flag(spec.upperFlag) // the ratio is a lower limit, T an upper limit
    return
  }
  let sum: number
  let sumRel: number
  let sumK: number
  if (st[weak] === LINE_DETECTED) {
    sum = dfl[strong] + dfl[weak]
    sumRel = relativeErrorOfSum(dfl[strong], r.rel[strong], dfl[weak], r.rel[weak])
    sumK = fluxWeightedK(dfl[strong], r.k[strong], dfl[weak], r.k[weak])
  } else {
    r.flag(spec.fixedFlag)
    sum = doubletSumFromStrongLine(dfl[strong], spec.strongToWeak)
    sumRel = r.rel[strong]
    sumK = r.k[strong]
  }
  const sol = temperatureWithDensityIteration(spec.model, sum / dfl[auroral], siiRatio, r.te)
  if (sol.densityAssumed) r.flag(spec.assumedFlag)
  if (sol.temperatureK === null) {
    r.flag(spec.outFlag)
    return
  }
  r.set(spec.te, sol.temperatureK)
  r.set(spec.neUsed, sol.neCm3)
  if (r.withErrors) {
    r.sumTerm(0, 1, sumRel, sumK)
    r.term(1, auroral, -1)
    r.set(spec.teError, temperatureError(spec.model, sol.temperatureK, sol.neCm3, Math.sqrt(r.combinationLogVariance(2))))
  }
}

// ── 8. metallicity, star-forming only (shared/science/README.md §5) ─────────────────────────────

function metallicity(r: Row): void {
  if (r.overall !== CLASS_STAR_FORMING) {
    r.flag(FB.metNotSf)
    return
  }
  const st = r.state
  const dfl = r.dered
  const haveN2 = st[N2_6584] === LINE_DETECTED && st[HA] === LINE_DETECTED
  const haveO3N2 = haveN2 && st[O3_5007] === LINE_DETECTED && st[HB] === LINE_DETECTED
  const haveD16 = haveN2 && st[S2_6717] === LINE_DETECTED && st[S2_6731] === LINE_DETECTED
  let n2 = NaN, n2Sigma = NaN, o3n2 = NaN, o3n2Sigma = NaN, d16 = NaN, d16Sigma = NaN
  if (haveN2) {
    n2 = n2Index(dfl[N2_6584], dfl[HA])
    if (r.withErrors) {
      r.term(0, N2_6584, 1)
      r.term(1, HA, -1)
      n2Sigma = log10Error(Math.sqrt(r.combinationLogVariance(2)))
    }
  }
  if (haveO3N2) {
    o3n2 = o3n2Index(dfl[O3_5007], dfl[HB], dfl[N2_6584], dfl[HA])
    if (r.withErrors) {
      r.term(0, O3_5007, 1)
      r.term(1, HB, -1)
      r.term(2, N2_6584, -1)
      r.term(3, HA, 1)
      o3n2Sigma = log10Error(Math.sqrt(r.combinationLogVariance(4)))
    }
  }
  if (haveD16) {
    const s1 = dfl[S2_6717]
    const s2 = dfl[S2_6731]
    d16 = n2s2haIndex(dfl[N2_6584], s1 + s2, dfl[HA])
    if (r.withErrors) {
      r.term(0, N2_6584, 1 + D16_NII_HA_WEIGHT)
      r.sumTerm(1, -1, relativeErrorOfSum(s1, r.rel[S2_6717], s2, r.rel[S2_6731]), fluxWeightedK(s1, r.k[S2_6717], s2, r.k[S2_6731]))
      r.term(2, HA, -D16_NII_HA_WEIGHT)
      d16Sigma = log10Error(Math.sqrt(r.combinationLogVariance(3)))
    }
  }
  for (let m = 0; m < METALLICITY_CALIBRATIONS.length; m++) {
    const cal = METALLICITY_CALIBRATIONS[m]
    const idx = cal.index === 'n2' ? n2 : cal.index === 'o3n2' ? o3n2 : d16
    if (!(idx === idx)) {
      r.flag(FB.metNeeds[m])
      continue
    }
    if (!cal.inRange(idx)) {
      r.flag(FB.metOut[m])
      continue
    }
    r.set(FLOAT.z[m], cal.value(idx))
    if (r.withErrors) {
      const sigma = cal.index === 'n2' ? n2Sigma : cal.index === 'o3n2' ? o3n2Sigma : d16Sigma
      r.set(FLOAT.zError[m], Math.abs(cal.slope(idx)) * sigma)
    }
  }
}

// ── 9. luminosity and SFR (shared/science/README.md §6) ─────────────────────────────────────────

function luminosity(r: Row): void {
  const z = r.redshift
  r.luminosityDistance = NaN
  if (!(z > 0)) {
    r.flag(FB.needsZ)
    return
  }
  const dl = r.prep.luminosityDistance(z)
  r.luminosityDistance = dl
  r.set(FLOAT.luminosityDistance, dl)
  if (r.state[HA] !== LINE_DETECTED) {
    r.flag(FB.sfrNeedsHa)
    return
  }
  const lHa = lineLuminosity(r.dered[HA] * r.fluxUnit, dl)
  r.set(FLOAT.lHalpha, lHa)
  r.set(FLOAT.sfrK98, sfrKennicutt98(lHa))
  r.set(FLOAT.sfrKe12, sfrKennicuttEvans12(lHa))
  if (r.withErrors) {
    const relative = Math.sqrt(r.lineLogVariance(HA))
    r.set(FLOAT.lHalphaError, lHa * relative)
    r.set(FLOAT.sfrK98Error, sfrKennicutt98(lHa) * relative)
    r.set(FLOAT.sfrKe12Error, sfrKennicuttEvans12(lHa) * relative)
  }
  if (r.source === 0) r.flag(FB.sfrNotDered)
  if (r.overall !== CLASS_STAR_FORMING) r.flag(FB.sfrNotSf)
}

// ── 10. black-hole mass from observed broad Hα (shared/science/README.md §7) ─────────────────────

function blackHole(r: Row): void {
  const state = r.state[HA_BROAD]
  if (state === LINE_UPPER_LIMIT) r.flag(FB.bhLimit)
  else if (state === LINE_DETECTED) {
    const fwhm = r.fwhmBroad
    if (!(fwhm > 0)) r.flag(FB.bhNeedsFwhm)
    else if (!(r.luminosityDistance > 0)) r.flag(FB.bhNeedsZ)
    else {
      const lBroad = lineLuminosity(r.flux[HA_BROAD] * r.fluxUnit, r.luminosityDistance)
      const m = blackHoleMassGreeneHo05(lBroad, fwhm)
      r.set(FLOAT.bhMass, m)
      r.set(FLOAT.bhLog10Mass, Math.log10(m))
      if (r.withErrors) r.set(FLOAT.bhLog10MassError, blackHoleLog10MassError(r.rel[HA_BROAD]))
      r.set(FLOAT.bhLBroad, lBroad)
    }
  }
}
