/**
 * Measured quantities from fitted parameters: fluxes, rest-frame EWs, velocities and widths of every
 * line, broad Hα, Na I D equivalent widths; their errors from the covariance by linear propagation
 * (shared/science/README.md §13.8, §13.9).
 */
import { SPEED_OF_LIGHT_KM_PER_S } from '../diagnostics/luminosity.ts'
import { fluxKey, type SpectrumModel, type WindowLine } from './model.ts'
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
 * Every quantity the result reports, as plain numbers (one call per parameter vector; cheap, no model
 * evaluation), keyed `<line>.<quantity>` and `<line>.c<rank>.<quantity>` for components.
 */
export function quantities(model: SpectrumModel, p: Float64Array, zFactor: number): Quantities {
  const q: Quantities = new Map()
  const { profile } = model.config
  const narrow = model.groups.filter((g) => g.kind === 'narrow')
  const order = componentOrder(model, p)
  model.pixels.windows.forEach((w, wi) => {
    for (const line of w.lines) lineQuantities(q, model, p, zFactor, wi, line, narrow, order, profile)
  })
  const broad = model.groups.find((g) => g.kind === 'broad')
  const fb = model.fluxParam.get(fluxKey('halpha', -1))
  if (broad && fb !== undefined) {
    const wi = model.pixels.windows.findIndex((w) => w.lines.some((l) => l.id === 'halpha'))
    const line = model.pixels.windows[wi].lines.find((l) => l.id === 'halpha') as WindowLine
    const si = lineSigmaInstKmPerS(line)
    const g = broad.g >= 0 ? p[broad.g] : 0
    q.set('halpha_broad.flux', p[fb])
    q.set('halpha_broad.ew', p[fb] / (continuumAt(model, p, wi, line.expectedAngstrom) * zFactor))
    q.set('halpha_broad.velocity', p[broad.v])
    q.set('halpha_broad.sigma', observedSigma(profile, p[broad.s], g, si))
    if (broad.g >= 0) q.set('halpha_broad.gamma', g)
  }
  if (model.ewParam) {
    const abs = model.groups.find((g) => g.kind === 'absorption')
    const w2 = p[model.ewParam.d2] / zFactor
    const w1 = p[model.ewParam.d1] / zFactor
    q.set('nad.ewD2', w2)
    q.set('nad.ewD1', w1)
    q.set('nad.ew', w2 + w1)
    q.set('nad.doubletRatio', w2 / w1)
    if (abs) q.set('nad.velocity', p[abs.v])
  }
  return q
}

/** A line's quantity keys and the flux parameter of each narrow component, built once per model and line (quantities runs 2k + 1 times a fit). */
interface LineKeys {
  flux: string; ew: string; velocity: string; sigma: string; gamma: string
  rank: { flux: string; velocity: string; sigma: string; gamma: string }[]
  fluxParam: number[]
}
const lineKeyCache = new WeakMap<SpectrumModel, Map<WindowLine, LineKeys>>()
function lineKeys(model: SpectrumModel, line: WindowLine, components: number): LineKeys {
  let byLine = lineKeyCache.get(model)
  if (!byLine) lineKeyCache.set(model, (byLine = new Map()))
  let keys = byLine.get(line)
  if (!keys) {
    const id = line.id
    const owner = line.parent ?? line.id
    keys = {
      flux: `${id}.flux`, ew: `${id}.ew`, velocity: `${id}.velocity`, sigma: `${id}.sigma`, gamma: `${id}.gamma`,
      rank: Array.from({ length: components }, (_, r) => ({ flux: `${id}.c${r}.flux`, velocity: `${id}.c${r}.velocity`, sigma: `${id}.c${r}.sigma`, gamma: `${id}.c${r}.gamma` })),
      fluxParam: Array.from({ length: components }, (_, k) => model.fluxParam.get(fluxKey(owner, k)) as number),
    }
    byLine.set(line, keys)
  }
  return keys
}

function lineQuantities(
  q: Quantities, model: SpectrumModel, p: Float64Array, zFactor: number, wi: number, line: WindowLine,
  narrow: SpectrumModel['groups'], order: number[], profile: SpectrumModel['config']['profile'],
): void {
  const keys = lineKeys(model, line, narrow.length)
  const mult = line.parent ? 1 / (line.ratio as number) : 1
  const si = lineSigmaInstKmPerS(line)
  let f = 0, fv = 0, fm2 = 0, fg = 0
  let anyGamma = false
  for (let rank = 0; rank < order.length; rank++) {
    const k = order[rank]
    const g = narrow[k]
    const fk = p[keys.fluxParam[k]] * mult
    const vk = p[g.v]
    const gk = g.g >= 0 ? p[g.g] : 0
    if (g.g >= 0) anyGamma = true
    const sk = observedSigma(profile, p[g.s], gk, si)
    f += fk
    fv += fk * vk
    fm2 += fk * (sk * sk + vk * vk)
    fg += fk * gk
    if (narrow.length > 1) {
      const rk = keys.rank[rank]
      q.set(rk.flux, fk)
      q.set(rk.velocity, vk)
      q.set(rk.sigma, sk)
      if (g.g >= 0) q.set(rk.gamma, gk)
    }
  }
  const v = fv / f
  q.set(keys.flux, f)
  q.set(keys.ew, f / (continuumAt(model, p, wi, line.expectedAngstrom) * zFactor))
  q.set(keys.velocity, v)
  q.set(keys.sigma, Math.sqrt(Math.max(0, fm2 / f - v * v)))
  if (anyGamma) q.set(keys.gamma, fg / f)
}

/**
 * Gradient of each named quantity in the parameters, by central differences of step 10⁻⁴ σ_p
 * (parameters without variance get a zero derivative).
 */
export function quantityGradients(model: SpectrumModel, p: Float64Array, covariance: Float64Array, zFactor: number, keys: string[]): Float64Array[] {
  const k = p.length
  const grads = keys.map(() => new Float64Array(k))
  const pp = Float64Array.from(p)
  for (let j = 0; j < k; j++) {
    const sd = Math.sqrt(covariance[j * k + j])
    if (!(sd > 0)) continue
    const h = 1e-4 * sd
    pp[j] = p[j] + h
    const up = quantities(model, pp, zFactor)
    pp[j] = p[j] - h
    const down = quantities(model, pp, zFactor)
    pp[j] = p[j]
    keys.forEach((key, i) => {
      grads[i][j] = ((up.get(key) as number) - (down.get(key) as number)) / (2 * h)
    })
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
