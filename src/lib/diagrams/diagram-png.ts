import type { PlotlyModule } from '../../utils/plotly'
import { figureOf, readFrame, viewOf } from './plotly-frame'
import type { View } from './point-raster'

/** A point layer painted for the image, drawn under the frame at the plotting area's corner. */
export interface PngLayer {
  canvas: HTMLCanvasElement
  alpha: number
}

export interface DiagramPngOptions {
  /** written into the image where the panel shows its HTML heading */
  title: string
  /** device pixels per CSS pixel of the image */
  scale: number
  /** behind everything when the panel's own background cannot be read */
  fallbackBackground: string
  /** the point layers, painted for the window the frame shows at `scale` */
  layers: (view: View, scale: number) => PngLayer[]
}

/**
 * The panel as one PNG (a data URL): plotly's image export knows nothing of the point layer, so its
 * frame is rendered on its own and laid over the points here. Null when the plot is not drawn.
 */
export async function diagramPng(Plotly: PlotlyModule, gd: HTMLElement, o: DiagramPngOptions): Promise<string | null> {
  const before = readFrame(gd)
  if (!before) return null
  const { scale } = o
  const { data, layout } = figureOf(gd)
  const titled = { data, layout: { ...layout, title: { text: o.title, font: { size: 14 }, x: 0.02, xanchor: 'left', y: 0.98 } } }
  const frameUrl = await Plotly.toImage(titled as never, { format: 'png', width: before.width, height: before.height, scale } as never)
  const frameImg = new Image()
  frameImg.src = frameUrl
  await frameImg.decode()
  const out = document.createElement('canvas')
  out.width = before.width * scale
  out.height = before.height * scale
  const ctx = out.getContext('2d')
  // the window as it is now: the frame was rendered from the same figure state
  const frame = readFrame(gd)
  if (!ctx || !frame) return null
  ctx.fillStyle = getComputedStyle(gd.parentElement ?? gd).backgroundColor || o.fallbackBackground
  ctx.fillRect(0, 0, out.width, out.height)
  for (const layer of o.layers(viewOf(frame, scale), scale)) {
    ctx.globalAlpha = layer.alpha
    ctx.drawImage(layer.canvas, before.area.left * scale, before.area.top * scale)
  }
  ctx.globalAlpha = 1
  ctx.drawImage(frameImg, 0, 0)
  return out.toDataURL('image/png')
}

/** Saves a data URL as a file through the browser's download. */
export function downloadUrl(url: string, fileName: string) {
  const link = document.createElement('a')
  link.download = fileName
  link.href = url
  link.click()
}
