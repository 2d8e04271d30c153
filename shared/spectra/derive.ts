/**
 * Measured quantities from fitted parameters: fluxes, rest-frame EWs, velocities and widths of every
 * line, broad Hα, Na I D equivalent widths; their errors from the covariance by linear propagation
 * (shared/science/README.md §13.8, §13.9).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { fluxKey, type KinematicGroup, type SpectrumModel, type WindowLine } from './model.ts'
import { FWHM_PER_SIGMA, voigtFwhm } from './profiles.ts'

const C = SPEED_OF_LIGHT_KM_PER_S

/** Quantity name → value (NaN where undefined). */
export type Quantities = Map<string, number>

/** Observed Gaussian-equivalent σ (km/s) of a profile: FWHM/2√(2 ln 2), Olivero & Longbothum 1977 for Voigt shapes. */
export function observedSigma(profile: SpectrumModel['config']['profile'], sigmaIntrinsic: number, gammaIntrinsic: number, sigmaInst: number): number {
  if (profile === 'gaussian') return Math.sqrt(sigmaIntrinsic * sigmaIntrinsic + sigmaInst * sigmaInst)
  const sg = profile === 'lorentzian' ? sigmaInst : Math.sqrt(sigmaIntrinsic * sigmaIntrinsic + sigmaInst * sigmaInst)
  return voigtFwhm(sg, gammaIntrinsic) / FWHM_PER_SIGMA
}

/** Instrumental σ in km/s of a line at its expected centre. */
export function lineSigmaInstKmPerS(line: { sigmaInstAngstrom: number; expectedAngstrom: number }): number {
  return (C * line.sigmaInstAngstrom) / line.expectedAngstrom
}

/** Narrow components sorted narrower first (by observed FWHM at 6563 Å-independent intrinsic widths). */
export function componentOrder(model: SpectrumModel, p: Float64Array): number[] {
  const narrow = model.groups.filter((g) => g.kind === 'narrow')
  const width = narrow.map((g) => voigtFwhm(p[g.s], g.g >= 0 ? p[g.g] : 0))
  return narrow.map((_, i) => i).sort((a, b) => width[a] - width[b] || a - b)
}

/** Continuum (flux density) of a window at an observed wavelength. */
export function continuumAt(model: SpectrumModel, p: Float64Array, windowIndex: number, lambda: number): number {
  const w = model.pixels.windows[windowIndex]
  const [i0, i1] = model.continuum[windowIndex]
  return p[i0] + p[i1] * ((lambda - w.mid) / w.half)
}

/**
 * The quantities of one model: their keys, in a fixed order, and a function that computes all of them
 * into a Float64Array from a parameter vector (the error propagation evaluates them 2k times a fit).
 */
interface QuantityPlan {
  keys: string[]
  index: Map<string, number>
  evaluate(p: Float64Array, zFactor: number, out: Float64Array): void
}

const planCache = new WeakMap<SpectrumModel, QuantityPlan>()

