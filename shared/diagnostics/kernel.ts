/**
 * The columnar kernel: the whole deterministic chain for many galaxies at once, Float64Array /
 * Int8Array in and out. `diagnoseGalaxy`, `diagnoseMany`, the Monte Carlo and the benchmark all run
 * through `runKernel`; the formulas themselves live in the small functions it calls (one source of
 * truth). Inside the kernel NaN is the "no value" sentinel of float columns; `pipeline.ts` turns every
 * NaN into null plus a flag before anything leaves the library.
 */
import { extinctionK } from '../extinction/index.ts'
import { METALLICITY_KEYS } from '../vocabulary/calibrations.ts'
import type { ExtinctionLaw } from '../vocabulary/extinction-laws.ts'
import { flagBit } from '../vocabulary/flags.ts'
import * as __flags from '../vocabulary/flags.ts'
import { LINE_COUNT, LINE_IDS, LINES } from '../vocabulary/lines.ts'
import { linearisedLogVariance, linearisedLogVarianceOfLine } from '../stats/error-propagation.ts'
import * as __error_propagation from '../stats/error-propagation.ts'
import { ratioLimitStatus, stateOfSum } from '../stats/limits.ts'
import * as __limits from '../stats/limits.ts'
import { balmerCoefficient, INTRINSIC_HGAMMA_HBETA_CASE_B } from './balmer-decrement.ts'
import { blackHoleMassGreeneHo05, GREENE_HO05 } from './black-hole.ts'
import { classifyNiiPoint, classifyOiPoint, classifySiiPoint, classProvenByLimits, niiSubtypeOfPoint, overallClass } from './bpt.ts'
import * as __classes from '../vocabulary/classes.ts'
import {
  KA03, KA03_KE01_CROSSING_X, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, S07_NII, signedDistanceToHyperbola,
  signedDistanceToLine, type HyperbolaCurve, type StraightLine,
} from './demarcation.ts'
import {
  DENSITY_OK, densityRangeStatus, densityRatioDerivative, electronDensityFromDoubletRatio, SANDERS16_OII, SANDERS16_SII,
  type DoubletFit,
} from './density.ts'
import { createLuminosityDistanceCache, lineLuminosity, sfrKennicutt98, sfrKennicuttEvans12 } from './luminosity.ts'
import { METALLICITY_CALIBRATIONS } from './metallicity.ts'
import {
  NII_TEMPERATURE_MODEL, OIII_TEMPERATURE_MODEL, temperatureRatioLogSlope, temperatureWithDensityIteration, type TemperatureRatioModel,
  type TemperatureSolution,
} from './temperature.ts'
import { whanClass } from './whan.ts'
import type { DiagnosticSettings, RatioKey } from './types.ts'
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const FLAG_WORDS = __flags.FLAG_WORDS
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const LN10 = __error_propagation.LN10
const ROLE_DUST_DENOMINATOR = __error_propagation.ROLE_DUST_DENOMINATOR
const ROLE_DUST_NUMERATOR = __error_propagation.ROLE_DUST_NUMERATOR
const ROLE_OTHER = __error_propagation.ROLE_OTHER
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const CLASS_AGN = __classes.CLASS_AGN
const CLASS_STAR_FORMING = __classes.CLASS_STAR_FORMING
const CLASS_UNCLASSIFIED = __classes.CLASS_UNCLASSIFIED
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const LINE_ABSENT = __limits.LINE_ABSENT
const LINE_DETECTED = __limits.LINE_DETECTED
const LINE_NONPOSITIVE = __limits.LINE_NONPOSITIVE
const LINE_UPPER_LIMIT = __limits.LINE_UPPER_LIMIT
const RATIO_EXACT = __limits.RATIO_EXACT
const RATIO_NONE = __limits.RATIO_NONE

// ── line indices (kernel column order = LINES) ──────────────────────────────────────────────────
export const HA = 0, HB = 1, HG = 2, HD = 3, O3_5007 = 4, O3_4959 = 5, O3_4363 = 6, N2_6584 = 7, N2_6548 = 8,
  N2_5755 = 9, S2_6717 = 10, S2_6731 = 11, O1_6300 = 12, O2_3726 = 13, O2_3729 = 14, HA_BROAD = 15

/** Fixed [O III] 5007/4959 used when 4959 is missing (Storey & Zeippen 2000, MNRAS 312, 813 — from memory, shared/science/README.md §12; shared/science/README.md §4). */
export const OIII_5007_TO_4959 = 2.98
/** Fixed [N II] 6584/6548 used when 6548 is missing (≈ 3.05, shared/science/README.md §4 — from memory, shared/science/README.md §12). */
export const NII_6584_TO_6548 = 3.05
/** Weight of log([N II]/Hα) in the D16 index y (Dopita et al. 2016, Ap&SS 361, 61, eq. 1). */
const D16_NII_HA_WEIGHT = 0.264

