/**
 * Measure the emission lines (and Na I D) of one 1-D spectrum: the entry point of the spectrum fit
 * (shared/science/README.md §13, §14). Pure: takes plain arrays, returns a JSON-ready object, so a
 * worker thread can run it.
 *
 * Steps: coverage and windows (prepare.ts) → one narrow component, started from a grid in (v, σ) with
 * the linear parameters solved exactly at each point → Levenberg–Marquardt → optional broad Hα and a
 * second narrow component, each kept by the Bayesian information criterion BIC = χ² + k ln n
 * (Schwarz 1978, Ann. Stat. 6, 461) when it lowers BIC by more than 10 and is itself detected →
 * quantities and their errors (covariance, or a seeded Monte Carlo of refits) → the result.
 */
import { describeFlag, flagName } from '../vocabulary/flags.ts'
import { galaxySeed } from '../diagnostics/monte-carlo.ts'
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import type { LineId } from '../vocabulary/lines.ts'
import { percentiles16_50_84 } from '../stats/percentiles.ts'
import { createRng } from '../stats/rng.ts'
import { airToVacuum } from './air-vacuum.ts'
import { solveDoublet, type Doublet } from './curve-of-growth.ts'
import { bilinear, lineSigmaInstKmPerS, quantities, quantityErrors, quantityGradients, type Quantities } from './derive.ts'
import { kinematicMoments } from './start.ts'
import { variableProjection } from './variable-projection.ts'
import { NAD, type FitLineId } from './lines.ts'
import { createSpectrumModel, fluxKey, windowPixels, withoutAbsorption, type SpectrumModel } from './model.ts'
import { prepareSpectrum, setupFit, type FitSetup } from './prepare.ts'
import { FWHM_PER_SIGMA } from './profiles.ts'
import type {
  DetectedLine, FitContext, FitOptions, LineComponent, LineResult, MeasuredLine, NadResult, ResolvedFitOptions, SpectrumFitResult, SpectrumInput,
} from './types.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** Version of the measuring method (changes whenever a result could change). */
export const SPECTRUM_FIT_METHOD_VERSION = 'spectra-3'

/** Defaults of the `fit` options (shared/science/README.md §13.10). */
export const DEFAULT_FIT_OPTIONS: Readonly<ResolvedFitOptions> = Object.freeze({
  profile: 'gaussian', components: 1, broadHalpha: 'auto', absorption: ['nad'] as 'nad'[], monteCarlo: { draws: 0, seed: 1 }, balmerAbsorptionEw: 0,
})

/** ΔBIC an extra component must gain (common practice, shared/science/README.md §13.7). */
export const BIC_THRESHOLD = 10

/** The Balmer lines a fixed absorption EW is added back to. */
export const BALMER_LINES: readonly FitLineId[] = ['halpha', 'hbeta', 'hgamma', 'hdelta']

/** Stellar Na I D caution (shared/science/README.md §14). */
export const NAD_NOTE = describeFlag('stellar-absorption-not-separated').text

/** Fill in defaults. */
export function resolveFitOptions(o: FitOptions = {}): ResolvedFitOptions {
  return {
    profile: o.profile ?? DEFAULT_FIT_OPTIONS.profile,
    components: o.components ?? DEFAULT_FIT_OPTIONS.components,
    broadHalpha: o.broadHalpha ?? DEFAULT_FIT_OPTIONS.broadHalpha,
    absorption: [...(o.absorption ?? DEFAULT_FIT_OPTIONS.absorption)],
    monteCarlo: { draws: o.monteCarlo?.draws ?? 0, seed: o.monteCarlo?.seed ?? 1 },
    balmerAbsorptionEw: o.balmerAbsorptionEw ?? 0,
  }
}

/** A converged fit of one configuration. */
export interface FitOutcome {
  model: SpectrumModel
  p: Float64Array
  chi2: number
  covariance: Float64Array
  converged: boolean
  /** free parameters */
  k: number
  bic: number
}

function freeParameters(model: SpectrumModel): number {
  let k = 0
  for (let j = 0; j < model.names.length; j++) if (model.problem.upper[j] > model.problem.lower[j]) k++
  return k
}

/** Variable projection from the non-linear parameters of p0 (README §13.7), with BIC (Schwarz 1978). */
export function runFit(model: SpectrumModel, p0: Float64Array): FitOutcome {
  let r = variableProjection(model.separable, p0)
  const wider = widerStart(model, r.p)
  if (wider) {
    const again = variableProjection(model.separable, wider)
    if (again.chi2 < r.chi2) r = again
  }
  const k = freeParameters(model)
  return { model, p: r.p, chi2: r.chi2, covariance: r.covariance, converged: r.converged, k, bic: r.chi2 + k * Math.log(model.pixels.n) }
}

