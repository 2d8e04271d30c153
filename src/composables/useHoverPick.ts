import { onBeforeUnmount, ref, type Ref } from 'vue'
import { buildGrid, nearestPoint, type PointGrid } from '../lib/diagrams/point-geometry'
import type { PointTipText } from '../lib/diagrams/diagram-arrays'
import type { ProjectedPoints } from './usePointCanvas'

export type PointTip = PointTipText & { left: number; top: number }

export interface HoverPickOptions {
  /** the plot element: it takes the mouse (the canvases under it let events through) */
  host: Ref<HTMLElement | undefined>
  /** the sample canvas: its size and place give the pixel grid of `projected` */
  canvas: Ref<HTMLCanvasElement | undefined>
  /** the points as drawn, or null when there are none to pick */
  projected: () => ProjectedPoints | null
  describe: (i: number) => PointTipText | null
  /** a click on point i */
  onPick: (i: number) => void
}

/**
 * Hover and click on the point layer, answered from the projected points through a bucket grid
 * (built on the first hover after each draw): a tooltip that follows the mouse at most once per
 * frame, and a click — a press and release within a few pixels — that picks the point under it.
 */
export function useHoverPick(o: HoverPickOptions) {
  const tip = ref<PointTip | null>(null)
  let grid: PointGrid | null = null
  let gridOf: ProjectedPoints | null = null

  /** The point under a client position, or −1. */
  function pointAt(clientX: number, clientY: number): number {
    const c = o.canvas.value
    const projected = o.projected()
    if (!c || !projected) return -1
    const rect = c.getBoundingClientRect()
    const x = clientX - rect.left, y = clientY - rect.top
    if (x < 0 || y < 0 || x > rect.width || y > rect.height) return -1
    const s = projected.scale
    if (!grid || gridOf !== projected) { grid = buildGrid(projected.px, projected.py, c.width, c.height, 8 * s); gridOf = projected }
    return nearestPoint(grid, x * s, y * s, 6 * s)
  }

  let moveFrame = 0
  let lastMove: { x: number; y: number } | null = null
  function showTip() {
    moveFrame = 0
    const m = lastMove
    const host = o.host.value
    if (!m || !host) { tip.value = null; return }
    const i = pointAt(m.x, m.y)
    const text = i >= 0 ? o.describe(i) : null
    if (!text) { tip.value = null; return }
    const box = host.getBoundingClientRect()
    const left = m.x - box.left, top = m.y - box.top
    // kept inside the panel: written leftwards near its right edge
    tip.value = { left: left > box.width - 220 ? left - 212 : left + 14, top: Math.max(4, top - 10), ...text }
  }

  function onMove(e: MouseEvent) {
    if (e.buttons) { tip.value = null; return } // dragging a box or panning
    lastMove = { x: e.clientX, y: e.clientY }
    if (!moveFrame) moveFrame = requestAnimationFrame(showTip)
  }
  function onLeave() { lastMove = null; tip.value = null }

  // plotly's drag layer takes the release, so it is heard on window
  let press: { x: number; y: number } | null = null
  function onPress(e: PointerEvent) {
    if (e.button !== 0) return
    press = { x: e.clientX, y: e.clientY }
    window.addEventListener('pointerup', onRelease, { once: true })
  }
  function onRelease(e: PointerEvent) {
    const start = press
    press = null
    if (!start || Math.hypot(e.clientX - start.x, e.clientY - start.y) > 4) return
    const i = pointAt(e.clientX, e.clientY)
    if (i >= 0) o.onPick(i)
  }

  /** Starts listening on the plot element (once plotly has drawn its drag layer there). */
  function attach(node: HTMLElement) {
    node.addEventListener('pointerdown', onPress, { capture: true })
    node.addEventListener('mousemove', onMove)
    node.addEventListener('mouseleave', onLeave)
  }

  onBeforeUnmount(() => {
    if (moveFrame) cancelAnimationFrame(moveFrame)
    window.removeEventListener('pointerup', onRelease)
  })

  return { tip, attach }
}