/** Ratio keys of the contract in kernel order, and their indices. */
export const RATIO_KEYS: readonly RatioKey[] = ['niiHa', 'oiiiHb', 'siiHa', 'oiHa', 'siiDoublet', 'oiiDoublet']
export const R_NII = 0, R_OIII = 1, R_SII = 2, R_OI = 3, R_SIID = 4, R_OIID = 5

// ── float output columns (row-major: value of column c for row i at i·FLOAT_COLUMN_COUNT + c) ──
/** Names of the float output columns; a name ending in "Error" never gets Monte Carlo percentiles. */
export const FLOAT_COLUMNS: readonly string[] = [
  'balmerDecrement', 'balmerDecrementError', 'ebv', 'ebvError', 'av', 'avError',
  ...LINE_IDS.flatMap((l) => [`flux:${l}`, `fluxError:${l}`]),
  ...RATIO_KEYS.flatMap((k) => [`ratio:${k}`, `ratioError:${k}`]),
  'nii.ka03', 'nii.ka03Error', 'nii.ke01', 'nii.ke01Error', 'nii.s07', 'nii.s07Error', 'nii.nearestDistance',
  'sii.ke01', 'sii.ke01Error', 'sii.ke06', 'sii.ke06Error',
  'oi.ke01', 'oi.ke01Error', 'oi.ke06', 'oi.ke06Error',
  'density.sii.ne', 'density.sii.neError', 'density.oii.ne', 'density.oii.neError',
  'te.oiii', 'te.oiiiError', 'te.oiii.neUsed', 'te.nii', 'te.niiError', 'te.nii.neUsed',
  ...METALLICITY_KEYS.flatMap((k) => [`z.${k}`, `z.${k}Error`]),
  'sfr.dl', 'sfr.lHa', 'sfr.lHaError', 'sfr.k98', 'sfr.k98Error', 'sfr.ke12', 'sfr.ke12Error',
  'bh.mass', 'bh.log10Mass', 'bh.log10MassError', 'bh.lBroad',
]
/** Number of float output columns. */
export const FLOAT_COLUMN_COUNT = FLOAT_COLUMNS.length
/** Column number of every float column, by name. */
export const FC: Readonly<Record<string, number>> = Object.fromEntries(FLOAT_COLUMNS.map((n, i) => [n, i]))

const F_DEC = FC['balmerDecrement'], F_DEC_E = FC['balmerDecrementError'], F_EBV = FC['ebv'], F_EBV_E = FC['ebvError']
const F_AV = FC['av'], F_AV_E = FC['avError']
const F_FLUX0 = FC[`flux:${LINE_IDS[0]}`]
const F_RATIO0 = FC[`ratio:${RATIO_KEYS[0]}`]
const F_NII_KA03 = FC['nii.ka03'], F_NII_NEAR = FC['nii.nearestDistance'], F_SII_KE01 = FC['sii.ke01'], F_OI_KE01 = FC['oi.ke01']
const F_NE_SII = FC['density.sii.ne'], F_NE_OII = FC['density.oii.ne']
const F_TE_OIII = FC['te.oiii'], F_TE_NII = FC['te.nii']
const F_Z0 = FC[`z.${METALLICITY_KEYS[0]}`]
const F_DL = FC['sfr.dl'], F_LHA = FC['sfr.lHa']
const F_BH = FC['bh.mass']

// ── int8 output columns ────────────────────────────────────────────────────────────────────────
/** Names of the Int8 output columns. */
export const INT_COLUMNS: readonly string[] = [
  'source', // 0 none, 1 Hα/Hβ, 2 Hγ/Hβ
  ...LINE_IDS.map((l) => `state:${l}`), // LINE_* after thresholding
  ...RATIO_KEYS.map((k) => `limit:${k}`), // RATIO_*
  'class.nii', 'class.sii', 'class.oi', 'class.whan', 'class.overall', 'class.niiSubtype',
  'nii.nearest', // 0 none, 1 ka03, 2 ke01
  'density.sii', 'density.oii', // 0 ok, 1 low, 2 high, 3 not computed
]
/** Number of Int8 output columns, and the column number of each by name. */
export const INT_COLUMN_COUNT = INT_COLUMNS.length
export const IC: Readonly<Record<string, number>> = Object.fromEntries(INT_COLUMNS.map((n, i) => [n, i]))
const I_SOURCE = IC['source'], I_STATE0 = IC[`state:${LINE_IDS[0]}`], I_LIMIT0 = IC[`limit:${RATIO_KEYS[0]}`]
const I_NII = IC['class.nii'], I_SII = IC['class.sii'], I_OI = IC['class.oi'], I_WHAN = IC['class.whan']
const I_OVERALL = IC['class.overall'], I_SUB = IC['class.niiSubtype'], I_NEAR = IC['nii.nearest']
const I_DSII = IC['density.sii'], I_DOII = IC['density.oii']
/** Density status code: the doublet was not measured (block null). */
export const DENSITY_NOT_COMPUTED = 3

/** Flag words per row: FLAG_WORDS fixed-flag words, then one word with the `below-min-snr` line bits. */
export const FLAG_STRIDE = FLAG_WORDS + 1

