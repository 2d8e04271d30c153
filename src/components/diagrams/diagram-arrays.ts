import type { ClassDiagram, DiagramColumns, DiagramKey } from '../../api/types'
import { classColour, classLabel } from '../../utils/classes'
import { parseColour, SYMBOL, type SymbolCode } from './point-raster'

/**
 * The columnar /diagram answer turned into what the point layer draws: typed arrays with NaN for
 * "not measured", a marker shape per point where a panel has limits, and a class code per point
 * with its palette. Computed once per load; selection and colouring only redraw.
 */
export interface PanelArrays {
  x: Float64Array
  y: Float64Array
  xErr: Float64Array
  yErr: Float64Array
  /** marker shape per point (SYMBOL codes), or null when the panel has no limits */
  symbols: Uint8Array | null
  /** how many points have both coordinates */
  placed: number
}

export interface DiagramArrays {
  count: number
  ids: string[]
  panels: Record<DiagramKey, PanelArrays>
  /** class code per point for each classification; codes outside the vocabulary become its last name (unclassified) */
  codes: Record<ClassDiagram, Uint8Array>
  names: Record<ClassDiagram, string[]>
  /** straight RGB (0–1) per class code, Okabe & Ito hues */
  palettes: Record<ClassDiagram, [number, number, number][]>
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

/** The same choice as limitSymbol, as a SYMBOL code for the point layer. */
export function limitSymbolCode(xLimit: number, yLimit: number): SymbolCode {
  if (xLimit === 0 && yLimit === 0) return SYMBOL.circle
  if (xLimit !== 0 && yLimit !== 0) return SYMBOL.diamond
  if (xLimit === 1) return SYMBOL.left
  if (xLimit === -1) return SYMBOL.right
  return yLimit === 1 ? SYMBOL.down : SYMBOL.up
}

function symbolCodes(n: number, xl: number[] | undefined, yl: number[] | undefined): Uint8Array | null {
  if (!xl?.some((v) => v) && !yl?.some((v) => v)) return null
  const out = new Uint8Array(n)
  for (let i = 0; i < n; i++) out[i] = limitSymbolCode(xl?.[i] ?? 0, yl?.[i] ?? 0)
  return out
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
    panels[key] = { x, y, xErr: toFloat(cols.xErr?.[key], n), yErr, symbols: symbolCodes(n, cols.xLimit?.[key], cols.yLimit), placed: countPlaced(x, y) }
  }
  // WHAN: EW(Hα) on a log axis, so only positive widths can be placed
  const whanY = toFloat(cols.ewHalpha, n, (v) => (v > 0 ? v : NaN))
  panels.whan = {
    x: panels.nii.x, y: whanY, xErr: panels.nii.xErr, yErr: new Float64Array(n).fill(NaN),
    symbols: symbolCodes(n, cols.xLimit?.nii, undefined), placed: countPlaced(panels.nii.x, whanY),
  }

  const codes = {} as Record<ClassDiagram, Uint8Array>
  const names = {} as Record<ClassDiagram, string[]>
  const palettes = {} as Record<ClassDiagram, [number, number, number][]>
  for (const d of ['overall', 'nii', 'sii', 'oi', 'whan'] as const) {
    const vocabulary = cols.classNames?.[d]?.length ? cols.classNames[d] : ['unclassified']
    const given = cols.class?.[d] ?? []
    const unknown = vocabulary.length - 1
    const k = new Uint8Array(n)
    for (let i = 0; i < n; i++) {
      const code = given[i]
      k[i] = code >= 0 && code < vocabulary.length ? code : unknown
    }
    codes[d] = k
    names[d] = vocabulary
    palettes[d] = vocabulary.map((v) => parseColour(classColour(v)))
  }
  return { count: n, ids: cols.ids, panels, codes, names, palettes }
}

/** The class label of point i under a classification, for tooltips. */
export function classLabelAt(a: DiagramArrays, d: ClassDiagram, i: number): string {
  return classLabel(a.names[d][a.codes[d][i]])
}