/** Trial intrinsic widths, km/s, for a width that ended at zero (project choice, README §13.7). */
const ZERO_WIDTH_PROBES = [20, 60, 150]

/**
 * σ_λ² = (λσ/c)² + σ_inst² has no slope in σ at σ = 0, so a fit that steps onto zero width stops
 * there even when wider lines fit better (zero is then a saddle that Gauss–Newton cannot see). For
 * each free width at zero, probe wider ones with the linear parameters solved; the best probe that
 * lowers χ² is a new start, else null.
 */
function widerStart(model: SpectrumModel, p: Float64Array): Float64Array | null {
  const { lower, upper } = model.problem
  let start: Float64Array | null = null
  model.groups.forEach((g, gi) => {
    if (g.s < 0 || !(upper[g.s] > lower[g.s]) || lower[g.s] !== 0 || !(p[g.s] < 1)) return
    const base = Float64Array.from(start ?? p)
    let best = model.solveLinear(Float64Array.from(base), gi)
    for (const w of ZERO_WIDTH_PROBES) {
      const trial = Float64Array.from(base)
      trial[g.s] = Math.min(w, upper[g.s])
      const chi2 = model.solveLinear(trial, gi, best)
      if (chi2 < best) {
        best = chi2
        start = trial
      }
    }
  })
  return start
}

/** Set one group's kinematics at each candidate, solve the linear parameters, keep the lowest χ². */
function gridSearch(model: SpectrumModel, p: Float64Array, groupIndex: number, candidates: [number, number, number][]): Float64Array {
  const g = model.groups[groupIndex]
  let best = p
  let bestChi2 = Infinity
  let bestIndex = -1
  // candidates nearest the systemic velocity first, so that the early stop below prunes the most; the
  // winner is the same as in the listed order (the lowest χ², the first listed among equals)
  const order = candidates.map((_, i) => i).sort((a, b) => Math.abs(candidates[a][0]) - Math.abs(candidates[b][0]) || a - b)
  for (const ci of order) {
    const [v, s, gamma] = candidates[ci]
    const trial = Float64Array.from(p)
    trial[g.v] = v
    trial[g.s] = clamp(s, model.problem.lower[g.s], model.problem.upper[g.s])
    if (g.g >= 0) trial[g.g] = clamp(gamma, model.problem.lower[g.g], model.problem.upper[g.g])
    // a candidate whose first windows already exceed the best χ² cannot win: the rest are left unsolved
    const chi2 = model.solveLinear(trial, groupIndex, bestChi2)
    if (chi2 < bestChi2 || (chi2 === bestChi2 && ci < bestIndex)) {
      bestChi2 = chi2
      best = trial
      bestIndex = ci
    }
  }
  return best
}

const clamp = (x: number, lo: number, hi: number): number => Math.min(hi, Math.max(lo, x))

/** Starting grids (project choice, README §13.7): velocities ±600 km/s in steps of 150 km/s (80 km/s for Na I D, whose lines lie only 304 km/s apart: below its least observed σ with a resolution), widths spanning narrow lines. */
function narrowCandidates(profile: SpectrumModel['config']['profile']): [number, number, number][] {
  const out: [number, number, number][] = []
  for (let v = -600; v <= 600; v += 150) {
    for (const w of [50, 150, 350]) out.push(profile === 'lorentzian' ? [v, 0, w * 0.8] : [v, w, profile === 'voigt' ? 10 : 0])
  }
  return out
}
const ABSORPTION_CANDIDATES: [number, number, number][] = Array.from({ length: 16 }, (_, i) => -600 + 80 * i)
  .flatMap((v) => [60, 150, 350].map((s): [number, number, number] => [v, s, 0]))
function broadCandidates(profile: SpectrumModel['config']['profile']): [number, number, number][] {
  return [1000, 1800, 3000].map((w): [number, number, number] => (profile === 'lorentzian' ? [0, 0, w * 0.7] : [0, w, profile === 'voigt' ? 100 : 0]))
}

/** Copy parameters by name from a fitted model into a new model's starting vector. */
function transfer(from: FitOutcome, to: SpectrumModel): Float64Array {
  const p = to.initial()
  const index = new Map(from.model.names.map((name, i) => [name, i]))
  to.names.forEach((name, i) => {
    const j = index.get(name)
    if (j !== undefined) p[i] = from.p[j]
  })
  return p
}

/** Least starting intrinsic width, km/s: at σ = 0 the model does not change with σ to first order (σ_λ² = (λσ/c)² + σ_inst²). */
const MIN_START_WIDTH = 20

/**
 * The first narrow component's start: the moments of the lines (start.ts) when they are usable, else
 * the grid (project choice, README §13.7).
 */