// bit numbers of the fixed flags used below
const B = (name: string) => flagBit(name)
const FB = {
  belowIntrinsic: B('balmer-below-intrinsic'), fromHgamma: B('balmer-from-hgamma'), noDecrement: B('no-balmer-decrement'),
  nonpositiveBalmer: B('nonpositive-flux:balmer'), crossing: B('curve-crossing-region'),
  asymKa03: B('beyond-asymptote:nii-ka03'), asymKe01N: B('beyond-asymptote:nii-ke01'),
  asymKe01S: B('beyond-asymptote:sii-ke01'), asymKe01O: B('beyond-asymptote:oi-ke01'),
  missing: [B('missing-line:nii'), B('missing-line:sii'), B('missing-line:oi'), B('missing-line:whan')],
  notDecisive: [B('limit-not-decisive:nii'), B('limit-not-decisive:sii'), B('limit-not-decisive:oi'), B('limit-not-decisive:whan')],
  nonpositive: [B('nonpositive-flux:nii'), B('nonpositive-flux:sii'), B('nonpositive-flux:oi'), B('nonpositive-flux:whan')],
  whanNeedsEw: B('whan-needs-ew-halpha'), whanPassiveNeedsNii: B('whan-passive-needs-ew-nii'),
  overallNeedsNii: B('overall-needs-nii'), overallWithoutSii: B('overall-without-sii'), overallWithoutOi: B('overall-without-oi'),
  overallNiiOnly: B('overall-from-nii-only'), subtypeNotDecisive: B('limit-not-decisive:nii-subtype'),
  metNotSf: B('metallicity-not-star-forming'), sfrNotSf: B('sfr-not-star-forming'), sfrNotDered: B('sfr-not-dereddened'),
  sfrNeedsHa: B('sfr-needs-halpha'), needsZ: B('luminosity-needs-redshift'),
  densLow: [B('low-density-limit:sii'), B('low-density-limit:oii')],
  densHigh: [B('high-density-limit:sii'), B('high-density-limit:oii')],
  densNeeds: [B('density-needs-lines:sii'), B('density-needs-lines:oii')],
  teOut: [B('te-out-of-range:oiii'), B('te-out-of-range:nii')],
  teUpper: [B('te-upper-limit:oiii'), B('te-upper-limit:nii')],
  teAssumed: [B('te-density-assumed:oiii'), B('te-density-assumed:nii')],
  teFixed: [B('te-from-fixed-doublet-ratio:oiii'), B('te-from-fixed-doublet-ratio:nii')],
  teNeeds: [B('te-needs-lines:oiii'), B('te-needs-lines:nii')],
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

/** Kernel output: row-major float, int8 and flag matrices. */
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

/** A k(λ) outside a law's range for a contract line; the server maps it to a 422 naming both. */
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

// ── row scratch (the kernel is synchronous; one set of buffers suffices) ──────────────────────────
const st = new Int8Array(LINE_COUNT)
const fl = new Float64Array(LINE_COUNT)
const rel = new Float64Array(LINE_COUNT) // σ/F of detected lines
const dfl = new Float64Array(LINE_COUNT) // dereddened flux
const rx = new Float64Array(6) // ratio values
const rs = new Int8Array(6) // ratio states
const rerr = new Float64Array(6)
const coef = new Float64Array(4)
const trel = new Float64Array(4)
const trole = new Float64Array(4)
const tk = new Float64Array(4)
const dist = new Float64Array(3)
const teSolution: TemperatureSolution = { temperatureK: null, neCm3: 0, densityAssumed: false }

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
  const s = prep.settings
  out.float.fill(NaN, 0, n * FLOAT_COLUMN_COUNT)
  out.int.fill(0, 0, n * INT_COLUMN_COUNT)
  out.flags.fill(0, 0, n * FLAG_STRIDE)
  for (let i = start; i < end; i++) kernelRow(input, out, prep, s, options, i, i - start)
}

// √(a² + b²) without Math.hypot's overflow guards (slow in V8); the arguments here are O(1)
function hypot2(a: number, b: number): number {
  return Math.sqrt(a * a + b * b)
}

function setFlag(flags: Uint32Array, base: number, bit: number): void {
  flags[base + (bit >>> 5)] |= 1 << (bit & 31)
}

function roleOf(line: number, d1: number, d2: number): number {
  return line === d1 ? ROLE_DUST_NUMERATOR : line === d2 ? ROLE_DUST_DENOMINATOR : ROLE_OTHER
}