function planOf(model: SpectrumModel): QuantityPlan {
  const cached = planCache.get(model)
  if (cached) return cached
  const { profile } = model.config
  const narrow = model.groups.filter((g) => g.kind === 'narrow')
  const multi = narrow.length > 1
  const hasGamma = narrow.some((g) => g.g >= 0)
  const keys: string[] = []
  const lines: { wi: number; line: WindowLine; fluxParam: Int32Array; mult: number; si: number }[] = []
  model.pixels.windows.forEach((w, wi) => {
    for (const line of w.lines) {
      const id = line.id
      const owner = line.parent ?? line.id
      if (multi) {
        for (let r = 0; r < narrow.length; r++) {
          keys.push(`${id}.c${r}.flux`, `${id}.c${r}.velocity`, `${id}.c${r}.sigma`)
          if (narrow[r].g >= 0) keys.push(`${id}.c${r}.gamma`)
        }
      }
      keys.push(`${id}.flux`, `${id}.ew`, `${id}.velocity`, `${id}.sigma`)
      if (hasGamma) keys.push(`${id}.gamma`)
      lines.push({
        wi, line, fluxParam: Int32Array.from(narrow, (_, k) => model.fluxParam.get(fluxKey(owner, k)) as number),
        mult: line.parent ? 1 / (line.ratio as number) : 1, si: lineSigmaInstKmPerS(line),
      })
    }
  })
  const broad = model.groups.find((g) => g.kind === 'broad')
  const fb = model.fluxParam.get(fluxKey('halpha', -1))
  const broadWindow = model.pixels.windows.findIndex((w) => w.lines.some((l) => l.id === 'halpha'))
  const broadLine = broadWindow >= 0 ? model.pixels.windows[broadWindow].lines.find((l) => l.id === 'halpha') : undefined
  const withBroad = !!broad && fb !== undefined && !!broadLine
  if (withBroad) {
    keys.push('halpha_broad.flux', 'halpha_broad.ew', 'halpha_broad.velocity', 'halpha_broad.sigma')
    if ((broad as KinematicGroup).g >= 0) keys.push('halpha_broad.gamma')
  }
  const abs = model.groups.find((g) => g.kind === 'absorption')
  if (model.ewParam) {
    keys.push('nad.ewD2', 'nad.ewD1', 'nad.ew', 'nad.doubletRatio')
    if (abs) keys.push('nad.velocity')
  }
  const order = new Int32Array(narrow.length)
  const width = new Float64Array(narrow.length)
  const evaluate = (p: Float64Array, zFactor: number, out: Float64Array): void => {
    // narrow components narrower first (componentOrder)
    for (let i = 0; i < narrow.length; i++) {
      const g = narrow[i]
      width[i] = voigtFwhm(p[g.s], g.g >= 0 ? p[g.g] : 0)
      order[i] = i
    }
    if (narrow.length > 1) order.sort((a, b) => width[a] - width[b] || a - b)
    let o = 0
    for (const ln of lines) {
      let f = 0, fv = 0, fm2 = 0, fg = 0
      for (let rank = 0; rank < order.length; rank++) {
        const k = order[rank]
        const g = narrow[k]
        const fk = p[ln.fluxParam[k]] * ln.mult
        const vk = p[g.v]
        const gk = g.g >= 0 ? p[g.g] : 0
        const sk = observedSigma(profile, p[g.s], gk, ln.si)
        f += fk
        fv += fk * vk
        fm2 += fk * (sk * sk + vk * vk)
        fg += fk * gk
        if (multi) {
          out[o++] = fk
          out[o++] = vk
          out[o++] = sk
          if (narrow[rank].g >= 0) out[o++] = gk
        }
      }
      const v = fv / f
      out[o++] = f
      out[o++] = f / (continuumAt(model, p, ln.wi, ln.line.expectedAngstrom) * zFactor)
      out[o++] = v
      out[o++] = Math.sqrt(Math.max(0, fm2 / f - v * v))
      if (hasGamma) out[o++] = fg / f
    }
    if (withBroad) {
      const b = broad as KinematicGroup
      const si = lineSigmaInstKmPerS(broadLine as WindowLine)
      const g = b.g >= 0 ? p[b.g] : 0
      const fl = p[fb as number]
      out[o++] = fl
      out[o++] = fl / (continuumAt(model, p, broadWindow, (broadLine as WindowLine).expectedAngstrom) * zFactor)
      out[o++] = p[b.v]
      out[o++] = observedSigma(profile, p[b.s], g, si)
      if (b.g >= 0) out[o++] = g
    }
    if (model.ewParam) {
      const w2 = p[model.ewParam.d2] / zFactor
      const w1 = p[model.ewParam.d1] / zFactor
      out[o++] = w2
      out[o++] = w1
      out[o++] = w2 + w1
      out[o++] = w2 / w1
      if (abs) out[o++] = p[abs.v]
    }
  }
  const plan: QuantityPlan = { keys, index: new Map(keys.map((key, i) => [key, i])), evaluate }
  planCache.set(model, plan)
  return plan
}

/**
 * Every quantity the result reports, as plain numbers (one call per parameter vector; cheap, no model
 * evaluation), keyed `<line>.<quantity>` and `<line>.c<rank>.<quantity>` for components.
 */
export function quantities(model: SpectrumModel, p: Float64Array, zFactor: number): Quantities {
  const plan = planOf(model)
  const values = new Float64Array(plan.keys.length)
  plan.evaluate(p, zFactor, values)
  const q: Quantities = new Map()
  plan.keys.forEach((key, i) => q.set(key, values[i]))
  return q
}

/**
 * Gradient of each named quantity in the parameters, by central differences of step 10⁻⁴ σ_p
 * (parameters without variance get a zero derivative).
 */
export function quantityGradients(model: SpectrumModel, p: Float64Array, covariance: Float64Array, zFactor: number, keys: string[]): Float64Array[] {
  const plan = planOf(model)
  const k = p.length
  const at = keys.map((key) => plan.index.get(key) as number)
  const grads = keys.map(() => new Float64Array(k))
  const pp = Float64Array.from(p)
  const up = new Float64Array(plan.keys.length)
  const down = new Float64Array(plan.keys.length)
  for (let j = 0; j < k; j++) {
    const sd = Math.sqrt(covariance[j * k + j])
    if (!(sd > 0)) continue
    const h = 1e-4 * sd
    pp[j] = p[j] + h
    plan.evaluate(pp, zFactor, up)
    pp[j] = p[j] - h
    plan.evaluate(pp, zFactor, down)
    pp[j] = p[j]
    for (let i = 0; i < at.length; i++) grads[i][j] = (up[at[i]] - down[at[i]]) / (2 * h)
  }
  return grads
}

/** gᵀ C h over the parameters where both gradients may be non-zero. */
export function bilinear(g: Float64Array, covariance: Float64Array, h: Float64Array): number {
  const k = g.length
  let s = 0
  for (let a = 0; a < k; a++) {
    if (g[a] === 0) continue
    for (let b = 0; b < k; b++) if (h[b] !== 0) s += g[a] * covariance[a * k + b] * h[b]
  }
  return s
}

/**
 * 1σ errors of every quantity by linear propagation, σ_Q² = gᵀ C g (common practice; README §13.9).
 */
export function quantityErrors(model: SpectrumModel, p: Float64Array, covariance: Float64Array, zFactor: number, base: Quantities): Map<string, number> {
  const keys = [...base.keys()]
  const grads = quantityGradients(model, p, covariance, zFactor, keys)
  const out = new Map<string, number>()
  keys.forEach((key, i) => out.set(key, Math.sqrt(Math.max(0, bilinear(grads[i], covariance, grads[i])))))
  return out
}