function narrowStart(model: SpectrumModel, p: Float64Array, gi: number): Float64Array {
  const mom = kinematicMoments(model.pixels)
  if (!mom) return gridSearch(model, p, gi, narrowCandidates(model.config.profile))
  const g = model.groups[gi]
  const { lower, upper } = model.problem
  const out = Float64Array.from(p)
  const width = Math.max(mom.sigmaIntrinsic, MIN_START_WIDTH)
  out[g.v] = clamp(mom.velocity, lower[g.v], upper[g.v])
  out[g.s] = clamp(model.config.profile === 'lorentzian' ? 0 : width, lower[g.s], upper[g.s])
  if (g.g >= 0) out[g.g] = clamp(model.config.profile === 'lorentzian' ? 0.8 * width : 10, lower[g.g], upper[g.g])
  return out
}

function fitFromScratch(model: SpectrumModel): FitOutcome {
  let p = model.initial()
  model.groups.forEach((g, gi) => {
    if (g.kind === 'narrow' && g.component === 0) p = narrowStart(model, p, gi)
  })
  model.groups.forEach((g, gi) => {
    if (g.kind === 'absorption') p = gridSearch(model, p, gi, ABSORPTION_CANDIDATES)
    if (g.kind === 'broad') p = gridSearch(model, p, gi, broadCandidates(model.config.profile))
  })
  return runFit(model, p)
}

function withTwoComponents(cur: FitOutcome, make: (components: 1 | 2, broad: boolean) => SpectrumModel): FitOutcome {
  const model = make(2, cur.model.config.broad)
  const base = transfer(cur, model)
  const n0 = model.groups.find((g) => g.kind === 'narrow' && g.component === 0) as SpectrumModel['groups'][number]
  const n1 = model.groups.find((g) => g.kind === 'narrow' && g.component === 1) as SpectrumModel['groups'][number]
  const v = base[n0.v]
  const s = model.config.profile === 'lorentzian' ? base[n0.g] : base[n0.s]
  const set = (p: Float64Array, g: typeof n0, vel: number, width: number): void => {
    p[g.v] = clamp(vel, model.problem.lower[g.v], model.problem.upper[g.v])
    const idx = model.config.profile === 'lorentzian' ? g.g : g.s
    p[idx] = clamp(width, model.problem.lower[idx], model.problem.upper[idx])
    if (g.g >= 0 && model.config.profile === 'voigt') p[g.g] = base[n0.g]
  }
  let best: FitOutcome | null = null
  const starts: [number, number, number, number][] = [
    [v, 0.6 * s, v, 1.8 * s + 30],
    [v - 0.8 * s - 30, 0.7 * s, v + 0.8 * s + 30, 0.7 * s],
  ]
  for (const [v0, s0, v1, s1] of starts) {
    const p = Float64Array.from(base)
    set(p, n0, v0, s0)
    set(p, n1, v1, s1)
    const r = runFit(model, p)
    if (!best || r.chi2 < best.chi2) best = r
  }
  return best as FitOutcome
}

function withoutBroad(cur: FitOutcome, make: (components: 1 | 2, broad: boolean) => SpectrumModel): FitOutcome {
  const model = make(cur.model.config.components, false)
  return runFit(model, transfer(cur, model))
}

/** S/N of a flux parameter. */
function snrOf(o: FitOutcome, param: number | undefined): number {
  if (param === undefined) return 0
  const k = o.p.length
  const sd = Math.sqrt(o.covariance[param * k + param])
  return sd > 0 ? o.p[param] / sd : 0
}

/** Broad Hα detected: F/σ ≥ minSnr. */
function broadDetected(o: FitOutcome, minSnr: number): boolean {
  const s = snrOf(o, o.model.fluxParam.get(fluxKey('halpha', -1)))
  return s > 0 && s >= minSnr
}

/** Every narrow component has at least one line with F/σ ≥ minSnr. */
function componentsDetected(o: FitOutcome, minSnr: number): boolean {
  for (let c = 0; c < o.model.config.components; c++) {
    let any = false
    for (const [key, param] of o.model.fluxParam) {
      if (!key.endsWith(`:${c}`)) continue
      const s = snrOf(o, param)
      if (s > 0 && s >= minSnr) any = true
    }
    if (!any) return false
  }
  return true
}

/** The richer model wins when it lowers BIC by more than the threshold and its extra part is detected (README §13.7). */
export function prefersRicher(simple: FitOutcome, rich: FitOutcome, extraDetected: boolean): boolean {
  return simple.bic - rich.bic > BIC_THRESHOLD && extraDetected
}