function kernelRow(input: KernelInput, out: KernelOutput, prep: PreparedSettings, s: DiagnosticSettings, options: KernelOptions, i: number, o: number): void {
  const fo = o * FLOAT_COLUMN_COUNT
  const io = o * INT_COLUMN_COUNT
  const bo = o * FLAG_STRIDE
  const F = out.float
  const I = out.int
  const FL = out.flags
  const k = prep.k
  const withErrors = options.errors

  // 1. line states (shared/science/README.md §9)
  let belowSnr = 0
  const minSnr = s.minSnr
  for (let l = 0; l < LINE_COUNT; l++) {
    const kind = input.kind[l][i]
    let state = LINE_ABSENT
    if (kind === 1) {
      const v = input.value[l][i]
      const e = input.error[l][i]
      if (options.thresholdSnr) {
        if (v >= minSnr * e) {
          state = LINE_DETECTED
          fl[l] = v
          rel[l] = e / v
        } else {
          state = LINE_UPPER_LIMIT
          fl[l] = minSnr * e
          belowSnr |= 1 << l
        }
      } else if (v > 0) {
        state = LINE_DETECTED
        fl[l] = v
        rel[l] = e / v
      } else {
        state = LINE_NONPOSITIVE
        fl[l] = v
      }
    } else if (kind === 2) {
      state = LINE_UPPER_LIMIT
      fl[l] = input.value[l][i]
    }
    st[l] = state
    I[io + I_STATE0 + l] = state
  }
  FL[bo + FLAG_WORDS] = belowSnr

  // 2. dust (shared/science/README.md §1.2)
  let ebv = 0
  let dustC = 0 // non-zero only when E(B−V) > 0 depends on the fluxes
  let d1 = -1
  let d2 = -1
  let source = 0
  let rawC = 0
  let raw = NaN
  if (st[HA] === LINE_DETECTED && st[HB] === LINE_DETECTED) {
    const dec = fl[HA] / fl[HB]
    raw = prep.cHaHb * Math.log10(dec / s.intrinsicBalmer)
    rawC = prep.cHaHb
    d1 = HA
    d2 = HB
    source = 1
    F[fo + F_DEC] = dec
    if (withErrors) F[fo + F_DEC_E] = dec * Math.sqrt(rel[HA] * rel[HA] + rel[HB] * rel[HB])
  } else if (st[HA] !== LINE_DETECTED && st[HG] === LINE_DETECTED && st[HB] === LINE_DETECTED) {
    const ratio = fl[HG] / fl[HB]
    raw = prep.cHgHb * Math.log10(INTRINSIC_HGAMMA_HBETA_CASE_B / ratio)
    rawC = prep.cHgHb
    d1 = HB
    d2 = HG
    source = 2
    setFlag(FL, bo, FB.fromHgamma)
    F[fo + F_DEC] = ratio
    if (withErrors) F[fo + F_DEC_E] = ratio * Math.sqrt(rel[HG] * rel[HG] + rel[HB] * rel[HB])
  } else {
    setFlag(FL, bo, FB.noDecrement)
    if (st[HA] === LINE_NONPOSITIVE || st[HB] === LINE_NONPOSITIVE) setFlag(FL, bo, FB.nonpositiveBalmer)
  }
  I[io + I_SOURCE] = source
  if (source !== 0) {
    if (raw >= 0) {
      ebv = raw
      dustC = rawC
    } else {
      ebv = 0
      setFlag(FL, bo, FB.belowIntrinsic)
    }
    F[fo + F_EBV] = ebv
    F[fo + F_AV] = s.rv * ebv
    if (withErrors) {
      const e = (rawC / LN10) * Math.sqrt(rel[d1] * rel[d1] + rel[d2] * rel[d2])
      F[fo + F_EBV_E] = e
      F[fo + F_AV_E] = s.rv * e
    }
  }
  const relD1 = d1 >= 0 ? rel[d1] : 0
  const relD2 = d2 >= 0 ? rel[d2] : 0

  // 3. dereddened fluxes (shared/science/README.md §1.2, §9)
  for (let l = 0; l < LINE_COUNT; l++) {
    const state = st[l]
    if (state === LINE_DETECTED || state === LINE_UPPER_LIMIT) {
      const factor = ebv > 0 ? Math.exp(0.4 * LN10 * k[l] * ebv) : 1
      const v = fl[l] * factor
      dfl[l] = v
      F[fo + F_FLUX0 + 2 * l] = v
      if (withErrors && state === LINE_DETECTED) {
        F[fo + F_FLUX0 + 2 * l + 1] = v * Math.sqrt(linearisedLogVarianceOfLine(rel[l], roleOf(l, d1, d2), k[l], dustC, relD1, relD2))
      }
    } else dfl[l] = NaN
  }

  // 4. observed ratios (public API `ratios`; shared/science/README.md §2.1)
  ratio(R_NII, st[N2_6584], fl[N2_6584], rel[N2_6584], st[HA], fl[HA], rel[HA], true)
  ratio(R_OIII, st[O3_5007], fl[O3_5007], rel[O3_5007], st[HB], fl[HB], rel[HB], true)
  {
    const sumState = stateOfSum(st[S2_6717], st[S2_6731])
    const sum = fl[S2_6717] + fl[S2_6731]
    const sumRel = sumState === LINE_DETECTED ? hypot2(rel[S2_6717] * fl[S2_6717], rel[S2_6731] * fl[S2_6731]) / sum : 0
    ratio(R_SII, sumState, sum, sumRel, st[HA], fl[HA], rel[HA], true)
  }
  ratio(R_OI, st[O1_6300], fl[O1_6300], rel[O1_6300], st[HA], fl[HA], rel[HA], true)
  ratio(R_SIID, st[S2_6717], fl[S2_6717], rel[S2_6717], st[S2_6731], fl[S2_6731], rel[S2_6731], false)
  ratio(R_OIID, st[O2_3729], fl[O2_3729], rel[O2_3729], st[O2_3726], fl[O2_3726], rel[O2_3726], false)
  for (let r = 0; r < 6; r++) {
    I[io + I_LIMIT0 + r] = rs[r]
    if (rs[r] !== RATIO_NONE) {
      F[fo + F_RATIO0 + 2 * r] = rx[r]
      if (withErrors && rs[r] === RATIO_EXACT) F[fo + F_RATIO0 + 2 * r + 1] = rerr[r]
    }
  }

  // 5. classes (shared/science/README.md §2.3–2.5, §9)
  const yS = rs[R_OIII]
  const y = rx[R_OIII]
  const nii = diagramClass(0, rs[R_NII], rx[R_NII], yS, y, FL, bo, N2_6584, HA, O3_5007, HB)
  let subtype = CLASS_UNCLASSIFIED
  if (nii !== CLASS_UNCLASSIFIED) {
    const x = rx[R_NII]
    if (x >= KA03.x0) setFlag(FL, bo, FB.asymKa03)
    if (x >= KE01_NII.x0) setFlag(FL, bo, FB.asymKe01N)
    if (nii === CLASS_STAR_FORMING && x < KA03_KE01_CROSSING_X && y >= KE01_NII.a / (x - KE01_NII.x0) + KE01_NII.c) {
      setFlag(FL, bo, FB.crossing)
    }
    if (nii === CLASS_AGN) subtype = classProvenByLimits(niiSubtypeOfPoint(x, y), rs[R_NII], yS)
  }
  const sii = diagramClass(1, rs[R_SII], rx[R_SII], yS, y, FL, bo, S2_6717, HA, O3_5007, HB)
  if (sii !== CLASS_UNCLASSIFIED && rx[R_SII] >= KE01_SII.x0) setFlag(FL, bo, FB.asymKe01S)
  const oi = diagramClass(2, rs[R_OI], rx[R_OI], yS, y, FL, bo, O1_6300, HA, O3_5007, HB)
  if (oi !== CLASS_UNCLASSIFIED && rx[R_OI] >= KE01_OI.x0) setFlag(FL, bo, FB.asymKe01O)
  // WHAN
  const ewHa = input.ewHalpha[i]
  let whan = CLASS_UNCLASSIFIED
  if (ewHa === ewHa) {
    const ewNii = input.ewNii[i]
    whan = whanClass(rx[R_NII], rs[R_NII], ewHa, ewNii)
    if (ewHa < 0.5 && !(ewNii === ewNii)) setFlag(FL, bo, FB.whanPassiveNeedsNii)
    if (whan === CLASS_UNCLASSIFIED) {
      if (rs[R_NII] !== RATIO_NONE) setFlag(FL, bo, FB.notDecisive[3])
      else setFlag(FL, bo, st[N2_6584] === LINE_NONPOSITIVE || st[HA] === LINE_NONPOSITIVE ? FB.nonpositive[3] : FB.missing[3])
    }
  } else setFlag(FL, bo, FB.whanNeedsEw)
  const overall = overallClass(nii, sii, oi, subtype)
  if (nii === CLASS_UNCLASSIFIED) setFlag(FL, bo, FB.overallNeedsNii)
  else if (sii === CLASS_UNCLASSIFIED && oi === CLASS_UNCLASSIFIED) {
    setFlag(FL, bo, FB.overallNiiOnly)
    if (nii === CLASS_AGN && subtype === CLASS_UNCLASSIFIED) setFlag(FL, bo, FB.subtypeNotDecisive)
  } else if (sii === CLASS_UNCLASSIFIED) setFlag(FL, bo, FB.overallWithoutSii)
  else if (oi === CLASS_UNCLASSIFIED) setFlag(FL, bo, FB.overallWithoutOi)
  I[io + I_NII] = nii
  I[io + I_SII] = sii
  I[io + I_OI] = oi
  I[io + I_WHAN] = whan
  I[io + I_OVERALL] = overall
  I[io + I_SUB] = subtype

  // distances (shared/science/README.md §2.6): only for measured (not limit) points
  if (yS === RATIO_EXACT) {
    const sy = rerr[R_OIII]
    if (rs[R_NII] === RATIO_EXACT) {
      const x = rx[R_NII]
      const sx = rerr[R_NII]
      const dKa = hyperbolaDistance(KA03, x, y, sx, sy, F, fo + F_NII_KA03, withErrors)
      const dKe = hyperbolaDistance(KE01_NII, x, y, sx, sy, F, fo + F_NII_KA03 + 2, withErrors)
      lineDistance(S07_NII, x, y, sx, sy, F, fo + F_NII_KA03 + 4, withErrors)
      const nearKa = Math.abs(dKa) <= Math.abs(dKe)
      I[io + I_NEAR] = nearKa ? 1 : 2
      F[fo + F_NII_NEAR] = nearKa ? dKa : dKe
    }
    if (rs[R_SII] === RATIO_EXACT) {
      hyperbolaDistance(KE01_SII, rx[R_SII], y, rerr[R_SII], sy, F, fo + F_SII_KE01, withErrors)
      lineDistance(KE06_SII, rx[R_SII], y, rerr[R_SII], sy, F, fo + F_SII_KE01 + 2, withErrors)
    }
    if (rs[R_OI] === RATIO_EXACT) {
      hyperbolaDistance(KE01_OI, rx[R_OI], y, rerr[R_OI], sy, F, fo + F_OI_KE01, withErrors)
      lineDistance(KE06_OI, rx[R_OI], y, rerr[R_OI], sy, F, fo + F_OI_KE01 + 2, withErrors)
    }
  }

  // 6. density from observed doublets (shared/science/README.md §3)
  const siiRatioForTe = density(0, SANDERS16_SII, S2_6717, S2_6731, R_SIID, s.electronTemperature, F, fo + F_NE_SII, I, io + I_DSII, FL, bo, withErrors)
  density(1, SANDERS16_OII, O2_3729, O2_3726, R_OIID, s.electronTemperature, F, fo + F_NE_OII, I, io + I_DOII, FL, bo, withErrors)

  // 7. temperatures from dereddened fluxes (shared/science/README.md §4)
  temperature(0, OIII_TEMPERATURE_MODEL, O3_5007, O3_4959, O3_4363, OIII_5007_TO_4959, siiRatioForTe, k, F, fo + F_TE_OIII, FL, bo, withErrors, dustC, d1, d2, relD1, relD2)
  temperature(1, NII_TEMPERATURE_MODEL, N2_6584, N2_6548, N2_5755, NII_6584_TO_6548, siiRatioForTe, k, F, fo + F_TE_NII, FL, bo, withErrors, dustC, d1, d2, relD1, relD2)

  // 8. metallicity, star-forming only (shared/science/README.md §5)
  if (overall === CLASS_STAR_FORMING) {
    metallicity(k, F, fo + F_Z0, FL, bo, withErrors, dustC, d1, d2, relD1, relD2)
  } else setFlag(FL, bo, FB.metNotSf)

  // 9. luminosity and SFR (shared/science/README.md §6)
  const z = input.redshift[i]
  let dl = NaN
  if (z > 0) {
    dl = prep.luminosityDistance(z)
    F[fo + F_DL] = dl
    if (st[HA] === LINE_DETECTED) {
      const lHa = lineLuminosity(dfl[HA] * input.fluxUnit[i], dl)
      F[fo + F_LHA] = lHa
      F[fo + F_LHA + 2] = sfrKennicutt98(lHa)
      F[fo + F_LHA + 4] = sfrKennicuttEvans12(lHa)
      if (withErrors) {
        const r = Math.sqrt(linearisedLogVarianceOfLine(rel[HA], roleOf(HA, d1, d2), k[HA], dustC, relD1, relD2))
        F[fo + F_LHA + 1] = lHa * r
        F[fo + F_LHA + 3] = sfrKennicutt98(lHa) * r
        F[fo + F_LHA + 5] = sfrKennicuttEvans12(lHa) * r
      }
      if (source === 0) setFlag(FL, bo, FB.sfrNotDered)
      if (overall !== CLASS_STAR_FORMING) setFlag(FL, bo, FB.sfrNotSf)
    } else setFlag(FL, bo, FB.sfrNeedsHa)
  } else setFlag(FL, bo, FB.needsZ)

  // 10. black-hole mass from observed broad Hα (shared/science/README.md §7)
  const sb = st[HA_BROAD]
  if (sb === LINE_UPPER_LIMIT) setFlag(FL, bo, FB.bhLimit)
  else if (sb === LINE_DETECTED) {
    const fwhm = input.fwhmBroad[i]
    if (!(fwhm > 0)) setFlag(FL, bo, FB.bhNeedsFwhm)
    else if (!(dl > 0)) setFlag(FL, bo, FB.bhNeedsZ)
    else {
      const lb = lineLuminosity(fl[HA_BROAD] * input.fluxUnit[i], dl)
      const m = blackHoleMassGreeneHo05(lb, fwhm)
      F[fo + F_BH] = m
      F[fo + F_BH + 1] = Math.log10(m)
      if (withErrors) F[fo + F_BH + 2] = (GREENE_HO05.luminosityExponent * rel[HA_BROAD]) / LN10
      F[fo + F_BH + 3] = lb
    }
  }
}

