/**
 * The spectrum model of a fit: in each window a straight-line continuum times (1 − Na I D absorption)
 * plus pixel-averaged emission profiles; narrow lines of one component share a velocity and an
 * intrinsic width, tied doublets share their parent's flux parameter (shared/science/README.md §13.6).
 *
 * Parameters (km/s for kinematics, flux units × Å for fluxes, Å for Na I D equivalent widths):
 * per window c₀, c₁; per kinematic group v, σ (Gaussian part, intrinsic), γ (Lorentzian HWHM,
 * intrinsic; Lorentzian and Voigt profiles only); one flux per free line and component; W(D2), W(D1).
 * Line centre λ_c = (1 + z) λ_rest (1 + v/c); observed Gaussian σ_λ² = (λ_c σ/c)² + σ_inst,λ²
 * (σ_inst at the expected centre). Jacobian: exact for the linear parameters and for Gaussian
 * kinematics, central differences (0.01 km/s) for Lorentzian and Voigt kinematics.
 *
 * The model is separable (variable-projection.ts): for fixed kinematics and Na I D equivalent widths
 * it is linear in the continua and fluxes, which `separable.project` solves window by window (the
 * windows share no pixels, so the linear normal matrix is block diagonal, one small block a window).
 */
import { CholeskyDecomposition, Matrix, pseudoInverse } from 'ml-matrix'
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import type { FitLineId } from './lines.ts'
import type { LeastSquaresProblem } from './levenberg-marquardt.ts'
import { chiSquare, choleskyFactor, choleskySolve } from './levenberg-marquardt.ts'
import { GAUSS_CUT, gaussianPixelDerivatives, gaussianPixels, lorentzianPixels, voigtPixels } from './profiles.ts'
import type { SeparableProblem } from './variable-projection.ts'
import { lowerBound } from './windows.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

export type ProfileKind = 'gaussian' | 'lorentzian' | 'voigt'

/** An emission line placed in a window. */
export interface WindowLine {
  id: FitLineId
  /** rest wavelength in the spectrum's medium (Å) */
  restAngstrom: number
  /** (1 + z) λ_rest (Å) */
  expectedAngstrom: number
  /** instrumental σ at the expected centre (observed Å); 0 without a resolution */
  sigmaInstAngstrom: number
  /** flux tied to this covered line: F = F(parent)/ratio */
  parent?: FitLineId
  ratio?: number
}

/** One line of the Na I D doublet placed in its window. */
export interface AbsorptionLine {
  key: 'd2' | 'd1'
  restAngstrom: number
  expectedAngstrom: number
  sigmaInstAngstrom: number
  f: number
}

/** One fit window: rows [start, end) of the fit pixels. */
export interface FitWindow {
  id: string
  start: number
  end: number
  /** t = (λ − mid)/half for the continuum */
  mid: number
  half: number
  lines: WindowLine[]
  absorption: AbsorptionLine[]
  /** starting continuum from the side bands */
  continuum0: number
  continuum1: number
}

/** The pixels a fit uses, window after window. */
export interface FitPixels {
  n: number
  lambda: Float64Array
  lo: Float64Array
  hi: Float64Array
  y: Float64Array
  sigma: Float64Array
  weight: Float64Array
  windows: FitWindow[]
}

export interface ModelConfig {
  profile: ProfileKind
  components: 1 | 2
  broad: boolean
  hasInstrument: boolean
}

export type GroupKind = 'narrow' | 'broad' | 'absorption'

/** A kinematic group: its parameter indices (γ = −1 when the profile has none). */
export interface KinematicGroup {
  kind: GroupKind
  component: number
  v: number
  s: number
  g: number
  start: number
  end: number
}

interface Term {
  window: number
  group: number
  /** flux (emission) or equivalent-width (absorption) parameter */
  param: number
  mult: number
  absorption: boolean
  expected: number
  sigmaInst: number
  /** the profile at fit rows of its window (carveRows) */
  buf: Float64Array
  /** rows [r0, r1) of the window where buf may be non-zero (Gaussians vanish beyond 8σ); buf is 0 elsewhere */
  r0: number
  r1: number
}

/** Bounds of the kinematic parameters, km/s (project choice, shared/science/README.md §13.6). */
export const KINEMATIC_BOUNDS = Object.freeze({
  narrow: { v: [-1000, 1000], s: [0, 700], g: [0, 700] },
  broad: { v: [-3000, 3000], s: [500, 6000], g: [300, 5000] },
  absorption: { v: [-1000, 1000], s: [0, 600] },
})
/** Least intrinsic width without an instrumental resolution (a zero width would be a delta function), km/s. */
export const MIN_WIDTH_WITHOUT_INSTRUMENT = 1
/** Reach of a Gaussian term in σ: a hair beyond the cut of gaussianPixels, which still decides each pixel itself. */
const GAUSS_REACH = GAUSS_CUT * (1 + 1e-9)
/** First row in [a, b) with edges[row] > x (edges ascending there). */
function firstAbove(edges: Float64Array, a: number, b: number, x: number): number {
  while (a < b) {
    const mid = (a + b) >>> 1
    if (edges[mid] <= x) a = mid + 1
    else b = mid
  }
  return a
}
/** Finite-difference step of the kinematic parameters, km/s. */
const KIN_STEP = 0.01

/** The model of one configuration on one set of fit pixels. */
export interface SpectrumModel {
  config: ModelConfig
  pixels: FitPixels
  names: string[]
  groups: KinematicGroup[]
  /** continuum parameters [c₀, c₁] per window */
  continuum: [number, number][]
  /** flux parameter of (line, component); component −1 = broad Hα */
  fluxParam: Map<string, number>
  /** equivalent-width parameter of D2 and D1 (observed Å) */
  ewParam: { d2: number; d1: number } | null
  problem: LeastSquaresProblem
  /** starting vector: side-band continua, fluxes 0, kinematics at the middle of the usual range */
  initial(): Float64Array
  /**
   * solve the linear parameters (continua, fluxes, equivalent widths) for the kinematics in p, in every
   * window or only in those of one group; returns χ² of those windows, or as soon as the χ² of the windows
   * solved so far exceeds `stopAbove`, that partial sum (≥ the full one would be: p is then half-solved)
   */
  solveLinear(p: Float64Array, group?: number, stopAbove?: number): number
  chi2(p: Float64Array): number
  evaluate(p: Float64Array, out: Float64Array): void
  /** the same χ² as a separable problem: kinematics and Na I D widths iterated, continua and fluxes projected (README §13.7) */
  separable: SeparableProblem
}

