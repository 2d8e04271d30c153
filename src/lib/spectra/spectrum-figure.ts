import type { Data, Layout } from 'plotly.js-dist-min'
import type { ModelComponentKind, SpectrumData, SpectrumModelCurves } from '../../api/spectra-types'
import { lineLabel, OKABE_ITO } from '../../../shared/vocabulary/index.ts'
import { displayIndices, take } from './downsample'
import { curveOf, errorBand, onContinuum, residuals, trimComponent, type Curve } from './residuals'

/**
 * The spectrum view's plotly figure: the data with its error band, the continuum, each component on
 * the continuum, the total model, and below them the residuals in units of σ, sharing the x axis.
 * `prepareCurves` does the per-pixel work once; `spectrumTraces` picks the pixels of the shown window.
 * Every curve is a Float64Array with NaN gaps (residuals.ts `Curve`): a window drawn whole hands
 * plotly views on them, not copies.
 */

export interface PreparedModel {
  continuum: Curve
  total: Curve
  residual: Curve
  /** each component added to the continuum, trimmed to where it matters */
  components: { line: string; kind: ModelComponentKind; values: Curve }[]
}

export interface PreparedCurves {
  wavelength: Float64Array
  flux: Curve
  band: { lower: Curve; upper: Curve }
  model: PreparedModel | null
  /** a trial refit drawn over the stored one */
  trial: PreparedModel | null
}

function prepareModel(s: SpectrumData, m: SpectrumModelCurves): PreparedModel {
  const continuum = curveOf(m.continuum)
  return {
    continuum,
    total: curveOf(m.total),
    residual: residuals(s.flux, m.total, s.error),
    components: m.components.map((c) => ({ line: c.line, kind: c.kind, values: onContinuum(trimComponent(c.values), continuum) })),
  }
}

export function prepareCurves(s: SpectrumData, model: SpectrumModelCurves | null, trial: SpectrumModelCurves | null = null): PreparedCurves {
  return {
    wavelength: Float64Array.from(s.wavelength), flux: curveOf(s.flux), band: errorBand(s.flux, s.error),
    model: model ? prepareModel(s, model) : null,
    trial: trial ? prepareModel(s, trial) : null,
  }
}

export const COMPONENT_STYLE: Record<ModelComponentKind, { name: string; colour: string; dash?: string }> = {
  narrow: { name: 'Narrow lines', colour: OKABE_ITO.bluishGreen },
  narrow2: { name: 'Second narrow component', colour: OKABE_ITO.skyBlue },
  broad: { name: 'Broad Hα', colour: OKABE_ITO.reddishPurple },
  absorption: { name: 'Na I D absorption', colour: OKABE_ITO.orange },
}

export const MODEL_COLOUR = OKABE_ITO.vermillion
export const TRIAL_COLOUR = OKABE_ITO.blue

export interface FigureOptions {
  /** the shown window (Å); null = the whole spectrum */
  range: [number, number] | null
  /** a flux range chosen by the user's zoom; null = fit the shown pixels */
  yRange?: [number, number] | null
  /** about the plot's width in CSS pixels */
  buckets: number
  dark: boolean
  fluxUnit: number
  /** names of the stored and trial models in the legend */
  modelName?: string
  trialName?: string
  /** legend entries the user switched off (`LegendItem.key`) */
  hidden?: ReadonlySet<string>
}