// A ratio of two lines (or a sum and a line); writes rx/rs/rerr[r]. `logarithmic` for the diagram ratios.
function ratio(r: number, sNum: number, fNum: number, relNum: number, sDen: number, fDen: number, relDen: number, logarithmic: boolean): void {
  const status = ratioLimitStatus(sNum, sDen)
  rs[r] = status
  if (status === RATIO_NONE) {
    rx[r] = NaN
    rerr[r] = NaN
    return
  }
  const q = fNum / fDen
  rx[r] = logarithmic ? Math.log10(q) : q
  const relQ = Math.sqrt(relNum * relNum + relDen * relDen)
  rerr[r] = status === RATIO_EXACT ? (logarithmic ? relQ / LN10 : q * relQ) : NaN
}

// Class of one diagram from (x, y) with limit states; sets the "why unclassified" flag.
function diagramClass(
  d: number, xS: number, x: number, yS: number, y: number, FL: Uint32Array, bo: number, l1: number, l2: number, l3: number, l4: number,
): number {
  if (xS === RATIO_NONE || yS === RATIO_NONE) {
    const nonpositive = st[l1] === LINE_NONPOSITIVE || st[l2] === LINE_NONPOSITIVE || st[l3] === LINE_NONPOSITIVE ||
      st[l4] === LINE_NONPOSITIVE || (d === 1 && st[S2_6731] === LINE_NONPOSITIVE)
    setFlag(FL, bo, nonpositive ? FB.nonpositive[d] : FB.missing[d])
    return CLASS_UNCLASSIFIED
  }
  const face = d === 0 ? classifyNiiPoint(x, y) : d === 1 ? classifySiiPoint(x, y) : classifyOiPoint(x, y)
  const cls = classProvenByLimits(face, xS, yS)
  if (cls === CLASS_UNCLASSIFIED) setFlag(FL, bo, FB.notDecisive[d])
  return cls
}