/** Key of a flux parameter. */
export const fluxKey = (line: string, component: number): string => `${line}:${component}`

const NO_ROWS = new Float64Array(0)

/**
 * One array per term, indexed by fit row like the pixel arrays but backed only over the rows of the
 * term's window [start, end) — the only rows its profile is ever written or read at — all in one
 * buffer (a fit builds several models; many pixel-length arrays cost allocation and collection).
 * Terms come window by window, so each view's storage lies at or beyond its window's first row; the
 * rows in front of a view alias earlier storage and are never touched.
 */
function windowRows(windowed: { start: number; end: number }[]): Float64Array[] {
  let size = 0
  let pad = 0
  for (const w of windowed) {
    pad = Math.max(pad, w.start - size)
    size += w.end - w.start
  }
  const buffer = new ArrayBuffer(8 * (size + pad))
  let offset = pad
  return windowed.map((w) => {
    const view = new Float64Array(buffer, 8 * (offset - w.start), w.end)
    offset += w.end - w.start
    return view
  })
}

/**
 * Work arrays shared by every model of one set of fit pixels: t of the continuum, and scratch that a
 * model fills and reads within one call (or between `project` and the `reduced` after it). A fit runs
 * its models one at a time, synchronously, so they never interleave.
 */
interface PixelWork {
  t: Float64Array
  dCentre: Float64Array
  dSigma: Float64Array
  /** 1 − A(λ) in the Na I D window, 1 elsewhere */
  damp: Float64Array
  /** the model at the last projection */
  model: Float64Array
  weighted: Float64Array
  /** central differences: a profile, the plus and the minus contribution */
  fd: Float64Array[]
  /** columns of the non-linear parameters, as many as the largest model needed so far */
  columns: Float64Array[]
}
/** keyed by the wavelength array, so that views of the same pixels (withoutAbsorption) share their work arrays */
const pixelWork = new WeakMap<Float64Array, PixelWork>()

function workOf(pixels: FitPixels): PixelWork {
  let w = pixelWork.get(pixels.lambda)
  if (!w) {
    const n = pixels.n
    const buffer = new ArrayBuffer(8 * 9 * n)
    const [t, dCentre, dSigma, damp, model, weighted, f0, f1, f2] = Array.from({ length: 9 }, (_, i) => new Float64Array(buffer, 8 * i * n, n))
    for (const win of pixels.windows) for (let j = win.start; j < win.end; j++) t[j] = (pixels.lambda[j] - win.mid) / win.half
    damp.fill(1)
    w = { t, dCentre, dSigma, damp, model, weighted, fd: [f0, f1, f2], columns: [] }
    pixelWork.set(pixels.lambda, w)
  }
  return w
}

/** At least `count` non-linear columns of the pixels' work arrays (grown on demand). */
function workColumns(work: PixelWork, n: number, count: number): Float64Array[] {
  while (work.columns.length < count) work.columns.push(new Float64Array(n))
  return work.columns
}

/** The same fit pixels with the Na I D lines taken out of their window (its continuum and He I 5876 stay): an emission-only model. */
export function withoutAbsorption(pixels: FitPixels): FitPixels {
  return { ...pixels, windows: pixels.windows.map((w) => (w.absorption.length ? { ...w, absorption: [] } : w)) }
}

/** One window of the fit pixels on its own (views, not copies): a model of that window alone. */
export function windowPixels(pixels: FitPixels, wi: number): FitPixels {
  const w = pixels.windows[wi]
  const view = (a: Float64Array): Float64Array => a.subarray(w.start, w.end)
  return {
    n: w.end - w.start, lambda: view(pixels.lambda), lo: view(pixels.lo), hi: view(pixels.hi), y: view(pixels.y), sigma: view(pixels.sigma), weight: view(pixels.weight),
    windows: [{ ...w, start: 0, end: w.end - w.start }],
  }
}

/**
 * Build the model of a configuration.
 *
 * @param pixels  fit pixels and windows
 * @param config  profile, number of narrow components, broad Hα, whether a resolution is known
 * @param held    parameters held at a value by name (bounds [x, x]: neither iterated nor counted as free)
 */
