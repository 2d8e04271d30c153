import type { View } from './point-raster'

/**
 * The typed face of a plotly plot element. Plotly publishes no API for where it put the plotting
 * area or which window it shows, so this is the one place its private `_fullLayout` is read; a
 * plotly upgrade that moves those fields breaks here and nowhere else.
 */

/** Plotly's private figure state, the few fields read here. */
interface FullLayout {
  _size?: { l: number; t: number; w: number; h: number }
  width: number
  height: number
  xaxis?: { range?: [number, number] }
  yaxis?: { range?: [number, number]; type?: string }
}

/** What a drawn plot looks like, in CSS pixels from the plot element's corner and in axis units. */
export interface PlotFrame {
  /** the plotting area inside the margins */
  area: { left: number; top: number; width: number; height: number }
  /** the whole figure */
  width: number
  height: number
  xRange: [number, number]
  /** log10 of the limits on a log axis (plotly's convention) */
  yRange: [number, number]
  yLog: boolean
}

const fullLayoutOf = (gd: HTMLElement | null | undefined) => (gd as { _fullLayout?: FullLayout } | null | undefined)?._fullLayout

/** Whether plotly has drawn a figure on the element (set by the first draw, removed by purge). */
export function hasFigure(gd: HTMLElement | null | undefined): boolean {
  return !!fullLayoutOf(gd)
}

/** The drawn frame, or null before plotly has laid it out. */
export function readFrame(gd: HTMLElement | null | undefined): PlotFrame | null {
  const fl = fullLayoutOf(gd)
  const s = fl?._size, xr = fl?.xaxis?.range, yr = fl?.yaxis?.range
  if (!fl || !s || !xr || !yr) return null
  return {
    area: { left: s.l, top: s.t, width: s.w, height: s.h }, width: fl.width, height: fl.height,
    xRange: xr, yRange: yr, yLog: fl.yaxis!.type === 'log',
  }
}

/** A `plotly_relayouting` event: during a pan or zoom drag plotly reports the moving range before it commits it. */
export type LiveRanges = Record<string, unknown>

function axisRange(frame: PlotFrame, axis: 'xaxis' | 'yaxis', live?: LiveRanges): [number, number] {
  const r = axis === 'xaxis' ? frame.xRange : frame.yRange
  const a = live?.[`${axis}.range[0]`], b = live?.[`${axis}.range[1]`], whole = live?.[`${axis}.range`]
  if (Array.isArray(whole) && whole.length === 2) return [Number(whole[0]), Number(whole[1])]
  return [typeof a === 'number' ? a : Number(r[0]), typeof b === 'number' ? b : Number(r[1])]
}

/** The plotted window at `scale` device pixels per CSS pixel, following a drag in progress when given one. */
export function viewOf(frame: PlotFrame, scale: number, live?: LiveRanges): View {
  const [x0, x1] = axisRange(frame, 'xaxis', live)
  const [y0, y1] = axisRange(frame, 'yaxis', live)
  return {
    width: Math.max(1, Math.round(frame.area.width * scale)), height: Math.max(1, Math.round(frame.area.height * scale)),
    x0, x1, y0, y1, yLog: frame.yLog,
  }
}

/** Whether a `plotly_relayout` changed the window (selection outlines come through the same event). */
export function changesWindow(ev: Record<string, unknown> | null | undefined): boolean {
  return Object.keys(ev ?? {}).some((k) => k.startsWith('xaxis') || k.startsWith('yaxis') || k === 'autosize' || k === 'width' || k === 'height')
}

/** Whether the element still shows a box or lasso outline. */
export function hasSelectionOutline(gd: HTMLElement): boolean {
  return !!(gd as { layout?: { selections?: unknown[] } }).layout?.selections?.length
}

/** The element's traces and layout as plotly holds them (for an image export of the same figure). */
export function figureOf(gd: HTMLElement): { data: unknown[]; layout: Record<string, unknown> } {
  const g = gd as unknown as { data: unknown[]; layout: Record<string, unknown> }
  return { data: g.data, layout: g.layout }
}