function hyperbolaDistance(curve: HyperbolaCurve, x: number, y: number, sx: number, sy: number, F: Float64Array, at: number, withErrors: boolean): number {
  const d = signedDistanceToHyperbola(curve, x, y, dist)
  F[at] = d
  if (withErrors) F[at + 1] = hypot2(dist[1] * sx, dist[2] * sy)
  return d
}

function lineDistance(line: StraightLine, x: number, y: number, sx: number, sy: number, F: Float64Array, at: number, withErrors: boolean): void {
  F[at] = signedDistanceToLine(line, x, y)
  if (withErrors) F[at + 1] = hypot2(line.m * sx, sy) / Math.sqrt(1 + line.m * line.m)
}

// Returns the observed ratio usable for the T_e iteration (NaN unless within the fit's range).
function density(
  which: number, fit: DoubletFit, lineNum: number, lineDen: number, r: number, temperatureK: number,
  F: Float64Array, at: number, I: Int8Array, iat: number, FL: Uint32Array, bo: number, withErrors: boolean,
): number {
  if (st[lineNum] !== LINE_DETECTED || st[lineDen] !== LINE_DETECTED) {
    I[iat] = DENSITY_NOT_COMPUTED
    if (st[lineNum] !== LINE_ABSENT || st[lineDen] !== LINE_ABSENT) setFlag(FL, bo, FB.densNeeds[which])
    return NaN
  }
  const R = rx[r]
  const status = densityRangeStatus(fit, R)
  I[iat] = status
  if (status !== DENSITY_OK) {
    setFlag(FL, bo, status === 1 ? FB.densLow[which] : FB.densHigh[which])
    return NaN
  }
  F[at] = electronDensityFromDoubletRatio(fit, R, temperatureK)
  if (withErrors) F[at + 1] = densityRatioDerivative(fit, R, temperatureK) * rerr[r]
  return R
}