export function createSpectrumModel(pixels: FitPixels, config: ModelConfig, held?: ReadonlyMap<string, number>): SpectrumModel {
  const { n, windows } = pixels
  const names: string[] = []
  const lower: number[] = []
  const upper: number[] = []
  const start: number[] = []
  const end: number[] = []
  const add = (name: string, lo: number, hi: number, s: number, e: number): number => {
    names.push(name)
    lower.push(lo)
    upper.push(hi)
    start.push(s)
    end.push(e)
    return names.length - 1
  }
  const continuum: [number, number][] = windows.map((w) => [add(`${w.id}.c0`, -Infinity, Infinity, w.start, w.end), add(`${w.id}.c1`, -Infinity, Infinity, w.start, w.end)])
  const minWidth = config.hasInstrument ? 0 : MIN_WIDTH_WITHOUT_INSTRUMENT
  const hasGamma = config.profile !== 'gaussian'
  const hasSigma = config.profile !== 'lorentzian'
  const groups: KinematicGroup[] = []
  const addGroup = (kind: GroupKind, component: number, s: number, e: number): number => {
    const b = KINEMATIC_BOUNDS[kind]
    const label = kind === 'narrow' ? `n${component}` : kind
    const v = add(`${label}.v`, b.v[0], b.v[1], s, e)
    const absorption = kind === 'absorption'
    // a Lorentzian profile has no intrinsic Gaussian part: its σ is held at 0
    const sIdx = add(`${label}.s`, hasSigma || absorption ? Math.max(b.s[0], kind === 'broad' ? b.s[0] : minWidth) : 0,
      hasSigma || absorption ? b.s[1] : 0, s, e)
    let g = -1
    if (hasGamma && !absorption) {
      const gb = (b as { g: number[] }).g
      const gLow = config.profile === 'lorentzian' ? Math.max(gb[0], kind === 'broad' ? gb[0] : minWidth) : kind === 'broad' ? 0 : gb[0]
      g = add(`${label}.g`, gLow, gb[1], s, e)
    }
    groups.push({ kind, component, v, s: sIdx, g, start: s, end: e })
    return groups.length - 1
  }
  const emissionWindows = windows.filter((w) => w.lines.length > 0)
  const allStart = emissionWindows.length ? Math.min(...emissionWindows.map((w) => w.start)) : 0
  const allEnd = emissionWindows.length ? Math.max(...emissionWindows.map((w) => w.end)) : 0
  const narrow: number[] = []
  for (let k = 0; k < config.components; k++) narrow.push(addGroup('narrow', k, allStart, allEnd))
  const haWindow = windows.findIndex((w) => w.lines.some((l) => l.id === 'halpha'))
  const broadGroup = config.broad && haWindow >= 0 ? addGroup('broad', 0, windows[haWindow].start, windows[haWindow].end) : -1
  const nadWindow = windows.findIndex((w) => w.absorption.length > 0)
  const absGroup = nadWindow >= 0 ? addGroup('absorption', 0, windows[nadWindow].start, windows[nadWindow].end) : -1

  const fluxParam = new Map<string, number>()
  const terms: Term[] = []
  windows.forEach((w, wi) => {
    for (const line of w.lines) {
      if (line.parent) continue
      for (let k = 0; k < config.components; k++) fluxParam.set(fluxKey(line.id, k), add(`${line.id}.f${k}`, 0, Infinity, w.start, w.end))
      if (line.id === 'halpha' && broadGroup >= 0) fluxParam.set(fluxKey('halpha', -1), add('halpha_broad.f', 0, Infinity, w.start, w.end))
    }
    for (const line of w.lines) {
      const owner = line.parent ?? line.id
      const mult = line.parent ? 1 / (line.ratio as number) : 1
      for (let k = 0; k < config.components; k++) {
        terms.push({ window: wi, group: narrow[k], param: fluxParam.get(fluxKey(owner, k)) as number, mult, absorption: false,
          expected: line.expectedAngstrom, sigmaInst: line.sigmaInstAngstrom, buf: NO_ROWS, r0: w.start, r1: w.start })
      }
      if (line.id === 'halpha' && broadGroup >= 0) {
        terms.push({ window: wi, group: broadGroup, param: fluxParam.get(fluxKey('halpha', -1)) as number, mult: 1, absorption: false,
          expected: line.expectedAngstrom, sigmaInst: line.sigmaInstAngstrom, buf: NO_ROWS, r0: w.start, r1: w.start })
      }
    }
  })
  let ewParam: { d2: number; d1: number } | null = null
  if (nadWindow >= 0) {
    const w = windows[nadWindow]
    const d2 = add('nad.d2', 0, Infinity, w.start, w.end)
    const d1 = add('nad.d1', 0, Infinity, w.start, w.end)
    ewParam = { d2, d1 }
    for (const a of w.absorption) {
      terms.push({ window: nadWindow, group: absGroup, param: a.key === 'd2' ? d2 : d1, mult: 1, absorption: true,
        expected: a.expectedAngstrom, sigmaInst: a.sigmaInstAngstrom, buf: NO_ROWS, r0: w.start, r1: w.start })
    }
  }
  const k = names.length
  if (held) {
    names.forEach((name, j) => {
      const x = held.get(name)
      if (x !== undefined) lower[j] = upper[j] = x
    })
  }
  const { lo, hi, lambda } = pixels
  const shared = workOf(pixels)
  const { t, dCentre, dSigma } = shared
  const profileRows = windowRows(terms.map((tm) => windows[tm.window]))
  terms.forEach((tm, q) => { tm.buf = profileRows[q] })
  const termsOfGroup = groups.map((_, gi) => terms.filter((tm) => tm.group === gi))
  const termsOfWindow = windows.map((_, wi) => terms.filter((tm) => tm.window === wi))
  /** the linear parameters of each window: c₀, c₁, then its flux / EW parameters; and each term's slot among them */
  const linearParams = windows.map((_, wi) => [continuum[wi][0], continuum[wi][1], ...new Set(termsOfWindow[wi].map((tm) => tm.param))])
  const ownSlot = windows.map((_, wi) => termsOfWindow[wi].map((tm) => linearParams[wi].indexOf(tm.param)))

  const profileInto = (tm: Term, v: number, s: number, g: number, out: Float64Array): void => {
    const w = windows[tm.window]
    const lc = tm.expected * (1 + v / C)
    const si = tm.sigmaInst
    if (tm.absorption || config.profile === 'gaussian') {
      const sl = lc * s / C
      gaussianPixels(lo, hi, w.start, w.end, lc, Math.sqrt(sl * sl + si * si), out)
      return
    }
    const gamma = lc * g / C
    if (config.profile === 'lorentzian') {
      if (si > 0) voigtPixels(lo, hi, w.start, w.end, lc, si, gamma, out)
      else lorentzianPixels(lo, hi, w.start, w.end, lc, gamma, out)
      return
    }
    const sl = lc * s / C
    voigtPixels(lo, hi, w.start, w.end, lc, Math.sqrt(sl * sl + si * si), gamma, out)
  }
  /** the term's own profile into tm.buf, computed only where a Gaussian can be non-zero (the same values gaussianPixels gives there) */
  const termProfile = (tm: Term, v: number, s: number, g: number): void => {
    const w = windows[tm.window]
    const b = tm.buf
    if (tm.absorption || config.profile === 'gaussian') {
      const lc = tm.expected * (1 + v / C)
      const sl = lc * s / C
      const sigma = Math.sqrt(sl * sl + tm.sigmaInst * tm.sigmaInst)
      const reach = GAUSS_REACH * sigma
      const r0 = lowerBound(hi, lc - reach, w.start, w.end)
      const r1 = Math.max(r0, firstAbove(lo, w.start, w.end, lc + reach))
      if (tm.r0 < r0) b.fill(0, tm.r0, Math.min(r0, tm.r1))
      if (tm.r1 > r1) b.fill(0, Math.max(r1, tm.r0), tm.r1)
      gaussianPixels(lo, hi, r0, r1, lc, sigma, b)
      tm.r0 = r0
      tm.r1 = r1
      return
    }
    profileInto(tm, v, s, g, b)
    tm.r0 = w.start
    tm.r1 = w.end
  }
  const kin = (p: Float64Array, gi: number): [number, number, number] => {
    const gr = groups[gi]
    return [p[gr.v], p[gr.s], gr.g >= 0 ? p[gr.g] : 0]
  }
  const lastP = new Float64Array(k).fill(NaN)
  const profiles = (p: Float64Array): void => {
    let same = true
    for (let j = 0; j < k; j++) if (p[j] !== lastP[j]) { same = false; break }
    if (same) return
    lastP.set(p)
    for (const tm of terms) {
      const gr = groups[tm.group]
      termProfile(tm, p[gr.v], p[gr.s], gr.g >= 0 ? p[gr.g] : 0)
    }
  }
  const absorptionAt = (wi: number, p: Float64Array, j: number): number => {
    let a = 0
    for (const tm of termsOfWindow[wi]) if (tm.absorption && j >= tm.r0 && j < tm.r1) a += p[tm.param] * tm.buf[j]
    return a
  }
  const assembleWindow = (p: Float64Array, wi: number, out: Float64Array): void => {
    {
      const w = windows[wi]
      const [i0, i1] = continuum[wi]
      const c0 = p[i0]
      const c1 = p[i1]
      const hasAbs = w.absorption.length > 0
      for (let j = w.start; j < w.end; j++) out[j] = (c0 + c1 * t[j]) * (hasAbs ? 1 - absorptionAt(wi, p, j) : 1)
      for (const tm of termsOfWindow[wi]) {
        if (tm.absorption) continue
        const f = p[tm.param] * tm.mult
        const b = tm.buf
        for (let j = tm.r0; j < tm.r1; j++) out[j] += f * b[j]
      }
    }
  }
  const assemble = (p: Float64Array, out: Float64Array): void => {
    for (let wi = 0; wi < windows.length; wi++) assembleWindow(p, wi, out)
  }
  const evaluate = (p: Float64Array, out: Float64Array): void => {
    profiles(p)
    assemble(p, out)
  }
  /** contribution of one kinematic group at kinematics (v, s, g) into acc over the group's rows */
  const groupContribution = (p: Float64Array, gi: number, v: number, s: number, g: number, acc: Float64Array): void => {
    const gr = groups[gi]
    acc.fill(0, gr.start, gr.end)
    const scratch = shared.fd[0]
    for (const tm of termsOfGroup[gi]) {
      profileInto(tm, v, s, g, scratch)
      const w = windows[tm.window]
      if (tm.absorption) {
        const [i0, i1] = continuum[tm.window]
        const amp = p[tm.param]
        for (let j = w.start; j < w.end; j++) acc[j] -= (p[i0] + p[i1] * t[j]) * amp * scratch[j]
      } else {
        const f = p[tm.param] * tm.mult
        for (let j = w.start; j < w.end; j++) acc[j] += f * scratch[j]
      }
    }
  }
  /** ∂m/∂v and ∂m/∂σ of a Gaussian group in closed form (chain rule through λ_c and σ_λ). */
  const gaussianGroupColumns = (p: Float64Array, gi: number, cols: Float64Array[]): void => {
    const gr = groups[gi]
    const cv = cols[gr.v]
    const cs = cols[gr.s]
    cv.fill(0, gr.start, gr.end)
    cs.fill(0, gr.start, gr.end)
    const v = p[gr.v]
    const sv = p[gr.s]
    for (const tm of termsOfGroup[gi]) {
      const dlcdv = tm.expected / C
      const lc = tm.expected * (1 + v / C)
      const sl = (lc * sv) / C
      const sigma = Math.sqrt(sl * sl + tm.sigmaInst * tm.sigmaInst)
      // the profile means of p are in tm.buf (profiles(p) ran); only the derivatives, only where the profile reaches
      const r0 = tm.r0
      const r1 = tm.r1
      gaussianPixelDerivatives(lo, hi, r0, r1, lc, sigma, dCentre, dSigma)
      const dsdv = ((sv / C) * (sv / C) * lc * dlcdv) / sigma
      const dsds = ((lc / C) * (lc / C) * sv) / sigma
      if (tm.absorption) {
        const [i0, i1] = continuum[tm.window]
        const amp = p[tm.param]
        for (let j = r0; j < r1; j++) {
          const f = -(p[i0] + p[i1] * t[j]) * amp
          cv[j] += f * (dCentre[j] * dlcdv + dSigma[j] * dsdv)
          cs[j] += f * dSigma[j] * dsds
        }
      } else {
        const f = p[tm.param] * tm.mult
        for (let j = r0; j < r1; j++) {
          cv[j] += f * (dCentre[j] * dlcdv + dSigma[j] * dsdv)
          cs[j] += f * dSigma[j] * dsds
        }
      }
    }
  }
  /** ∂m/∂(v, σ, γ) of one group into cols[v], cols[s], cols[g] over the group's rows: closed form for Gaussians, else central differences */
  const kinematicColumns = (p: Float64Array, gi: number, cols: Float64Array[]): void => {
    const gr = groups[gi]
    if (gr.kind === 'absorption' || config.profile === 'gaussian') {
      gaussianGroupColumns(p, gi, cols)
      return
    }
    const base = kin(p, gi)
    for (let q = 0; q < 3; q++) {
      const idx = q === 0 ? gr.v : q === 1 ? gr.s : gr.g
      if (idx < 0) continue
      const col = cols[idx]
      if (upper[idx] <= lower[idx]) {
        col.fill(0, gr.start, gr.end)
        continue
      }
      const up = base.slice() as [number, number, number]
      const down = base.slice() as [number, number, number]
      const hUp = Math.min(KIN_STEP, upper[idx] - base[q])
      const hDown = Math.min(KIN_STEP, base[q] - lower[idx])
      const [, plus, minus] = shared.fd
      up[q] += hUp
      down[q] -= hDown
      groupContribution(p, gi, up[0], up[1], up[2], plus)
      groupContribution(p, gi, down[0], down[1], down[2], minus)
      const inv = 1 / (hUp + hDown)
      for (let j = gr.start; j < gr.end; j++) col[j] = (plus[j] - minus[j]) * inv
    }
  }
  const fluxParams = [...new Set(terms.map((tm) => tm.param))]
  const jacobian = (p: Float64Array, _m: Float64Array, cols: Float64Array[]): void => {
    profiles(p)
    windows.forEach((w, wi) => {
      const [i0, i1] = continuum[wi]
      const a0 = cols[i0]
      const a1 = cols[i1]
      const hasAbs = w.absorption.length > 0
      for (let j = w.start; j < w.end; j++) {
        const damp = hasAbs ? 1 - absorptionAt(wi, p, j) : 1
        a0[j] = damp
        a1[j] = t[j] * damp
      }
    })
    for (const idx of fluxParams) cols[idx].fill(0, start[idx], end[idx])
    for (const tm of terms) {
      const w = windows[tm.window]
      const col = cols[tm.param]
      const b = tm.buf
      if (tm.absorption) {
        const [i0, i1] = continuum[tm.window]
        for (let j = w.start; j < w.end; j++) col[j] -= (p[i0] + p[i1] * t[j]) * b[j]
      } else {
        for (let j = tm.r0; j < tm.r1; j++) col[j] += tm.mult * b[j]
      }
    }
    for (let gi = 0; gi < groups.length; gi++) kinematicColumns(p, gi, cols)
  }
  const problem: LeastSquaresProblem = {
    y: pixels.y, weight: pixels.weight,
    lower: Float64Array.from(lower), upper: Float64Array.from(upper),
    columnStart: Int32Array.from(start), columnEnd: Int32Array.from(end),
    model: evaluate, jacobian,
  }
  let modelBuf: Float64Array | null = null
  const chi2 = (p: Float64Array): number => {
    modelBuf ??= new Float64Array(n)
    evaluate(p, modelBuf)
    return chiSquare(pixels.y, pixels.weight, modelBuf)
  }
  const initial = (): Float64Array => {
    const p = new Float64Array(k)
    windows.forEach((w, wi) => {
      p[continuum[wi][0]] = w.continuum0
      p[continuum[wi][1]] = w.continuum1
    })
    for (const gr of groups) {
      p[gr.v] = 0
      p[gr.s] = Math.min(problem.upper[gr.s], Math.max(problem.lower[gr.s], gr.kind === 'broad' ? 1500 : 100))
      if (gr.g >= 0) p[gr.g] = Math.min(problem.upper[gr.g], Math.max(problem.lower[gr.g], gr.kind === 'broad' ? 1000 : config.profile === 'lorentzian' ? 80 : 20))
    }
    return p
  }
  const maxLinear = Math.max(2, ...linearParams.map((lp) => lp.length))
  const na = new Float64Array(maxLinear * maxLinear)
  const nb = new Float64Array(maxLinear)
  const bj = new Float64Array(maxLinear)
  const xs = new Float64Array(maxLinear)
  const active = new Uint8Array(maxLinear)
  const factor = new Float64Array(maxLinear * maxLinear)
  const work = new Float64Array(maxLinear * maxLinear)
  const groupWindows = groups.map((_, gi) => [...new Set(termsOfGroup[gi].map((tm) => tm.window))])
  const allWindows = windows.map((_, wi) => wi)
  const solveLinear = (p: Float64Array, group?: number, stopAbove = Infinity): number => {
    const chosen = group === undefined ? allWindows : groupWindows[group]
    lastP.fill(NaN)
    const { weight, y } = pixels
    let total = 0
    for (const wi of chosen) {
      if (total > stopAbove) return total
      for (const tm of termsOfWindow[wi]) {
        const gr = groups[tm.group]
        termProfile(tm, p[gr.v], p[gr.s], gr.g >= 0 ? p[gr.g] : 0)
      }
      const w = windows[wi]
      const own = termsOfWindow[wi]
      const params = linearParams[wi]
      const m = params.length
      const slot = ownSlot[wi]
      na.fill(0, 0, m * m)
      nb.fill(0, 0, m)
      const c0 = w.continuum0
      const c1 = w.continuum1
      // the continuum block over every row, the rest only where some profile is non-zero (zeros add nothing)
      let s00 = 0, s01 = 0, s11 = 0, b0 = 0, b1 = 0, yy = 0
      let u0 = w.end
      let u1 = w.start
      for (const tm of own) {
        if (tm.r0 < tm.r1) {
          u0 = Math.min(u0, tm.r0)
          u1 = Math.max(u1, tm.r1)
        }
      }
      for (let j = w.start; j < w.end; j++) {
        const wt = weight[j]
        const tj = t[j]
        const wy = wt * y[j]
        s00 += wt
        s01 += wt * tj
        s11 += wt * tj * tj
        b0 += wy
        b1 += wy * tj
        yy += wy * y[j]
      }
      na[0] = s00
      na[1] = s01
      na[m + 1] = s11
      nb[0] = b0
      nb[1] = b1
      for (let j = u0; j < u1; j++) {
        bj.fill(0, 2, m)
        let any = false
        for (let q = 0; q < own.length; q++) {
          const tm = own[q]
          if (j < tm.r0 || j >= tm.r1) continue
          const b = tm.buf[j]
          if (b === 0) continue
          bj[slot[q]] += tm.absorption ? -(c0 + c1 * t[j]) * b : tm.mult * b
          any = true
        }
        if (!any) continue
        const wt = weight[j]
        const tj = t[j]
        const wy = wt * y[j]
        for (let r = 2; r < m; r++) {
          const br = wt * bj[r]
          if (br === 0) continue
          na[r] += br
          na[m + r] += br * tj
          nb[r] += wy * bj[r]
          for (let c = r; c < m; c++) na[r * m + c] += br * bj[c]
        }
      }
      for (let r = 0; r < m; r++) for (let c = r + 1; c < m; c++) na[c * m + r] = na[r * m + c]
      // fluxes and equivalent widths are ≥ 0: drop the most negative one and solve again (active set)
      active.fill(1, 0, m)
      for (let pass = 0; pass < m; pass++) {
        if (!choleskySubset(na, nb, m, active, work, factor, xs, bj)) {
          const x = solveSubset(Matrix.from1DArray(m, m, Array.from(na.subarray(0, m * m))), Matrix.columnVector(Array.from(nb.subarray(0, m))), Array.from(active.subarray(0, m), (a) => a === 1))
          xs.set(x)
        }
        let worst = -1
        for (let r = 2; r < m; r++) if (active[r] && xs[r] < 0 && (worst < 0 || xs[r] < xs[worst])) worst = r
        if (worst < 0) {
          for (let r = 0; r < m; r++) p[params[r]] = active[r] ? xs[r] : 0
          break
        }
        active[worst] = 0
      }
      // χ² of the window from the normal equations, Σwy² − 2xᵀb + xᵀAx, without assembling the model
      let xb = 0
      let xax = 0
      for (let r = 0; r < m; r++) {
        const xr = active[r] ? xs[r] : 0
        if (xr === 0) continue
        xb += xr * nb[r]
        for (let c = 0; c < m; c++) if (active[c]) xax += xr * na[r * m + c] * xs[c]
      }
      total += Math.max(0, yy - 2 * xb + xax)
    }
    return total
  }
  const separable = separableOf({
    n, k, windows, groups, terms, termsOfWindow, continuum, ewParam, t, lower: problem.lower, upper: problem.upper, pixels,
    termProfile, kinematicColumns, lastP, shared, scratch: { na, nb, active, work, factor, xs },
  })
  return { config, pixels, names, groups, continuum, fluxParam, ewParam, problem, initial, solveLinear, chi2, evaluate, separable }
}

