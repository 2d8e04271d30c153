import type { ClassDiagram, DiagramColumns, DiagramKey } from '../../api/types'
import { classColour, classLabel } from '../../utils/classes'

/**
 * The columnar /diagram answer turned into what WebGL traces take: typed arrays with NaN for
 * "not measured" (plotly skips non-finite points), one marker symbol per point for limits, and
 * colours per class. Computed once per load; panels only restyle afterwards.
 */
export interface PanelArrays {
  x: Float64Array
  y: Float64Array
  xErr: Float64Array
  yErr: Float64Array
  /** one symbol per point, or a single 'circle' when the panel has no limits (cheaper to draw) */
  symbols: string[] | 'circle'
  /** how many points have both coordinates */
  placed: number
}

export interface DiagramArrays {
  count: number
  ids: string[]
  panels: Record<DiagramKey, PanelArrays>
  colours: Record<ClassDiagram, string[]>
  labels: Record<ClassDiagram, string[]>
  /** class codes as numbers plus a stepped colour scale: WebGL traces restyle far faster with these than with colour strings */
  codes: Record<ClassDiagram, Float32Array>
  scales: Record<ClassDiagram, { colorscale: [number, string][]; cmax: number }>
}

/** A colour scale that is constant over each integer code 0 … k−1. */
export function steppedScale(colours: string[]): { colorscale: [number, string][]; cmax: number } {
  const k = colours.length
  if (k <= 1) return { colorscale: [[0, colours[0] ?? '#8E8E8E'], [1, colours[0] ?? '#8E8E8E']], cmax: 1 }
  const scale: [number, string][] = []
  colours.forEach((c, i) => {
    scale.push([Math.max(0, (i - 0.5) / (k - 1)), c], [Math.min(1, (i + 0.5) / (k - 1)), c])
  })
  return { colorscale: scale, cmax: k - 1 }
}

function toFloat(values: (number | null)[] | undefined, n: number, map?: (v: number) => number): Float64Array {
  const out = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    const v = values?.[i]
    out[i] = typeof v === 'number' && Number.isFinite(v) ? (map ? map(v) : v) : NaN
  }
  return out
}

/** Upper limit in x points left, in y points down; lower limits the other way (REFERENCE.md §9). */
export function limitSymbol(xLimit: number, yLimit: number): string {
  if (xLimit === 0 && yLimit === 0) return 'circle'
  if (xLimit !== 0 && yLimit !== 0) return 'diamond'
  if (xLimit === 1) return 'triangle-left'
  if (xLimit === -1) return 'triangle-right'
  return yLimit === 1 ? 'triangle-down' : 'triangle-up'
}

function symbolsOrCircle(symbols: string[]): string[] | 'circle' {
  return symbols.every((v) => v === 'circle') ? 'circle' : symbols
}

function countPlaced(x: Float64Array, y: Float64Array): number {
  let n = 0
  for (let i = 0; i < x.length; i++) if (!Number.isNaN(x[i]) && !Number.isNaN(y[i])) n++
  return n
}

export function prepareDiagramArrays(cols: DiagramColumns): DiagramArrays {
  const n = cols.ids.length
  const y = toFloat(cols.y, n)
  const yErr = toFloat(cols.yErr, n)
  const panels = {} as Record<DiagramKey, PanelArrays>
  for (const key of ['nii', 'sii', 'oi'] as const) {
    const x = toFloat(cols.x[key], n)
    const xl = cols.xLimit?.[key]
    const symbols = new Array<string>(n)
    for (let i = 0; i < n; i++) symbols[i] = limitSymbol(xl?.[i] ?? 0, cols.yLimit?.[i] ?? 0)
    panels[key] = { x, y, xErr: toFloat(cols.xErr?.[key], n), yErr, symbols: symbolsOrCircle(symbols), placed: countPlaced(x, y) }
  }
  // WHAN: EW(Hα) on a log axis, so only positive widths can be placed
  const whanY = toFloat(cols.ewHalpha, n, (v) => (v > 0 ? v : NaN))
  const niiLimits = cols.xLimit?.nii
  const whanSymbols = new Array<string>(n)
  for (let i = 0; i < n; i++) whanSymbols[i] = limitSymbol(niiLimits?.[i] ?? 0, 0)
  panels.whan = {
    x: panels.nii.x, y: whanY, xErr: panels.nii.xErr, yErr: new Float64Array(n).fill(NaN),
    symbols: symbolsOrCircle(whanSymbols), placed: countPlaced(panels.nii.x, whanY),
  }

  const colours = {} as Record<ClassDiagram, string[]>
  const labels = {} as Record<ClassDiagram, string[]>
  const codesOut = {} as Record<ClassDiagram, Float32Array>
  const scales = {} as Record<ClassDiagram, { colorscale: [number, string][]; cmax: number }>
  for (const d of ['overall', 'nii', 'sii', 'oi', 'whan'] as const) {
    const names = cols.classNames?.[d] ?? []
    const codes = cols.class?.[d] ?? []
    const colourOf = names.map(classColour)
    const labelOf = names.map(classLabel)
    const c = new Array<string>(n)
    const l = new Array<string>(n)
    const k = new Float32Array(n)
    const unknown = Math.max(0, names.length - 1) // codes outside the vocabulary show as the last name (unclassified)
    for (let i = 0; i < n; i++) {
      const code = codes[i]
      const known = code >= 0 && code < names.length
      c[i] = known ? colourOf[code] : classColour(null)
      l[i] = known ? labelOf[code] : 'Unclassified'
      k[i] = known ? code : unknown
    }
    colours[d] = c
    labels[d] = l
    codesOut[d] = k
    scales[d] = steppedScale(colourOf.length ? colourOf : [classColour(null)])
  }
  return { count: n, ids: cols.ids, panels, colours, labels, codes: codesOut, scales }
}