/** The whole wavelength span of a spectrum. */
export function fullRange(wavelength: ArrayLike<number>): [number, number] {
  return wavelength.length ? [wavelength[0], wavelength[wavelength.length - 1]] : [0, 1]
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', 0: '⁰', 1: '¹', 2: '²', 3: '³', 4: '⁴', 5: '⁵', 6: '⁶', 7: '⁷', 8: '⁸', 9: '⁹' }

/**
 * The flux axis title for a flux unit in erg s⁻¹ cm⁻² Å⁻¹.
 * @example fluxAxisTitle(1e-17) // 'F_λ (10⁻¹⁷ erg s⁻¹ cm⁻² Å⁻¹)'
 */
export function fluxAxisTitle(fluxUnit: number): string {
  const unit = 'erg s⁻¹ cm⁻² Å⁻¹'
  if (!(fluxUnit > 0) || fluxUnit === 1) return `F_λ (${unit})`
  const e = Math.log10(fluxUnit)
  if (Math.abs(e - Math.round(e)) < 1e-9) return `F_λ (10${String(Math.round(e)).split('').map((ch) => SUPERSCRIPT[ch] ?? ch).join('')} ${unit})`
  return `F_λ (${fluxUnit.toExponential(2)} ${unit})`
}

function line(x: Float64Array, y: Curve, name: string, colour: string, width: number, extra: Record<string, unknown> & { dash?: string } = {}): Data {
  const { dash, ...rest } = extra
  return {
    type: 'scatter', mode: 'lines', x, y, name, line: { color: colour, width, ...(dash ? { dash } : {}) },
    connectgaps: false, hovertemplate: `${name}<br>λ %{x:.2f} Å<br>%{y:.4g}<extra></extra>`, ...rest,
  } as Data
}

/** A kind's components as one trace, each component a separate run (a NaN gap between them). */
function componentTraces(m: PreparedModel, idx: Int32Array, x: Float64Array, legendPrefix = ''): Data[] {
  const byKind = new Map<ModelComponentKind, { x: number[]; y: number[]; text: string[] }>()
  for (const c of m.components) {
    let t: { x: number[]; y: number[]; text: string[] } | undefined
    const label = lineLabel(c.line)
    for (let k = 0; k < idx.length; k++) {
      const v = c.values[idx[k]]
      if (Number.isNaN(v)) continue
      t ??= byKind.get(c.kind) ?? byKind.set(c.kind, { x: [], y: [], text: [] }).get(c.kind)!
      t.x.push(x[k]); t.y.push(v); t.text.push(label)
    }
    if (t) { t.x.push(NaN); t.y.push(NaN); t.text.push('') }
  }
  return [...byKind.entries()].map(([kind, t]) => {
    const s = COMPONENT_STYLE[kind]
    return {
      type: 'scatter', mode: 'lines', x: Float64Array.from(t.x), y: Float64Array.from(t.y), text: t.text, name: `${legendPrefix}${s.name}`, connectgaps: false,
      line: { color: s.colour, width: 1.2, dash: legendPrefix ? 'dot' : undefined },
      hovertemplate: '%{text}<br>λ %{x:.2f} Å<br>%{y:.4g}<extra></extra>',
    } as Data
  })
}

/** The traces of the shown window. */
export function spectrumTraces(c: PreparedCurves, o: FigureOptions): Data[] {
  const [from, to] = o.range ?? fullRange(c.wavelength)
  const extremes: Curve[] = [c.flux]
  if (c.model) extremes.push(c.model.total)
  if (c.trial) extremes.push(c.trial.total)
  const idx = displayIndices(c.wavelength, extremes, from, to, o.buckets)
  const x = take(c.wavelength, idx)
  const fg = o.dark ? '#D8DCE3' : '#2B2F36'
  const bandFill = o.dark ? 'rgba(216,220,227,0.18)' : 'rgba(43,47,54,0.14)'
  const out: Data[] = [
    { type: 'scatter', mode: 'lines', x, y: take(c.band.lower, idx), line: { width: 0 }, hoverinfo: 'skip', showlegend: false, connectgaps: false, name: 'error band lower', legendgroup: BAND } as Data,
    { type: 'scatter', mode: 'lines', x, y: take(c.band.upper, idx), line: { width: 0 }, fill: 'tonexty', fillcolor: bandFill, hoverinfo: 'skip', name: '±1σ', connectgaps: false, legendgroup: BAND } as Data,
    line(x, take(c.flux, idx), 'Data', fg, 1, { line: { color: fg, width: 1, shape: 'hvh' } }),
  ]
  if (c.model) {
    out.push(line(x, take(c.model.continuum, idx), 'Continuum', OKABE_ITO.blue, 1.2, { dash: 'dash' }))
    out.push(...componentTraces(c.model, idx, x))
    out.push(line(x, take(c.model.total, idx), o.modelName ?? 'Model', MODEL_COLOUR, 1.8))
    out.push(line(x, take(c.model.residual, idx), 'Residual', fg, 1, { yaxis: 'y2', showlegend: false, hovertemplate: 'λ %{x:.2f} Å<br>(data − model)/σ %{y:.2f}<extra></extra>' }))
  }
  if (c.trial) {
    out.push(...componentTraces(c.trial, idx, x, 'Refit: '))
    out.push(line(x, take(c.trial.total, idx), o.trialName ?? 'Refit', TRIAL_COLOUR, 1.8, { dash: 'dash' }))
    out.push(line(x, take(c.trial.residual, idx), 'Refit residual', TRIAL_COLOUR, 1, { yaxis: 'y2', showlegend: false, hovertemplate: 'refit<br>λ %{x:.2f} Å<br>(data − model)/σ %{y:.2f}<extra></extra>' }))
  }
  if (o.hidden?.size) for (const t of out) if (o.hidden.has(legendKey(t))) (t as { visible?: boolean }).visible = false
  return out
}

const BAND = 'band'
/** What a legend entry switches: a trace's legend group, else its name. */
const legendKey = (t: Data) => String((t as { legendgroup?: string }).legendgroup || t.name)

/** One entry of the spectrum's legend. */
export interface LegendItem {
  key: string
  name: string
  colour: string
  dash?: string
  /** a filled band rather than a line */
  fill?: string
  hidden: boolean
}

/**
 * The legend, drawn by the page rather than plotly (plotly measures and lays out every entry's text
 * on each draw): one entry per trace the legend shows, in trace order; hidden ones stay listed.
 */
export function legendItems(traces: Data[], hidden: ReadonlySet<string> = new Set()): LegendItem[] {
  const out: LegendItem[] = []
  for (const t of traces) {
    const tr = t as { showlegend?: boolean; name?: string; line?: { color?: string; dash?: string }; fill?: string; fillcolor?: string }
    if (tr.showlegend === false) continue
    const key = legendKey(t)
    out.push({
      key, name: tr.name ?? key, colour: tr.fill ? (tr.fillcolor ?? '') : (tr.line?.color ?? ''), hidden: hidden.has(key),
      ...(tr.line?.dash ? { dash: tr.line.dash } : {}), ...(tr.fill ? { fill: tr.fillcolor ?? '' } : {}),
    })
  }
  return out
}

/** A symmetric residual range: at least ±3σ, at most ±10σ, 10 % beyond the largest shown residual. */
export function residualRange(traces: Data[]): [number, number] {
  let max = 0
  for (const t of traces) {
    if ((t as { yaxis?: string }).yaxis !== 'y2') continue
    const y = (t as { y?: ArrayLike<number | null> }).y ?? []
    for (let i = 0; i < y.length; i++) { const v = y[i]; if (typeof v === 'number' && Math.abs(v) > max) max = Math.abs(v) }
  }
  const r = Math.min(10, Math.max(3, 1.1 * max))
  return [-r, r]
}

export function spectrumLayout(traces: Data[], o: FigureOptions, hasModel: boolean): Partial<Layout> {
  const fg = o.dark ? '#E3E6EC' : '#1D2330'
  const grid = o.dark ? 'rgba(255,255,255,0.08)' : 'rgba(0,0,0,0.07)'
  // ticklabeloverflow 'allow': plotly otherwise measures every tick label to hide those past the plot's edge
  const axis = { gridcolor: grid, zeroline: false, linecolor: fg, mirror: true, ticks: 'outside' as const, color: fg, automargin: true, ticklabeloverflow: 'allow' as const }
  const range = o.range ?? null
  return {
    margin: { l: 64, r: 16, t: 8, b: 46 },
    paper_bgcolor: 'rgba(0,0,0,0)',
    plot_bgcolor: 'rgba(0,0,0,0)',
    font: { family: 'Roboto, sans-serif', size: 12, color: fg },
    hovermode: 'closest',
    dragmode: 'zoom',
    showlegend: false, // the page draws the legend (legendItems)
    hoverlabel: { font: { family: 'Roboto Mono, monospace', size: 12 } },
    xaxis: { ...axis, anchor: hasModel ? 'y2' : 'y', title: { text: 'Observed wavelength (Å)' }, ...(range ? { range: [...range], autorange: false } : { autorange: true }) },
    yaxis: {
      ...axis, domain: hasModel ? [0.3, 1] : [0, 1], title: { text: fluxAxisTitle(o.fluxUnit) },
      ...(o.yRange ? { range: [...o.yRange], autorange: false } : { autorange: true }),
    },
    ...(hasModel ? {
      yaxis2: { ...axis, domain: [0, 0.22], title: { text: 'Δ/σ' }, range: residualRange(traces), autorange: false, zeroline: true, zerolinecolor: grid, fixedrange: true },
    } : {}),
  }
}

/**
 * The layout of the saved image: the figure as drawn, with plotly's own legend above the plot (the
 * page's legend is HTML, which the image would not hold).
 */
export function imageLayout(layout: Record<string, unknown>): Record<string, unknown> {
  const margin = (layout.margin ?? {}) as Record<string, number>
  return {
    ...layout, showlegend: true, margin: { ...margin, t: 40 },
    legend: { orientation: 'h', x: 0, y: 1.02, yanchor: 'bottom', font: { size: 11 }, traceorder: 'normal' },
  }
}

export interface WindowChange {
  /** a new x window, 'auto' for the whole spectrum (double click), undefined when x did not change */
  x?: [number, number] | 'auto'
  y?: [number, number] | 'auto'
}

function rangeIn(ev: Record<string, unknown>, axis: string): [number, number] | 'auto' | undefined {
  if (ev[`${axis}.autorange`] === true) return 'auto'
  const whole = ev[`${axis}.range`]
  if (Array.isArray(whole) && whole.length === 2) return [Number(whole[0]), Number(whole[1])]
  const a = ev[`${axis}.range[0]`], b = ev[`${axis}.range[1]`]
  if (typeof a === 'number' && typeof b === 'number') return a <= b ? [a, b] : [b, a]
  return undefined
}

/** What a `plotly_relayout` did to the spectrum's window (zoom box, pan, double click). */
export function windowChange(ev: Record<string, unknown> | null | undefined): WindowChange {
  if (!ev) return {}
  return { x: rangeIn(ev, 'xaxis'), y: rangeIn(ev, 'yaxis') }
}