/** What the separable form needs from createSpectrumModel. */
interface SeparableParts {
  n: number
  k: number
  windows: FitWindow[]
  groups: KinematicGroup[]
  terms: Term[]
  termsOfWindow: Term[][]
  continuum: [number, number][]
  ewParam: { d2: number; d1: number } | null
  t: Float64Array
  lower: Float64Array
  upper: Float64Array
  pixels: FitPixels
  termProfile(tm: Term, v: number, s: number, g: number): void
  kinematicColumns(p: Float64Array, gi: number, cols: Float64Array[]): void
  lastP: Float64Array
  shared: PixelWork
  scratch: { na: Float64Array; nb: Float64Array; active: Uint8Array; work: Float64Array; factor: Float64Array; xs: Float64Array }
}

/**
 * The model as a separable problem (variable-projection.ts; Golub & Pereyra 1973): the non-linear
 * parameters are the free kinematics and the Na I D equivalent widths; the linear ones, each window's
 * c₀, c₁ and its emission fluxes, are solved window by window with fluxes ≥ 0 (active set, as
 * `solveLinear`). In the Na I D window the continuum's columns are (1 − A)·(1, t).
 */
function separableOf(m: SeparableParts): SeparableProblem {
  const { n, k, windows, groups, terms, termsOfWindow, continuum, ewParam, t, lower, upper, pixels, lastP } = m
  const { weight, y } = pixels
  const nonlinearList: number[] = []
  for (const gr of groups) for (const idx of [gr.v, gr.s, gr.g]) if (idx >= 0 && upper[idx] > lower[idx]) nonlinearList.push(idx)
  if (ewParam) for (const idx of [ewParam.d2, ewParam.d1]) if (upper[idx] > lower[idx]) nonlinearList.push(idx)
  const nonlinear = Int32Array.from(nonlinearList)
  const nk = nonlinear.length
  const position = new Int32Array(k).fill(-1)
  nonlinear.forEach((j, a) => { position[j] = a })
  const emission = windows.map((_, wi) => termsOfWindow[wi].filter((tm) => !tm.absorption))
  const absorption = windows.map((_, wi) => termsOfWindow[wi].filter((tm) => tm.absorption))
  /** each window's linear parameters: c₀, c₁, then its emission fluxes; and each emission term's slot among them */
  const params = windows.map((_, wi) => Int32Array.from([continuum[wi][0], continuum[wi][1], ...new Set(emission[wi].map((tm) => tm.param))]))
  const slots = windows.map((_, wi) => Int32Array.from(emission[wi].map((tm) => params[wi].indexOf(tm.param))))
  /** the non-linear parameters (positions in `nonlinear`) whose columns can be non-zero in each window */
  const nonlinearOf = windows.map((_, wi) => {
    const set = new Set<number>()
    for (const tm of termsOfWindow[wi]) {
      const gr = groups[tm.group]
      for (const idx of [gr.v, gr.s, gr.g]) if (idx >= 0 && position[idx] >= 0) set.add(position[idx])
      if (tm.absorption && position[tm.param] >= 0) set.add(position[tm.param])
    }
    return Int32Array.from([...set].sort((a, b) => a - b))
  })
  const normal = params.map((lp) => new Float64Array(lp.length * lp.length))
  const rhs = params.map((lp) => new Float64Array(lp.length))
  const activeOf = params.map((lp) => new Uint8Array(lp.length))
  const cross = params.map((lp) => new Float64Array(lp.length * Math.max(nk, 1)))
  const { damp, model, weighted: wd } = m.shared
  // a column per free non-linear parameter; held kinematics (a Lorentzian's σ) write into the spare one
  const spare = workColumns(m.shared, n, nk + 1)
  const columns: Float64Array[] = Array.from({ length: k }, (_, j) => spare[position[j] >= 0 ? position[j] : nk])
  const h = new Float64Array(nk * nk)
  const { na, nb, active, work, factor, xs } = m.scratch
  const maxLinear = Math.max(2, ...params.map((lp) => lp.length))
  const bj = new Float64Array(maxLinear)
  const sub = new Float64Array(maxLinear * maxLinear)
  const subFactor = new Float64Array(maxLinear * maxLinear)
  const rhsSub = new Float64Array(maxLinear)
  const x = new Float64Array(maxLinear)

  const project = (p: Float64Array): number => {
    for (const tm of terms) {
      const gr = groups[tm.group]
      m.termProfile(tm, p[gr.v], p[gr.s], gr.g >= 0 ? p[gr.g] : 0)
    }
    let total = 0
    for (let wi = 0; wi < windows.length; wi++) {
      const w = windows[wi]
      const lp = params[wi]
      const mm = lp.length
      const em = emission[wi]
      const slot = slots[wi]
      const ab = absorption[wi]
      const a = normal[wi]
      const b = rhs[wi]
      a.fill(0)
      b.fill(0)
      if (ab.length > 0) {
        damp.fill(1, w.start, w.end)
        for (const tm of ab) {
          const amp = p[tm.param]
          const buf = tm.buf
          for (let j = tm.r0; j < tm.r1; j++) damp[j] -= amp * buf[j]
        }
      }
      // the continuum block over every row; the flux rows only where some profile is non-zero
      let s00 = 0, s01 = 0, s11 = 0, b0 = 0, b1 = 0
      for (let j = w.start; j < w.end; j++) {
        const d = damp[j]
        const wt = weight[j] * d
        const tj = t[j]
        s00 += wt * d
        s01 += wt * d * tj
        s11 += wt * d * tj * tj
        b0 += wt * y[j]
        b1 += wt * y[j] * tj
      }
      a[0] = s00
      a[1] = a[mm] = s01
      a[mm + 1] = s11
      b[0] = b0
      b[1] = b1
      // each emission term against the continuum and the data, then each pair of terms where both are non-zero
      for (let q = 0; q < em.length; q++) {
        const tm = em[q]
        const buf = tm.buf
        let sd = 0, sdt = 0, sy = 0
        for (let j = tm.r0; j < tm.r1; j++) {
          const wb = weight[j] * buf[j]
          const d = damp[j]
          sd += wb * d
          sdt += wb * d * t[j]
          sy += wb * y[j]
        }
        const r = slot[q]
        a[r] += tm.mult * sd
        a[mm + r] += tm.mult * sdt
        b[r] += tm.mult * sy
        for (let q2 = q; q2 < em.length; q2++) {
          const tm2 = em[q2]
          const j0 = tm.r0 > tm2.r0 ? tm.r0 : tm2.r0
          const j1 = tm.r1 < tm2.r1 ? tm.r1 : tm2.r1
          if (j0 >= j1) continue
          const buf2 = tm2.buf
          let sum = 0
          for (let j = j0; j < j1; j++) sum += weight[j] * buf[j] * buf2[j]
          const r2 = slot[q2]
          const v = tm.mult * tm2.mult * sum
          if (r === r2) a[r * mm + r] += q === q2 ? v : 2 * v
          else if (r < r2) a[r * mm + r2] += v
          else a[r2 * mm + r] += v
        }
      }
      for (let r = 0; r < mm; r++) for (let c = r + 1; c < mm; c++) a[c * mm + r] = a[r * mm + c]
      // fluxes ≥ 0: drop the most negative one and solve again (active set, as solveLinear)
      const act = activeOf[wi]
      act.fill(1)
      for (let pass = 0; pass < mm; pass++) {
        if (!choleskySubset(a, b, mm, act, work, factor, xs, nb)) {
          const sol = solveSubset(Matrix.from1DArray(mm, mm, Array.from(a)), Matrix.columnVector(Array.from(b)), Array.from(act, (on) => on === 1))
          xs.set(sol)
        }
        let worst = -1
        for (let r = 2; r < mm; r++) if (act[r] && xs[r] < 0 && (worst < 0 || xs[r] < xs[worst])) worst = r
        if (worst < 0) break
        act[worst] = 0
      }
      for (let r = 0; r < mm; r++) p[lp[r]] = act[r] ? xs[r] : 0
      // the model and χ² of the window from its residuals
      const c0 = p[lp[0]]
      const c1 = p[lp[1]]
      for (let j = w.start; j < w.end; j++) model[j] = (c0 + c1 * t[j]) * damp[j]
      for (const tm of em) {
        const f = p[tm.param] * tm.mult
        if (f === 0) continue
        const buf = tm.buf
        for (let j = tm.r0; j < tm.r1; j++) model[j] += f * buf[j]
      }
      for (let j = w.start; j < w.end; j++) {
        const r = y[j] - model[j]
        total += weight[j] * r * r
      }
    }
    lastP.set(p)
    return total
  }

  const reduced = (p: Float64Array, s: Float64Array, g: Float64Array, alpha?: Float64Array): void => {
    // the non-linear columns at p (the profiles are the last projection's)
    for (let gi = 0; gi < groups.length; gi++) m.kinematicColumns(p, gi, columns)
    windows.forEach((w, wi) => {
      const ab = absorption[wi]
      if (ab.length === 0) return
      const [i0, i1] = continuum[wi]
      for (const tm of ab) columns[tm.param].fill(0, w.start, w.end)
      for (const tm of ab) {
        const col = columns[tm.param]
        const buf = tm.buf
        for (let j = tm.r0; j < tm.r1; j++) col[j] -= (p[i0] + p[i1] * t[j]) * buf[j]
      }
    })
    h.fill(0)
    g.fill(0)
    for (let wi = 0; wi < windows.length; wi++) {
      const w = windows[wi]
      const nl = nonlinearOf[wi]
      const lp = params[wi]
      const mm = lp.length
      const gw = cross[wi]
      gw.fill(0)
      if (nl.length === 0) continue
      let u0 = w.end
      let u1 = w.start
      for (const tm of termsOfWindow[wi]) {
        if (tm.r0 < tm.r1) {
          if (tm.r0 < u0) u0 = tm.r0
          if (tm.r1 > u1) u1 = tm.r1
        }
      }
      const em = emission[wi]
      const slot = slots[wi]
      for (let ia = 0; ia < nl.length; ia++) {
        const a = nl[ia]
        const col = columns[nonlinear[a]]
        let ga = 0, g0 = 0, g1 = 0
        for (let j = u0; j < u1; j++) {
          const v = weight[j] * col[j]
          wd[j] = v
          ga += v * (y[j] - model[j])
          g0 += v * damp[j]
          g1 += v * damp[j] * t[j]
        }
        g[a] += ga
        gw[a] += g0
        gw[nk + a] += g1
        for (let ib = ia; ib < nl.length; ib++) {
          const bIdx = nl[ib]
          const colB = columns[nonlinear[bIdx]]
          let sum = 0
          for (let j = u0; j < u1; j++) sum += wd[j] * colB[j]
          h[a * nk + bIdx] += sum
        }
        for (let q = 0; q < em.length; q++) {
          const tm = em[q]
          const buf = tm.buf
          let sum = 0
          for (let j = tm.r0; j < tm.r1; j++) sum += wd[j] * buf[j]
          gw[slot[q] * nk + a] += tm.mult * sum
        }
      }
      void mm
    }
    for (let a = 0; a < nk; a++) for (let b = a + 1; b < nk; b++) h[b * nk + a] = h[a * nk + b]
    s.set(h)
    if (alpha) {
      // the full JᵀWJ: the linear blocks of every window (all their parameters, held ones too), their cross terms, the non-linear block
      alpha.fill(0)
      for (let a = 0; a < nk; a++) for (let b = 0; b < nk; b++) alpha[nonlinear[a] * k + nonlinear[b]] = h[a * nk + b]
      for (let wi = 0; wi < windows.length; wi++) {
        const lp = params[wi]
        const mm = lp.length
        const a = normal[wi]
        const gw = cross[wi]
        for (let r = 0; r < mm; r++) {
          for (let c = 0; c < mm; c++) alpha[lp[r] * k + lp[c]] = a[r * mm + c]
          for (let q = 0; q < nk; q++) {
            const v = gw[r * nk + q]
            if (v === 0) continue
            alpha[lp[r] * k + nonlinear[q]] = v
            alpha[nonlinear[q] * k + lp[r]] = v
          }
        }
      }
    }
    // Schur complement over each window's free linear parameters: S = H − Gᵀ A⁻¹ G
    for (let wi = 0; wi < windows.length; wi++) {
      const nl = nonlinearOf[wi]
      if (nl.length === 0) continue
      const lp = params[wi]
      const mm = lp.length
      const a = normal[wi]
      const gw = cross[wi]
      const act = activeOf[wi]
      let q = 0
      const map = xs
      for (let r = 0; r < mm; r++) if (act[r]) map[q++] = r
      for (let r = 0; r < q; r++) for (let c = 0; c < q; c++) sub[r * q + c] = a[map[r] * mm + map[c]]
      const ok = choleskyFactor(sub, q, subFactor)
      const inv = ok ? null : pseudoInverse(Matrix.from1DArray(q, q, Array.from(sub.subarray(0, q * q))))
      for (let ib = 0; ib < nl.length; ib++) {
        const bIdx = nl[ib]
        for (let r = 0; r < q; r++) rhsSub[r] = gw[map[r] * nk + bIdx]
        if (ok) choleskySolve(subFactor, q, rhsSub, x)
        else for (let r = 0; r < q; r++) {
          let v = 0
          for (let c = 0; c < q; c++) v += (inv as Matrix).get(r, c) * rhsSub[c]
          x[r] = v
        }
        for (let ia = 0; ia < nl.length; ia++) {
          const aIdx = nl[ia]
          let v = 0
          for (let r = 0; r < q; r++) v += gw[map[r] * nk + aIdx] * x[r]
          s[aIdx * nk + bIdx] -= v
        }
      }
    }
  }
  return { lower, upper, nonlinear, project, reduced }
}

