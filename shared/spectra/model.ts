/**
 * The spectrum model of a fit: in each window a straight-line continuum times (1 − Na I D absorption)
 * plus pixel-averaged emission profiles; narrow lines of one component share a velocity and an
 * intrinsic width, tied doublets share their parent's flux parameter (shared/science/README.md §13.6).
 *
 * Parameters (km/s for kinematics, flux units × Å for fluxes, Å for Na I D equivalent widths):
 * per window c₀, c₁; per kinematic group v, σ (Gaussian part, intrinsic), γ (Lorentzian HWHM,
 * intrinsic; Lorentzian and Voigt profiles only); one flux per free line and component; W(D2), W(D1).
 * Line centre λ_c = (1 + z) λ_rest (1 + v/c); observed Gaussian σ_λ² = (λ_c σ/c)² + σ_inst,λ²
 * (σ_inst at the expected centre). Jacobian: exact for the linear parameters, central differences
 * (0.01 km/s) for the kinematic ones.
 */
import { CholeskyDecomposition, Matrix, pseudoInverse } from 'ml-matrix'
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import type { FitLineId } from './lines.ts'
import type { LeastSquaresProblem } from './levenberg-marquardt.ts'
import { chiSquare } from './levenberg-marquardt.ts'
import { gaussianPixels, lorentzianPixels, voigtPixels } from './profiles.ts'

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
  buf: Float64Array
}

/** Bounds of the kinematic parameters, km/s (project choice, shared/science/README.md §13.6). */
export const KINEMATIC_BOUNDS = Object.freeze({
  narrow: { v: [-1000, 1000], s: [0, 700], g: [0, 700] },
  broad: { v: [-3000, 3000], s: [500, 6000], g: [300, 5000] },
  absorption: { v: [-1000, 1000], s: [0, 600] },
})
/** Least intrinsic width without an instrumental resolution (a zero width would be a delta function), km/s. */
export const MIN_WIDTH_WITHOUT_INSTRUMENT = 1
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
  /** solve the linear parameters (continua, fluxes, equivalent widths) for the kinematics in p, in every window or only in those of one group; returns χ² of those windows */
  solveLinear(p: Float64Array, group?: number): number
  chi2(p: Float64Array): number
  evaluate(p: Float64Array, out: Float64Array): void
}

/** Key of a flux parameter. */
export const fluxKey = (line: string, component: number): string => `${line}:${component}`

/**
 * Build the model of a configuration.
 *
 * @param pixels  fit pixels and windows
 * @param config  profile, number of narrow components, broad Hα, whether a resolution is known
 */