/** The narrow components' kinematics of a fit, by parameter name: what a model of one window holds fixed. */
function narrowKinematics(o: FitOutcome): Map<string, number> {
  const held = new Map<string, number>()
  for (const g of o.model.groups) {
    if (g.kind !== 'narrow') continue
    for (const idx of [g.v, g.s, g.g]) if (idx >= 0) held.set(o.model.names[idx], o.p[idx])
  }
  return held
}

/** Parameters of a window's fit by name over a start vector of the whole model. */
function overlay(p: Float64Array, model: SpectrumModel, names: string[], values: Float64Array): Float64Array {
  const index = new Map(model.names.map((name, i) => [name, i]))
  names.forEach((name, i) => {
    const j = index.get(name)
    if (j !== undefined) p[j] = values[i]
  })
  return p
}

/** A window's fit is a start and a screen, not a result: it stops once a step gains less than this fraction of χ² (project choice). */
const WINDOW_STALL = 1e-6

/**
 * A part of the model that lives in one window (broad Hα, Na I D) fitted in that window alone with the
 * narrow kinematics held at those of `cur` (project choice, README §13.7): its start for the joint fit,
 * and the χ² of that window with and without it. The windows share no pixels and their continua and
 * fluxes are solved window by window, so χ² of the whole spectrum with the part and these kinematics is
 * χ²(cur) − χ²_window(without) + χ²_window(with): an upper bound on the joint fit's χ².
 */
function windowFit(cur: FitOutcome, wi: number, config: SpectrumModel['config'], pixels: FitSetup['pixels'], groupKind: 'broad' | 'absorption', candidates: [number, number, number][], covariance = false): { model: SpectrumModel; names: string[]; p: Float64Array; covariance: Float64Array; chi2With: number; chi2Without: number } {
  const held = narrowKinematics(cur)
  const sub = windowPixels(pixels, wi)
  const without = createSpectrumModel(withoutAbsorption(sub), { ...cur.model.config, broad: false }, held)
  const chi2Without = variableProjection(without.separable, transfer(cur, without), { covariance: false }).chi2
  const model = createSpectrumModel(sub, config, held)
  const gi = model.groups.findIndex((g) => g.kind === groupKind)
  const r = variableProjection(model.separable, gridSearch(model, transfer(cur, model), gi, candidates), { covariance, stallTolerance: WINDOW_STALL })
  return { model, names: model.names, p: r.p, covariance: r.covariance, chi2With: r.chi2, chi2Without }
}

/**
 * Broad Hα in the Hα window first (windowFit); the joint fit only when that alone gains at least half
 * the Δχ² the BIC test asks for (project choice, README §13.7: the joint fit can only gain more, and a
 * real broad line gains far more than the threshold), else the narrow fit stands.
 */
function tryBroad(cur: FitOutcome, setup: FitSetup, makeEmission: (components: 1 | 2, broad: boolean) => SpectrumModel, minSnr: number): FitOutcome {
  const pixels = cur.model.pixels
  const wi = pixels.windows.findIndex((w) => w.lines.some((l) => l.id === 'halpha'))
  if (wi < 0) return cur
  const model = makeEmission(cur.model.config.components, true)
  const part = windowFit(cur, wi, model.config, pixels, 'broad', broadCandidates(model.config.profile))
  const extra = freeParameters(model) - cur.k
  const needed = BIC_THRESHOLD + extra * Math.log(setup.pixels.n)
  if (part.chi2Without - part.chi2With < 0.5 * needed) return cur
  const cand = runFit(model, overlay(transfer(cur, model), model, part.names, part.p))
  return prefersRicher(cur, cand, broadDetected(cand, minSnr)) ? cand : cur
}

/** W(D2) + W(D1) detected in a fit: S/N ≥ minSnr from its covariance. */
function absorptionDetected(model: SpectrumModel, p: Float64Array, covariance: Float64Array, minSnr: number): boolean {
  if (!model.ewParam) return false
  const { d2, d1 } = model.ewParam
  const k = p.length
  const ew = p[d2] + p[d1]
  const variance = covariance[d2 * k + d2] + covariance[d1 * k + d1] + 2 * covariance[d2 * k + d1]
  return ew > 0 && variance > 0 && ew >= minSnr * Math.sqrt(variance)
}

/**
 * Na I D in its window first (windowFit), then the joint fit of everything from there (README §13.7).
 * Where the window finds no Na I D, its velocity and width are held in the joint fit at the window's
 * values (without absorption they shape nothing, and a fit of them only wanders): the equivalent widths
 * stay free and give the limit; should they still come out detected, the joint fit is rerun with all free.
 */