function temperature(
  which: number, model: TemperatureRatioModel, strong: number, weak: number, auroral: number, fixedRatio: number,
  siiRatio: number, k: Float64Array, F: Float64Array, at: number, FL: Uint32Array, bo: number, withErrors: boolean,
  dustC: number, d1: number, d2: number, relD1: number, relD2: number,
): void {
  const sa = st[auroral]
  const ss = st[strong]
  if (sa === LINE_ABSENT && ss === LINE_ABSENT && st[weak] === LINE_ABSENT) return
  if (ss !== LINE_DETECTED || (sa !== LINE_DETECTED && sa !== LINE_UPPER_LIMIT)) {
    setFlag(FL, bo, FB.teNeeds[which])
    return
  }
  if (sa === LINE_UPPER_LIMIT) {
    setFlag(FL, bo, FB.teUpper[which]) // the ratio is a lower limit, T an upper limit
    return
  }
  let sum: number
  let sumRel: number
  let sumK: number
  if (st[weak] === LINE_DETECTED) {
    const a = dfl[strong]
    const b = dfl[weak]
    sum = a + b
    sumRel = hypot2(a * rel[strong], b * rel[weak]) / sum
    sumK = (a * k[strong] + b * k[weak]) / sum
  } else {
    setFlag(FL, bo, FB.teFixed[which])
    sum = dfl[strong] * (1 + 1 / fixedRatio)
    sumRel = rel[strong]
    sumK = k[strong]
  }
  const R = sum / dfl[auroral]
  const sol = temperatureWithDensityIteration(model, R, siiRatio, teSolution)
  if (sol.densityAssumed) setFlag(FL, bo, FB.teAssumed[which])
  if (sol.temperatureK === null) {
    setFlag(FL, bo, FB.teOut[which])
    return
  }
  F[at] = sol.temperatureK
  F[at + 2] = sol.neCm3
  if (withErrors) {
    coef[0] = 1; trel[0] = sumRel; trole[0] = ROLE_OTHER; tk[0] = sumK
    coef[1] = -1; trel[1] = rel[auroral]; trole[1] = ROLE_OTHER; tk[1] = k[auroral]
    const sigmaLnR = Math.sqrt(linearisedLogVariance(2, coef, trel, trole, tk, dustC, relD1, relD2))
    F[at + 1] = sigmaLnR / Math.abs(temperatureRatioLogSlope(model, sol.temperatureK, sol.neCm3))
  }
}