export function createSpectrumModel(pixels: FitPixels, config: ModelConfig): SpectrumModel {
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
          expected: line.expectedAngstrom, sigmaInst: line.sigmaInstAngstrom, buf: new Float64Array(n) })
      }
      if (line.id === 'halpha' && broadGroup >= 0) {
        terms.push({ window: wi, group: broadGroup, param: fluxParam.get(fluxKey('halpha', -1)) as number, mult: 1, absorption: false,
          expected: line.expectedAngstrom, sigmaInst: line.sigmaInstAngstrom, buf: new Float64Array(n) })
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
        expected: a.expectedAngstrom, sigmaInst: a.sigmaInstAngstrom, buf: new Float64Array(n) })
    }
  }
  const k = names.length
  const { lo, hi, lambda } = pixels
  const t = new Float64Array(n)
  for (const w of windows) for (let j = w.start; j < w.end; j++) t[j] = (lambda[j] - w.mid) / w.half
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
      const [v, s, g] = kin(p, tm.group)
      profileInto(tm, v, s, g, tm.buf)
    }
  }
  const absorptionAt = (wi: number, p: Float64Array, j: number): number => {
    let a = 0
    for (const tm of termsOfWindow[wi]) if (tm.absorption) a += p[tm.param] * tm.buf[j]
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
        for (let j = w.start; j < w.end; j++) out[j] += f * b[j]
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
  const scratch = new Float64Array(n)
  const plus = new Float64Array(n)
  const minus = new Float64Array(n)
  /** contribution of one kinematic group at kinematics (v, s, g) into acc over the group's rows */
  const groupContribution = (p: Float64Array, gi: number, v: number, s: number, g: number, acc: Float64Array): void => {
    const gr = groups[gi]
    acc.fill(0, gr.start, gr.end)
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
  const dCentre = new Float64Array(n)
  const dSigma = new Float64Array(n)
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
      const w = windows[tm.window]
      const dlcdv = tm.expected / C
      const lc = tm.expected * (1 + v / C)
      const sl = (lc * sv) / C
      const sigma = Math.sqrt(sl * sl + tm.sigmaInst * tm.sigmaInst)
      gaussianPixels(lo, hi, w.start, w.end, lc, sigma, scratch, dCentre, dSigma)
      const dsdv = ((sv / C) * (sv / C) * lc * dlcdv) / sigma
      const dsds = ((lc / C) * (lc / C) * sv) / sigma
      if (tm.absorption) {
        const [i0, i1] = continuum[tm.window]
        const amp = p[tm.param]
        for (let j = w.start; j < w.end; j++) {
          const f = -(p[i0] + p[i1] * t[j]) * amp
          cv[j] += f * (dCentre[j] * dlcdv + dSigma[j] * dsdv)
          cs[j] += f * dSigma[j] * dsds
        }
      } else {
        const f = p[tm.param] * tm.mult
        for (let j = w.start; j < w.end; j++) {
          cv[j] += f * (dCentre[j] * dlcdv + dSigma[j] * dsdv)
          cs[j] += f * dSigma[j] * dsds
        }
      }
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
        for (let j = w.start; j < w.end; j++) col[j] += tm.mult * b[j]
      }
    }
    groups.forEach((gr, gi) => {
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
        up[q] += hUp
        down[q] -= hDown
        groupContribution(p, gi, up[0], up[1], up[2], plus)
        groupContribution(p, gi, down[0], down[1], down[2], minus)
        const inv = 1 / (hUp + hDown)
        for (let j = gr.start; j < gr.end; j++) col[j] = (plus[j] - minus[j]) * inv
      }
    })
  }
  const problem: LeastSquaresProblem = {
    y: pixels.y, weight: pixels.weight,
    lower: Float64Array.from(lower), upper: Float64Array.from(upper),
    columnStart: Int32Array.from(start), columnEnd: Int32Array.from(end),
    model: evaluate, jacobian,
  }
  const modelBuf = new Float64Array(n)
  const chi2 = (p: Float64Array): number => {
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
  const solveLinear = (p: Float64Array, group?: number): number => {
    const chosen = group === undefined ? windows.map((_, wi) => wi) : [...new Set(termsOfGroup[group].map((tm) => tm.window))]
    lastP.fill(NaN)
    for (const wi of chosen) for (const tm of termsOfWindow[wi]) {
      const [v, s, g] = kin(p, tm.group)
      profileInto(tm, v, s, g, tm.buf)
    }
    let total = 0
    for (const wi of chosen) {
      const w = windows[wi]
      const own = termsOfWindow[wi]
      const params = linearParams[wi]
      const m = params.length
      const slot = ownSlot[wi]
      const bj = new Float64Array(m)
      const na = new Float64Array(m * m)
      const nb = new Float64Array(m)
      const c0 = w.continuum0
      const c1 = w.continuum1
      for (let j = w.start; j < w.end; j++) {
        bj.fill(0)
        bj[0] = 1
        bj[1] = t[j]
        for (let q = 0; q < own.length; q++) {
          const tm = own[q]
          bj[slot[q]] += tm.absorption ? -(c0 + c1 * t[j]) * tm.buf[j] : tm.mult * tm.buf[j]
        }
        const wt = pixels.weight[j]
        const yj = pixels.y[j]
        for (let r = 0; r < m; r++) {
          const br = wt * bj[r]
          if (br === 0) continue
          nb[r] += br * yj
          for (let c = r; c < m; c++) na[r * m + c] += br * bj[c]
        }
      }
      const a = new Matrix(m, m)
      const rhs = new Matrix(m, 1)
      for (let r = 0; r < m; r++) {
        rhs.set(r, 0, nb[r])
        for (let c = r; c < m; c++) {
          a.set(r, c, na[r * m + c])
          a.set(c, r, na[r * m + c])
        }
      }
      // fluxes and equivalent widths are ≥ 0: drop the most negative one and solve again (active set)
      const active = params.map(() => true)
      for (let pass = 0; pass < m; pass++) {
        const x = solveSubset(a, rhs, active)
        let worst = -1
        for (let r = 2; r < m; r++) if (active[r] && x[r] < 0 && (worst < 0 || x[r] < x[worst])) worst = r
        if (worst < 0) {
          for (let r = 0; r < m; r++) p[params[r]] = active[r] ? x[r] : 0
          break
        }
        active[worst] = false
      }
      assembleWindow(p, wi, modelBuf)
      for (let j = w.start; j < w.end; j++) {
        const r = pixels.y[j] - modelBuf[j]
        total += pixels.weight[j] * r * r
      }
    }
    return total
  }
  return { config, pixels, names, groups, continuum, fluxParam, ewParam, problem, initial, solveLinear, chi2, evaluate }
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