function addAbsorption(cur: FitOutcome, setup: FitSetup, make: (components: 1 | 2, broad: boolean, held?: ReadonlyMap<string, number>) => SpectrumModel, minSnr: number): FitOutcome {
  const wi = setup.pixels.windows.findIndex((w) => w.absorption.length > 0)
  const model = make(cur.model.config.components, cur.model.config.broad)
  if (wi < 0 || !model.ewParam) return cur
  const part = windowFit(cur, wi, { ...model.config, broad: false }, setup.pixels, 'absorption', ABSORPTION_CANDIDATES, true)
  const start = overlay(transfer(cur, model), model, part.names, part.p)
  if (absorptionDetected(part.model, part.p, part.covariance, minSnr)) return runFit(model, start)
  const g = model.groups.find((x) => x.kind === 'absorption') as SpectrumModel['groups'][number]
  const heldModel = make(cur.model.config.components, cur.model.config.broad, new Map([g.v, g.s].map((j) => [model.names[j], start[j]])))
  const held = runFit(heldModel, start)
  return absorptionDetected(held.model, held.p, held.covariance, minSnr) ? runFit(model, held.p) : held
}

/**
 * Choose components and broad Hα as the options ask (README §13.7): the emission lines first (Na I D
 * taken out of its window), broad Hα, then Na I D and the joint fit, then a second component.
 */
function chooseModel(setup: FitSetup, opts: ResolvedFitOptions, minSnr: number): FitOutcome {
  const emissionPixels = withoutAbsorption(setup.pixels)
  const config = (components: 1 | 2, broad: boolean) => ({ profile: opts.profile, components, broad: broad && setup.broadAllowed, hasInstrument: setup.hasInstrument })
  const make = (components: 1 | 2, broad: boolean, held?: ReadonlyMap<string, number>): SpectrumModel => createSpectrumModel(setup.pixels, config(components, broad), held)
  const makeEmission = (components: 1 | 2, broad: boolean): SpectrumModel => createSpectrumModel(emissionPixels, config(components, broad))
  const narrow = fitFromScratch(makeEmission(1, opts.broadHalpha === 'on'))
  const withBroad = opts.broadHalpha === 'auto' && setup.broadAllowed ? tryBroad(narrow, setup, makeEmission, minSnr) : narrow
  let cur = addAbsorption(withBroad, setup, make, minSnr)
  const joint = cur
  // the one-component fit without broad Hα, the second route below
  const first = (): FitOutcome => (withBroad === narrow ? joint : addAbsorption(narrow, setup, make, minSnr))
  if (opts.components === 2) cur = withTwoComponents(cur, make)
  else if (opts.components === 'auto') {
    const cand = withTwoComponents(cur, make)
    if (prefersRicher(cur, cand, componentsDetected(cand, minSnr))) cur = cand
  }
  if (opts.broadHalpha === 'auto' && cur.model.config.components === 2 && cur.model.config.broad) {
    // two narrow components without broad Hα, from both routes (the broad line can hold a local minimum)
    const a = withoutBroad(cur, make)
    const b = withTwoComponents(first(), make)
    const cand = b.chi2 < a.chi2 ? b : a
    if (!prefersRicher(cand, cur, broadDetected(cur, minSnr))) cur = cand
  }
  return cur
}

/** The Na I D doublet in vacuum rest wavelengths (the curve of growth is physics: README §14). */
const NAD_DOUBLET: Doublet = {
  strong: { f: NAD.d2.f, lambdaAngstrom: airToVacuum(NAD.d2.airAngstrom) },
  weak: { f: NAD.d1.f, lambdaAngstrom: airToVacuum(NAD.d1.airAngstrom) },
}

interface NadColumn { logN: number | null; b: number | null; regime: string }

function nadColumn(ewD2: number, ewD1: number): NadColumn {
  if (!(ewD2 > 0 && ewD1 > 0)) return { logN: null, b: null, regime: 'undefined' }
  const s = solveDoublet(ewD2, ewD1, NAD_DOUBLET)
  return { logN: s.n !== null && s.n > 0 ? Math.log10(s.n) : null, b: s.b, regime: s.regime }
}

/** Error of logN and b from the 2×2 covariance of W(D2), W(D1), by central differences. */
function nadColumnErrors(ewD2: number, ewD1: number, cov: [number, number, number]): { logN: number | null; b: number | null } {
  const h2 = 1e-3 * Math.sqrt(cov[0]) || 1e-6
  const h1 = 1e-3 * Math.sqrt(cov[2]) || 1e-6
  const at = (a: number, b: number) => nadColumn(a, b)
  const up2 = at(ewD2 + h2, ewD1), dn2 = at(ewD2 - h2, ewD1), up1 = at(ewD2, ewD1 + h1), dn1 = at(ewD2, ewD1 - h1)
  const err = (f: (c: NadColumn) => number | null): number | null => {
    const a = [f(up2), f(dn2), f(up1), f(dn1)]
    if (a.some((x) => x === null || !Number.isFinite(x))) return null
    const g2 = ((a[0] as number) - (a[1] as number)) / (2 * h2)
    const g1 = ((a[2] as number) - (a[3] as number)) / (2 * h1)
    return Math.sqrt(Math.max(0, g2 * g2 * cov[0] + 2 * g2 * g1 * cov[1] + g1 * g1 * cov[2]))
  }
  return { logN: err((c) => c.logN), b: err((c) => c.b) }
}

