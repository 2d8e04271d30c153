import type { ClassDiagram, DiagramColumns, DiagramKey } from '../../api/types'
import { classColour, classLabel } from '../../../shared/vocabulary/index.ts'
import { parseColour, SYMBOL, type SymbolCode } from './point-raster'
import { typedColumns, type TypedDiagramColumns } from '../../../shared/diagram-columns.ts'

/**
 * The columnar /diagram answer turned into what the point layer draws: typed arrays with NaN for
 * "not measured", a marker shape per point where a panel has limits, and a class code per point
 * with its palette. Computed once per load; selection and colouring only redraw.
 */
export interface PanelArrays {
  x: Float32Array
  y: Float32Array
  xErr: Float32Array
  yErr: Float32Array
  /** marker shape per point (SYMBOL codes), or null when the panel has no limits */
  symbols: Uint8Array | null
  /** how many points have both coordinates */
  placed: number
}

export interface DiagramArrays {
  /** the assumptions revision the results were computed under */
  revision: number
  count: number
  ids: string[]
  redshift: Float32Array
  /** EW(Hα) as measured (Å, emission positive); the WHAN panel places only positive widths */
  ew: Float32Array
  panels: Record<DiagramKey, PanelArrays>
  /** class code per point for each classification; codes outside the vocabulary become its last name (unclassified) */
  codes: Record<ClassDiagram, Uint8Array>
  names: Record<ClassDiagram, string[]>
  /** straight RGB (0–1) per class code, Okabe & Ito hues */
  palettes: Record<ClassDiagram, [number, number, number][]>
}

/** Upper limit in x points left, in y points down; lower limits the other way (shared/science/README.md §9). */
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

function symbolCodes(n: number, xl: Int8Array | undefined, yl: Int8Array | undefined): Uint8Array | null {
  if (!xl?.some((v) => v) && !yl?.some((v) => v)) return null
  const out = new Uint8Array(n)
  for (let i = 0; i < n; i++) out[i] = limitSymbolCode(xl?.[i] ?? 0, yl?.[i] ?? 0)
  return out
}

function countPlaced(x: Float32Array, y: Float32Array): number {
  let n = 0
  for (let i = 0; i < x.length; i++) if (!Number.isNaN(x[i]) && !Number.isNaN(y[i])) n++
  return n
}

/** From the JSON form of GET …/diagram (tests, and a server that answers JSON only). */
export function prepareDiagramArrays(cols: DiagramColumns): DiagramArrays {
  return prepareTypedColumns(typedColumns(cols))
}

/** From the typed form (the binary answer decodes straight into it); the data columns are used as they are. */
export function prepareTypedColumns(t: TypedDiagramColumns): DiagramArrays {
  const n = t.count
  const panels = {} as Record<DiagramKey, PanelArrays>
  for (const key of ['nii', 'sii', 'oi'] as const) {
    panels[key] = { x: t.x[key], y: t.y, xErr: t.xErr[key], yErr: t.yErr, symbols: symbolCodes(n, t.xLimit[key], t.yLimit), placed: countPlaced(t.x[key], t.y) }
  }
  // WHAN: EW(Hα) on a log axis, so only positive widths can be placed
  const whanY = new Float32Array(n)
  for (let i = 0; i < n; i++) whanY[i] = t.ewHalpha[i] > 0 ? t.ewHalpha[i] : NaN
  panels.whan = {
    x: t.x.nii, y: whanY, xErr: t.xErr.nii, yErr: new Float32Array(n).fill(NaN),
    symbols: symbolCodes(n, t.xLimit.nii, undefined), placed: countPlaced(t.x.nii, whanY),
  }

  const codes = {} as Record<ClassDiagram, Uint8Array>
  const names = {} as Record<ClassDiagram, string[]>
  const palettes = {} as Record<ClassDiagram, [number, number, number][]>
  for (const d of ['overall', 'nii', 'sii', 'oi', 'whan'] as const) {
    const vocabulary = t.classNames?.[d]?.length ? t.classNames[d] : ['unclassified']
    const given = t.class[d]
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
  return { revision: t.revision, count: n, ids: t.ids, redshift: t.redshift, ew: t.ewHalpha, panels, codes, names, palettes }
}

/** The class name of point i under a classification. */
export function classNameAt(a: DiagramArrays, d: ClassDiagram, i: number): string {
  return a.names[d][a.codes[d][i]]
}

/** Indices (ascending) of the galaxies given class `name` by any of the classifications `by`. */
export function indicesOfClass(a: DiagramArrays, name: string, by: ClassDiagram[]): number[] {
  const want = by.map((d) => a.names[d].indexOf(name))
  const out: number[] = []
  for (let i = 0; i < a.count; i++) {
    for (let k = 0; k < by.length; k++) if (want[k] >= 0 && a.codes[by[k]][i] === want[k]) { out.push(i); break }
  }
  return out
}

/** The class label of point i under a classification, for tooltips. */
export function classLabelAt(a: DiagramArrays, d: ClassDiagram, i: number): string {
  return classLabel(a.names[d][a.codes[d][i]])
}

/** What a tooltip says about one point. */
export interface PointTipText { id: string; label: string; x: string; y: string }

/** An axis value for a tooltip: three decimals of a log ratio, or three figures of EW(Hα) on the log axis. */
export function fmtAxis(v: number, log: boolean): string {
  if (!Number.isFinite(v)) return '—'
  return log ? `${v.toPrecision(3)} Å` : v.toFixed(3)
}

/** The tooltip of point i on a panel, coloured by classification `d`. */
export function pointTipText(a: DiagramArrays, p: PanelArrays, d: ClassDiagram, yLog: boolean, i: number): PointTipText {
  return { id: a.ids[i], label: classLabelAt(a, d, i), x: fmtAxis(p.x[i], false), y: fmtAxis(p.y[i], yLog) }
}
