/**
 * The fitted model of a spectrum redrawn on its pixels, for plots and the model CSV: the continuum,
 * the total and each component (narrow, second narrow, broad Hα, Na I D absorption), from the
 * parameters a fit keeps (`result.model`). Pure; the same windows and model as the fit's
 * (shared/spectra/prepare.ts, model.ts; shared/science/README.md §13.6).
 */
import { createSpectrumModel } from './model.ts'
import { prepareSpectrum, setupFit } from './prepare.ts'
import { lowerBound } from './windows.ts'
import type { SpectrumFitResult, SpectrumInput } from './types.ts'

export type ComponentKind = 'narrow' | 'narrow2' | 'broad' | 'absorption'

export interface RedrawnModel {
  /** per spectrum pixel; null outside the fitted windows and at bad pixels */
  continuum: Array<number | null>
  total: Array<number | null>
  /** what each line (with the lines tied to it) or the absorption adds to the continuum */
  components: Array<{ line: string; kind: ComponentKind; values: Array<number | null> }>
  /** the fitted windows, observed Å (pixel edges) */
  windows: Array<{ name: string; from: number; to: number }>
}

/** What a linear parameter draws: a line's first or second narrow component, broad Hα, or the Na I D absorption. */
function kindOf(model: { fluxParam: Map<string, number>; ewParam: { d2: number; d1: number } | null }, j: number): { line: string; kind: ComponentKind } | null {
  for (const [key, param] of model.fluxParam) {
    if (param !== j) continue
    const [line, c] = key.split(':')
    return c === '-1' ? { line: 'halpha_broad', kind: 'broad' } : { line: line!, kind: c === '0' ? 'narrow' : 'narrow2' }
  }
  if (model.ewParam && (model.ewParam.d2 === j || model.ewParam.d1 === j)) return { line: 'nad', kind: 'absorption' }
  return null
}

/**
 * Redraw the model of a fit on the spectrum's pixels.
 *
 * @param spectrum  the spectrum that was fitted
 * @param result    its fit result (with `model`)
 * @returns continuum, total and components per pixel, and the windows; all empty (nulls) when the
 *          result holds no model (nothing was fitted)
 */
export function modelOf(spectrum: SpectrumInput, result: Pick<SpectrumFitResult, 'model'>): RedrawnModel {
  const n = spectrum.wavelength.length
  const empty = (): Array<number | null> => new Array<number | null>(n).fill(null)
  const out: RedrawnModel = { continuum: empty(), total: empty(), components: [], windows: [] }
  const m = result.model
  if (!m) return out
  const spec = prepareSpectrum(spectrum)
  const setup = setupFit(spec, spectrum, m.setup.broad, m.setup.nad, m.setup.components)
  const model = createSpectrumModel(setup.pixels, m.config)
  const p = Float64Array.from(model.names, (name) => m.parameters[name] ?? 0)
  const px = setup.pixels
  // each fit pixel's index in the spectrum (the fit pixels are spectrum pixels, window by window)
  const at = Int32Array.from(px.lambda, (l) => lowerBound(spec.lambda, l))
  const draw = (q: Float64Array) => { const v = new Float64Array(px.n); model.evaluate(q, v); return v }
  const linear = new Set<number>([...model.fluxParam.values(), ...(model.ewParam ? [model.ewParam.d2, model.ewParam.d1] : [])])
  const bare = Float64Array.from(p, (v, j) => (linear.has(j) ? 0 : v))
  const continuum = draw(bare)
  const total = draw(p)
  for (let j = 0; j < px.n; j++) { out.continuum[at[j]!] = continuum[j]!; out.total[at[j]!] = total[j]! }
  const parts = new Map<string, { line: string; kind: ComponentKind; params: number[] }>()
  for (const j of linear) {
    const k = kindOf(model, j)
    if (!k) continue
    const key = `${k.line}|${k.kind}`
    if (!parts.has(key)) parts.set(key, { ...k, params: [] })
    parts.get(key)!.params.push(j)
  }
  for (const part of parts.values()) {
    if (part.kind !== 'absorption' && part.params.every((j) => p[j] === 0)) continue // a line fitted with no flux adds nothing
    const q = Float64Array.from(bare)
    for (const j of part.params) q[j] = p[j]!
    const with1 = draw(q)
    const values = empty()
    for (const w of px.windows) {
      // a component is drawn in the windows its parameters act in (else it adds exactly 0)
      let any = false
      for (let j = w.start; j < w.end; j++) if (with1[j] !== continuum[j]) { any = true; break }
      if (!any) continue
      for (let j = w.start; j < w.end; j++) values[at[j]!] = with1[j]! - continuum[j]!
    }
    out.components.push({ line: part.line, kind: part.kind, values })
  }
  for (const w of px.windows) if (w.end > w.start) out.windows.push({ name: w.id, from: px.lo[w.start]!, to: px.hi[w.end - 1]! })
  return out
}