function parametersByName(names: string[], p: Float64Array): Record<string, number> {
  const out: Record<string, number> = {}
  for (let j = 0; j < names.length; j++) out[names[j]] = p[j]
  return out
}

const finite = (x: number | null | undefined): x is number => typeof x === 'number' && Number.isFinite(x)

/**
 * Fit one spectrum.
 *
 * @param spectrum  the spectrum object (arrays or typed arrays)
 * @param options   the `fit` options (defaults: one Gaussian component, broad Hα auto, Na I D)
 * @param context   `minSnr` from the diagnostics settings (default 3)
 * @returns lines, absorption, fit statistics, measurements for /diagnostics, flags
 * @throws {ScienceInputError} on arrays of unequal length, no or both of error/ivar, unsorted wavelengths
 */
export function fitSpectrum(spectrum: SpectrumInput, options: FitOptions = {}, context: FitContext = {}): SpectrumFitResult {
  const opts = resolveFitOptions(options)
  const minSnr = context.minSnr ?? 3
  const spec = prepareSpectrum(spectrum)
  const wantNad = opts.absorption.includes('nad')
  const setup = setupFit(spec, spectrum, opts.broadHalpha !== 'off', wantNad, opts.components === 1 ? 1 : 2)
  const flags = [...setup.flags]
  const result: SpectrumFitResult = {
    id: spectrum.id, lines: {}, absorption: {}, fit: { chi2: 0, dof: 0, components: 0, broadHalpha: false },
    measurements: { lines: {}, ew: {}, fwhm: {} }, flags,
  }
  if (setup.pixels.windows.length === 0) return result
  const best = chooseModel(setup, opts, minSnr)
  // what redraws the model on the spectrum (shared/spectra/redraw.ts): the windows' set-up, the configuration, the parameters by name
  result.model = {
    setup: { broad: opts.broadHalpha !== 'off', nad: wantNad, components: opts.components === 1 ? 1 : 2 },
    config: { ...best.model.config },
    parameters: parametersByName(best.model.names, best.p),
  }
  if (!best.converged) flags.push(flagName('fit-not-converged'))
  const zf = setup.zFactor
  const q = quantities(best.model, best.p, zf)
  let err = quantityErrors(best.model, best.p, best.covariance, zf, q)
  let nadErr: { logN: number | null; b: number | null } | null = null
  const nadCov = best.model.ewParam ? ewCovariance(best, zf) : null
  if (opts.monteCarlo.draws > 0) {
    const mc = monteCarloErrors(best, spectrum.id, opts.monteCarlo.draws, opts.monteCarlo.seed, zf)
    err = mc.errors
    nadErr = mc.nad
  } else if (nadCov) {
    nadErr = nadColumnErrors(q.get('nad.ewD2') as number, q.get('nad.ewD1') as number, nadCov)
  }
  result.fit = { chi2: best.chi2, dof: Math.max(0, setup.pixels.n - best.k), components: best.model.config.components, broadHalpha: best.model.config.broad }

  const lineInfo = new Map(best.model.pixels.windows.flatMap((w) => w.lines.map((l) => [l.id, l] as const)))
  for (const [id, line] of lineInfo) {
    const r = lineResult(id, q, err, minSnr, lineSigmaInstKmPerS(line), setup.hasInstrument, best.model.config.components)
    result.lines[id] = r
    if (r.detected && setup.hasInstrument && r.sigmaIntrinsic === 0) flags.push(flagName('unresolved', id))
  }
  if (best.model.config.broad) {
    const ha = lineInfo.get('halpha')
    if (ha) {
      const r = lineResult('halpha_broad', q, err, minSnr, lineSigmaInstKmPerS(ha), setup.hasInstrument, 1)
      result.lines.halpha_broad = r
      if (r.detected) result.measurements.fwhm.halpha_broad = FWHM_PER_SIGMA * r.sigmaIntrinsic
    }
  }
  if (opts.balmerAbsorptionEw > 0) applyBalmerAbsorption(result, best, opts.balmerAbsorptionEw, zf, flags)
  if (best.model.ewParam) {
    result.absorption.nad = nadResult(q, err, nadErr, minSnr)
    const hei = result.lines.hei_5876
    if (hei?.detected && heliumBlended(best, q, hei)) flags.push(flagName('blended', 'hei_5876'))
  }
  for (const [id, r] of Object.entries(result.lines)) {
    if (id === 'hei_5876') continue
    const key = id as LineId
    result.measurements.lines[key] = r.detected ? { flux: r.flux, error: r.error } : { upperLimit: r.upperLimit } satisfies MeasuredLine
    if (r.detected && finite(r.ew)) result.measurements.ew[key] = r.ew
  }
  return result
}

