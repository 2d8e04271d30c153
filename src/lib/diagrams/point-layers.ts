import type { ClassDiagram } from '../../api/types'
import type { DiagramArrays, PanelArrays } from './diagram-arrays'
import { rasterise, type ErrorBars, type PointLayer, type Rgba, type View } from './point-raster'

/**
 * The two point layers of a sample panel painted into canvases: the whole sample ('all'), and only
 * the selected galaxies, larger and opaque ('selected'). They are separate canvases, so a new
 * selection repaints only the selected points and dims the sample layer with CSS opacity.
 */

/** CSS px, as the single-galaxy plots */
export const MARKER = 5
export const MARKER_SELECTED = 7

export type PointLayerKind = 'all' | 'selected'

/** Everything a panel's points depend on, read once per paint. */
export interface PointScene {
  arrays: DiagramArrays | null
  panel: PanelArrays | null
  /** the selection, only when it belongs to these arrays (see selectionMaskFor) */
  mask: Uint8Array | null
  /** which classification colours the points */
  colour: ClassDiagram
  showErrors: boolean
  dark: boolean
}

/** The selection mask when it was made for these arrays; a stale one (another load) selects nothing. */
export function selectionMaskFor(arrays: DiagramArrays | null, mask: Uint8Array | null): Uint8Array | null {
  return arrays && mask?.length === arrays.count ? mask : null
}

/** Error-bar half-lengths in device pixels; a point masked out of the layer gets no bar. */
export function errorBars(a: DiagramArrays, p: PanelArrays, view: View, dark: boolean, mask: Uint8Array | null): ErrorBars {
  const sx = view.width / (view.x1 - view.x0), sy = view.height / (view.y1 - view.y0)
  const ex = new Float32Array(a.count), ey = view.yLog ? null : new Float32Array(a.count)
  for (let i = 0; i < a.count; i++) {
    const on = !mask || mask[i] === 1
    ex[i] = on ? p.xErr[i] * sx : 0
    if (ey) ey[i] = on ? p.yErr[i] * sy : 0
  }
  const [r, g, b] = dark ? [0.86, 0.86, 0.86] : [0.24, 0.24, 0.24]
  return { ex, ey, colour: [r, g, b, dark ? 0.35 : 0.3] as Rgba }
}

/** Paints one layer into `target`, sized to the view; `px`/`py` are the projected points (projectPoints). */
export function paintPoints(target: HTMLCanvasElement, s: PointScene, view: View, scale: number, px: Float32Array, py: Float32Array, which: PointLayerKind) {
  const { arrays: a, panel: p, mask } = s
  if (target.width !== view.width) target.width = view.width
  if (target.height !== view.height) target.height = view.height
  const ctx = target.getContext('2d')
  if (!ctx) return
  if (!a || !p || (which === 'selected' && !mask)) { ctx.clearRect(0, 0, view.width, view.height); return }
  const layer: PointLayer = which === 'all'
    ? { diameter: MARKER * scale, opacity: 0.75 }
    : { mask: mask!, maskValue: 1, diameter: MARKER_SELECTED * scale, opacity: 1 }
  const img = ctx.createImageData(view.width, view.height)
  const box = rasterise(img.data, {
    width: view.width, height: view.height, px, py, codes: a.codes[s.colour], palette: a.palettes[s.colour],
    symbols: p.symbols, errors: s.showErrors ? errorBars(a, p, view, s.dark, which === 'selected' ? mask : null) : null, layers: [layer], scale,
  })
  ctx.clearRect(0, 0, view.width, view.height)
  if (box.x1 > box.x0 && box.y1 > box.y0) ctx.putImageData(img, 0, 0, box.x0, box.y0, box.x1 - box.x0, box.y1 - box.y0)
}

/** How many selected points fall inside the window (projected, not NaN). */
export function countSelected(mask: Uint8Array | null, px: Float32Array): number {
  let n = 0
  if (mask) for (let i = 0; i < px.length; i++) if (mask[i] === 1 && px[i] === px[i]) n++
  return n
}