function term(j: number, line: number, a: number, d1: number, d2: number, k: Float64Array): void {
  coef[j] = a
  trel[j] = rel[line]
  trole[j] = roleOf(line, d1, d2)
  tk[j] = k[line]
}

function metallicity(
  k: Float64Array, F: Float64Array, at: number, FL: Uint32Array, bo: number, withErrors: boolean,
  dustC: number, d1: number, d2: number, relD1: number, relD2: number,
): void {
  const haveN2 = st[N2_6584] === LINE_DETECTED && st[HA] === LINE_DETECTED
  const haveO3N2 = haveN2 && st[O3_5007] === LINE_DETECTED && st[HB] === LINE_DETECTED
  const haveD16 = haveN2 && st[S2_6717] === LINE_DETECTED && st[S2_6731] === LINE_DETECTED
  let n2 = NaN, n2Sigma = NaN, o3n2 = NaN, o3n2Sigma = NaN, d16 = NaN, d16Sigma = NaN
  if (haveN2) {
    n2 = Math.log10(dfl[N2_6584] / dfl[HA])
    if (withErrors) {
      term(0, N2_6584, 1, d1, d2, k)
      term(1, HA, -1, d1, d2, k)
      n2Sigma = Math.sqrt(linearisedLogVariance(2, coef, trel, trole, tk, dustC, relD1, relD2)) / LN10
    }
  }
  if (haveO3N2) {
    o3n2 = Math.log10((dfl[O3_5007] / dfl[HB]) / (dfl[N2_6584] / dfl[HA]))
    if (withErrors) {
      term(0, O3_5007, 1, d1, d2, k)
      term(1, HB, -1, d1, d2, k)
      term(2, N2_6584, -1, d1, d2, k)
      term(3, HA, 1, d1, d2, k)
      o3n2Sigma = Math.sqrt(linearisedLogVariance(4, coef, trel, trole, tk, dustC, relD1, relD2)) / LN10
    }
  }
  if (haveD16) {
    const s2 = dfl[S2_6717] + dfl[S2_6731]
    d16 = Math.log10(dfl[N2_6584] / s2) + D16_NII_HA_WEIGHT * Math.log10(dfl[N2_6584] / dfl[HA])
    if (withErrors) {
      term(0, N2_6584, 1 + D16_NII_HA_WEIGHT, d1, d2, k)
      coef[1] = -1
      trel[1] = hypot2(dfl[S2_6717] * rel[S2_6717], dfl[S2_6731] * rel[S2_6731]) / s2
      trole[1] = ROLE_OTHER
      tk[1] = (dfl[S2_6717] * k[S2_6717] + dfl[S2_6731] * k[S2_6731]) / s2
      term(2, HA, -D16_NII_HA_WEIGHT, d1, d2, k)
      d16Sigma = Math.sqrt(linearisedLogVariance(3, coef, trel, trole, tk, dustC, relD1, relD2)) / LN10
    }
  }
  for (let m = 0; m < METALLICITY_CALIBRATIONS.length; m++) {
    const cal = METALLICITY_CALIBRATIONS[m]
    const idx = cal.index === 'n2' ? n2 : cal.index === 'o3n2' ? o3n2 : d16
    if (!(idx === idx)) {
      setFlag(FL, bo, FB.metNeeds[m])
      continue
    }
    if (!cal.inRange(idx)) {
      setFlag(FL, bo, FB.metOut[m])
      continue
    }
    F[at + 2 * m] = cal.value(idx)
    if (withErrors) {
      const sigma = cal.index === 'n2' ? n2Sigma : cal.index === 'o3n2' ? o3n2Sigma : d16Sigma
      F[at + 2 * m + 1] = Math.abs(cal.slope(idx)) * sigma
    }
  }
}

/** Float columns that are values (get Monte Carlo percentiles), as a 0/1 mask by column. */
export const FLOAT_COLUMN_IS_VALUE: Uint8Array = Uint8Array.from(FLOAT_COLUMNS, (n) => (/Error(:|$)/.test(n) ? 0 : 1))