/** Covariance [var D2, cov, var D1] of the rest-frame Na I D equivalent widths. */
function ewCovariance(o: FitOutcome, zf: number): [number, number, number] {
  const [g2, g1] = quantityGradients(o.model, o.p, o.covariance, zf, ['nad.ewD2', 'nad.ewD1'])
  return [bilinear(g2, o.covariance, g2), bilinear(g2, o.covariance, g1), bilinear(g1, o.covariance, g1)]
}

function lineResult(id: string, q: Quantities, err: Map<string, number>, minSnr: number, sigmaInst: number, hasInstrument: boolean, components: number): LineResult {
  const flux = q.get(`${id}.flux`) as number
  const error = err.get(`${id}.flux`) as number
  const snr = error > 0 ? flux / error : 0
  if (!(flux > 0 && snr >= minSnr && error > 0)) return { detected: false, upperLimit: (minSnr > 0 ? minSnr : 1) * error }
  const sigma = q.get(`${id}.sigma`) as number
  const intrinsic2 = sigma * sigma - sigmaInst * sigmaInst
  const r: DetectedLine = {
    detected: true, flux, error, snr,
    velocity: q.get(`${id}.velocity`) as number, velocityError: err.get(`${id}.velocity`) as number,
    sigma, sigmaError: err.get(`${id}.sigma`) as number,
    sigmaIntrinsic: hasInstrument ? (intrinsic2 > 1e-6 * sigmaInst * sigmaInst ? Math.sqrt(intrinsic2) : 0) : sigma,
  }
  const ew = q.get(`${id}.ew`)
  const ewError = err.get(`${id}.ew`)
  if (finite(ew) && finite(ewError)) {
    r.ew = ew
    r.ewError = ewError
  }
  if (hasInstrument) r.sigmaInstrumental = sigmaInst
  const gamma = q.get(`${id}.gamma`)
  if (finite(gamma)) {
    r.gammaIntrinsic = gamma
    const ge = err.get(`${id}.gamma`)
    if (finite(ge)) r.gammaIntrinsicError = ge
  }
  if (components > 1 && q.has(`${id}.c0.flux`)) {
    r.components = []
    for (let c = 0; c < components; c++) {
      const s = q.get(`${id}.c${c}.sigma`) as number
      const i2 = s * s - (hasInstrument ? sigmaInst * sigmaInst : 0)
      const comp: LineComponent = {
        flux: q.get(`${id}.c${c}.flux`) as number, error: err.get(`${id}.c${c}.flux`) as number,
        velocity: q.get(`${id}.c${c}.velocity`) as number, velocityError: err.get(`${id}.c${c}.velocity`) as number,
        sigma: s, sigmaError: err.get(`${id}.c${c}.sigma`) as number, sigmaIntrinsic: i2 > 0 ? Math.sqrt(i2) : 0,
      }
      const g = q.get(`${id}.c${c}.gamma`)
      if (finite(g)) comp.gammaIntrinsic = g
      r.components.push(comp)
    }
  }
  return dropNonFinite(r)
}

/** Remove optional fields that are not finite (a response never holds NaN or ±Infinity). */
function dropNonFinite<T extends object>(r: T): T {
  for (const [k, v] of Object.entries(r)) if (typeof v === 'number' && !Number.isFinite(v)) delete (r as Record<string, unknown>)[k]
  return r
}

function nadResult(q: Quantities, err: Map<string, number>, colErr: { logN: number | null; b: number | null } | null, minSnr: number): NadResult {
  const ew = q.get('nad.ew') as number
  const ewError = err.get('nad.ew') as number
  const flags = [flagName('stellar-absorption-not-separated')]
  if (!(ew > 0 && ewError > 0 && ew / ewError >= minSnr)) return { detected: false, ewUpperLimit: (minSnr > 0 ? minSnr : 1) * ewError, flags, note: NAD_NOTE }
  const ewD2 = q.get('nad.ewD2') as number
  const ewD1 = q.get('nad.ewD1') as number
  const col = nadColumn(ewD2, ewD1)
  if (col.regime === 'linear') flags.push(flagName('doublet-ratio-linear'))
  else if (col.regime === 'saturated') flags.push(flagName('doublet-ratio-saturated'))
  else if (col.regime === 'undefined') flags.push(flagName('doublet-ratio-undefined'))
  const r: NadResult = {
    detected: true, ew, ewError, ewD2, ewD2Error: err.get('nad.ewD2') as number, ewD1, ewD1Error: err.get('nad.ewD1') as number,
    velocity: q.get('nad.velocity') as number, velocityError: err.get('nad.velocity') as number, flags, note: NAD_NOTE,
  }
  if (ewD2 > 0 && ewD1 > 0) {
    r.doubletRatio = q.get('nad.doubletRatio') as number
    r.doubletRatioError = err.get('nad.doubletRatio') as number
  }
  if (col.logN !== null) {
    r.logN = col.logN
    if (colErr?.logN != null) r.logNError = colErr.logN
  }
  if (col.b !== null) {
    r.b = col.b
    if (colErr?.b != null) r.bError = colErr.b
  }
  return dropNonFinite(r)
}

