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
  symbols: string[]
  /** how many points have both coordinates */
  placed: number
}

export interface DiagramArrays {
  count: number
  ids: string[]
  panels: Record<DiagramKey, PanelArrays>
  colours: Record<ClassDiagram, string[]>
  labels: Record<ClassDiagram, string[]>
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
    panels[key] = { x, y, xErr: toFloat(cols.xErr?.[key], n), yErr, symbols, placed: countPlaced(x, y) }
  }
  // WHAN: EW(Hα) on a log axis, so only positive widths can be placed
  const whanY = toFloat(cols.ewHalpha, n, (v) => (v > 0 ? v : NaN))
  const niiLimits = cols.xLimit?.nii
  const whanSymbols = new Array<string>(n)
  for (let i = 0; i < n; i++) whanSymbols[i] = limitSymbol(niiLimits?.[i] ?? 0, 0)
  panels.whan = {
    x: panels.nii.x, y: whanY, xErr: panels.nii.xErr, yErr: new Float64Array(n).fill(NaN),
    symbols: whanSymbols, placed: countPlaced(panels.nii.x, whanY),
  }

  const colours = {} as Record<ClassDiagram, string[]>
  const labels = {} as Record<ClassDiagram, string[]>
  for (const d of ['overall', 'nii', 'sii', 'oi', 'whan'] as const) {
    const names = cols.classNames?.[d] ?? []
    const codes = cols.class?.[d] ?? []
    const colourOf = names.map(classColour)
    const labelOf = names.map(classLabel)
    const c = new Array<string>(n)
    const l = new Array<string>(n)
    for (let i = 0; i < n; i++) {
      const code = codes[i]
      c[i] = colourOf[code] ?? classColour(null)
      l[i] = labelOf[code] ?? 'Unclassified'
    }
    colours[d] = c
    labels[d] = l
  }
  return { count: n, ids: cols.ids, panels, colours, labels }
}
