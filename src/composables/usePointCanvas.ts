import { onBeforeUnmount, ref, type Ref } from 'vue'
import { viewOf, type LiveRanges, type PlotFrame } from '../lib/diagrams/plotly-frame'
import { countSelected, paintPoints, type PointScene } from '../lib/diagrams/point-layers'
import { projectPoints, type View } from '../lib/diagrams/point-raster'
import type { PngLayer } from '../lib/diagrams/diagram-png'

/** The points as last drawn, in device pixels of the canvas (hover and click look them up). */
export interface ProjectedPoints {
  px: Float32Array
  py: Float32Array
  scale: number
}

export interface PointCanvasOptions {
  /** the whole sample, and the selection on top */
  base: Ref<HTMLCanvasElement | undefined>
  selected: Ref<HTMLCanvasElement | undefined>
  frame: () => PlotFrame | null
  scene: () => PointScene
  /** names the `rg:points-<name>` performance mark set after each paint with data */
  name: () => string
}

/**
 * The two point canvases under a plotly frame, kept exactly under its plotting area. The sample
 * layer is repainted only when what it shows changes; the selected layer on every draw.
 */
export function usePointCanvas(o: PointCanvasOptions) {
  const dimmed = ref(false)
  const drawn = ref(false)
  const selectedHere = ref(0)
  let projected: ProjectedPoints | null = null
  /** What the sample layer shows; it is repainted only when this changes. */
  let baseKey = ''
  let dataSerial = 0

  function draw(live?: LiveRanges) {
    const base = o.base.value, sel = o.selected.value
    const frame = o.frame()
    const scale = window.devicePixelRatio || 1
    if (!base || !sel || !frame) return
    const view = viewOf(frame, scale, live)
    // the canvases sit exactly under plotly's plotting area (the plot element is at the panel's origin)
    for (const c of [base, sel]) {
      c.style.left = `${frame.area.left}px`
      c.style.top = `${frame.area.top}px`
      c.style.width = `${frame.area.width}px`
      c.style.height = `${frame.area.height}px`
    }
    const s = o.scene()
    const p = s.panel
    const { px, py } = p ? projectPoints(p.x, p.y, view) : { px: new Float32Array(0), py: new Float32Array(0) }
    const key = [dataSerial, view.width, view.height, view.x0, view.x1, view.y0, view.y1, s.colour, s.showErrors, s.dark].join('|')
    if (key !== baseKey) { paintPoints(base, s, view, scale, px, py, 'all'); baseKey = key }
    paintPoints(sel, s, view, scale, px, py, 'selected')
    dimmed.value = !!s.mask
    projected = p ? { px, py, scale } : null
    selectedHere.value = countSelected(s.mask, px)
    drawn.value = !!s.arrays
    if (s.arrays) performance.mark(`rg:points-${o.name()}`)
  }

  let frameRequest = 0
  let pendingLive: LiveRanges | undefined
  /** Redraws at most once per animation frame. */
  function scheduleDraw(live?: LiveRanges) {
    pendingLive = live
    if (frameRequest) return
    frameRequest = requestAnimationFrame(() => { frameRequest = 0; draw(pendingLive) })
  }

  /** New arrays: the sample layer is stale whatever the key says. */
  function invalidate() {
    dataSerial++
    drawn.value = false
    scheduleDraw()
  }

  /** Both layers painted afresh for an image of the panel; the sample layer is dimmed as on screen. */
  function pngLayers(view: View, scale: number): PngLayer[] {
    const s = o.scene()
    const p = s.panel
    if (!p) return []
    const { px, py } = projectPoints(p.x, p.y, view)
    return (['all', 'selected'] as const).map((which) => {
      const canvas = document.createElement('canvas')
      paintPoints(canvas, s, view, scale, px, py, which)
      return { canvas, alpha: which === 'all' && dimmed.value ? 0.1 : 1 }
    })
  }

  onBeforeUnmount(() => { if (frameRequest) cancelAnimationFrame(frameRequest) })

  return { dimmed, drawn, selectedHere, projected: () => projected, draw, scheduleDraw, invalidate, pngLayers }
}