/** He I 5876 and Na I D2 overlap when their centres lie within 2 (σ_HeI + σ_D2), observed (project choice, README §14). */
function heliumBlended(o: FitOutcome, q: Quantities, hei: DetectedLine): boolean {
  const w = o.model.pixels.windows.find((x) => x.absorption.length > 0)
  const line = w?.lines.find((l) => l.id === 'hei_5876')
  const d2 = w?.absorption.find((a) => a.key === 'd2')
  const abs = o.model.groups.find((g) => g.kind === 'absorption')
  if (!w || !line || !d2 || !abs) return false
  const lh = line.expectedAngstrom * (1 + hei.velocity / C)
  const sh = (lh * hei.sigma) / C
  const ld = d2.expectedAngstrom * (1 + (q.get('nad.velocity') as number) / C)
  const sInst = lineSigmaInstKmPerS(d2)
  const sd = (ld * Math.sqrt(o.p[abs.s] ** 2 + sInst ** 2)) / C
  return Math.abs(lh - ld) < 2 * (sh + sd)
}

/** Add a fixed rest-frame absorption EW back to the narrow Balmer lines (README §13.9). */
function applyBalmerAbsorption(result: SpectrumFitResult, o: FitOutcome, ewAbs: number, zf: number, flags: string[]): void {
  let any = false
  o.model.pixels.windows.forEach((w, wi) => {
    for (const line of w.lines) {
      if (!BALMER_LINES.includes(line.id)) continue
      const r = result.lines[line.id]
      if (!r) continue
      const [i0, i1] = o.model.continuum[wi]
      const cont = o.p[i0] + o.p[i1] * ((line.expectedAngstrom - w.mid) / w.half)
      if (!(cont > 0)) continue
      const add = ewAbs * zf * cont
      if (r.detected) {
        r.flux += add
        if (r.ew !== undefined) r.ew += ewAbs
        r.snr = r.flux / r.error
      } else r.upperLimit += add
      any = true
    }
  })
  if (any) flags.push(flagName('balmer-absorption-corrected'))
}

/**
 * Errors as the 16th–84th percentile half-width over refits of seeded noisy copies y + σ·N(0, 1)
 * (README §13.9); the stream is seeded by the seed mixed with a hash of the spectrum id.
 */
export function monteCarloErrors(o: FitOutcome, id: string, draws: number, seed: number, zf: number): { errors: Map<string, number>; nad: { logN: number | null; b: number | null } } {
  const { pixels } = o.model
  const y0 = Float64Array.from(pixels.y)
  const rng = createRng(galaxySeed(seed, id))
  const samples = new Map<string, Float64Array>()
  const logN = new Float64Array(draws).fill(NaN)
  const bs = new Float64Array(draws).fill(NaN)
  try {
    for (let d = 0; d < draws; d++) {
      for (let j = 0; j < pixels.n; j++) pixels.y[j] = y0[j] + pixels.sigma[j] * rng.nextNormal()
      const r = variableProjection(o.model.separable, o.p, { maxIterations: 60, covariance: false })
      const q = quantities(o.model, r.p, zf)
      for (const [key, value] of q) {
        let a = samples.get(key)
        if (!a) samples.set(key, (a = new Float64Array(draws).fill(NaN)))
        a[d] = value
      }
      if (o.model.ewParam) {
        const col = nadColumn(q.get('nad.ewD2') as number, q.get('nad.ewD1') as number)
        if (col.logN !== null) logN[d] = col.logN
        if (col.b !== null) bs[d] = col.b
      }
    }
  } finally {
    pixels.y.set(y0)
  }
  const half = (a: Float64Array): number => {
    const p = percentiles16_50_84(a)
    return p ? 0.5 * (p.p84 - p.p16) : NaN
  }
  const errors = new Map<string, number>()
  for (const [key, a] of samples) errors.set(key, half(a))
  const ln = half(logN)
  const b = half(bs)
  return { errors, nad: { logN: Number.isFinite(ln) ? ln : null, b: Number.isFinite(b) ? b : null } }
}