/**
 * Solve the rows and columns of the m×m row-major a marked in `active` (the others 0) by Cholesky on
 * plain arrays (the grid search calls this thousands of times a spectrum); false when the subset is
 * not positive definite (then `solveSubset` takes the SVD pseudo-inverse).
 */
function choleskySubset(a: Float64Array, b: Float64Array, m: number, active: Uint8Array, work: Float64Array, l: Float64Array, x: Float64Array, rhs: Float64Array): boolean {
  let q = 0
  for (let r = 0; r < m; r++) {
    if (!active[r]) continue
    let c2 = 0
    for (let c = 0; c < m; c++) if (active[c]) work[q * m + c2++] = a[r * m + c]
    q++
  }
  // pack the q×q subset densely, then factor and solve
  for (let r = 0; r < q; r++) for (let c = 0; c < q; c++) work[r * q + c] = work[r * m + c]
  if (!choleskyFactor(work, q, l)) return false
  let i = 0
  for (let r = 0; r < m; r++) if (active[r]) rhs[i++] = b[r]
  choleskySolve(l, q, rhs, rhs)
  x.fill(0, 0, m)
  i = 0
  for (let r = 0; r < m; r++) if (active[r]) x[r] = rhs[i++]
  return true
}

/** Solve the rows and columns of a marked in `active` (others 0): Cholesky, else the SVD pseudo-inverse. */
function solveSubset(a: Matrix, rhs: Matrix, active: boolean[]): number[] {
  const idx = active.flatMap((on, i) => (on ? [i] : []))
  const sub = new Matrix(idx.length, idx.length)
  const b = new Matrix(idx.length, 1)
  idx.forEach((r, i) => {
    b.set(i, 0, rhs.get(r, 0))
    idx.forEach((c, j) => sub.set(i, j, a.get(r, c)))
  })
  const chol = new CholeskyDecomposition(sub)
  const x = chol.isPositiveDefinite() ? chol.solve(b) : pseudoInverse(sub).mmul(b)
  const out = active.map(() => 0)
  idx.forEach((r, i) => { out[r] = x.get(i, 0) })
  return out
}
