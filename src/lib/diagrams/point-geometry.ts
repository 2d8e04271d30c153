/**
 * Which points a drawn box or lasso holds, and which point is under the cursor. Both work on the
 * columnar arrays in axis units, so a selection is exact whatever the panel happens to draw.
 */

/** A selection outline as plotly reports it, in data units (linear even on a log axis). */
export type SelectionShape =
  | { kind: 'box'; x: [number, number]; y: [number, number] }
  | { kind: 'lasso'; x: number[]; y: number[] }

interface PlotlySelectionItem { type?: string; x0?: number; x1?: number; y0?: number; y1?: number; path?: string }
export interface PlotlySelectedEvent {
  range?: { x?: number[]; y?: number[] }
  lassoPoints?: { x?: number[]; y?: number[] }
  selections?: PlotlySelectionItem[]
}

/** "M x,y L x,y … Z" as plotly writes a lasso outline. */
export function parsePath(path: string): { x: number[]; y: number[] } | null {
  const nums = path.match(/-?\d*\.?\d+(?:e[-+]?\d+)?/gi)?.map(Number) ?? []
  if (nums.length < 6 || nums.length % 2) return null
  const x: number[] = [], y: number[] = []
  for (let i = 0; i < nums.length; i += 2) { x.push(nums[i]); y.push(nums[i + 1]) }
  return { x, y }
}

/**
 * The outlines of a plotly selection event. With shift held plotly keeps several outlines in
 * `selections`; their union is the selection. Older-style events carry only range / lassoPoints.
 */
export function shapesFromEvent(ev: PlotlySelectedEvent): SelectionShape[] {
  const out: SelectionShape[] = []
  for (const s of ev.selections ?? []) {
    if (s.type === 'rect' && [s.x0, s.x1, s.y0, s.y1].every((v) => typeof v === 'number' && Number.isFinite(v))) {
      out.push({ kind: 'box', x: [s.x0!, s.x1!], y: [s.y0!, s.y1!] })
    } else if (s.type === 'path' && s.path) {
      const p = parsePath(s.path)
      if (p) out.push({ kind: 'lasso', ...p })
    }
  }
  if (out.length) return out
  if (ev.range?.x?.length === 2 && ev.range.y?.length === 2) return [{ kind: 'box', x: [ev.range.x[0], ev.range.x[1]], y: [ev.range.y[0], ev.range.y[1]] }]
  if (ev.lassoPoints?.x?.length && ev.lassoPoints.y?.length === ev.lassoPoints.x.length) return [{ kind: 'lasso', x: ev.lassoPoints.x, y: ev.lassoPoints.y }]
  return []
}

/** Even–odd point-in-polygon test (the polygon's edges are straight in axis units). */
function inPolygon(px: number, py: number, xs: ArrayLike<number>, ys: ArrayLike<number>): boolean {
  let inside = false
  for (let i = 0, j = xs.length - 1; i < xs.length; j = i++) {
    if ((ys[i] > py) !== (ys[j] > py) && px < ((xs[j] - xs[i]) * (py - ys[i])) / (ys[j] - ys[i]) + xs[i]) inside = !inside
  }
  return inside
}

/**
 * Indices (ascending) of the points inside any of the shapes. On a log y axis outlines are straight
 * in log10(y), so both the outline and the points are compared in log10.
 */
export function pointsInShapes(x: ArrayLike<number>, y: ArrayLike<number>, shapes: SelectionShape[], yLog: boolean): number[] {
  const ty = (v: number) => (yLog ? Math.log10(v) : v)
  const prepared = shapes.map((s) => {
    if (s.kind === 'box') {
      const [xa, xb] = s.x[0] <= s.x[1] ? s.x : [s.x[1], s.x[0]]
      const ya = ty(Math.min(s.y[0], s.y[1])), yb = ty(Math.max(s.y[0], s.y[1]))
      return { box: [xa, xb, ya, yb] as const }
    }
    const ys = s.y.map(ty)
    return { xs: s.x, ys, bounds: [Math.min(...s.x), Math.max(...s.x), Math.min(...ys), Math.max(...ys)] as const }
  })
  const out: number[] = []
  for (let i = 0; i < x.length; i++) {
    const xi = x[i], yi = ty(y[i])
    if (xi !== xi || yi !== yi) continue
    for (const p of prepared) {
      if (p.box) {
        if (xi >= p.box[0] && xi <= p.box[1] && yi >= p.box[2] && yi <= p.box[3]) { out.push(i); break }
      } else if (xi >= p.bounds![0] && xi <= p.bounds![1] && yi >= p.bounds![2] && yi <= p.bounds![3] && inPolygon(xi, yi, p.xs!, p.ys!)) {
        out.push(i); break
      }
    }
  }
  return out
}

/** A bucket grid over projected points for nearest-point lookups (hover and click). */
export interface PointGrid {
  cell: number
  cols: number
  rows: number
  start: Int32Array
  items: Int32Array
  px: Float32Array
  py: Float32Array
}

export function buildGrid(px: Float32Array, py: Float32Array, width: number, height: number, cell = 8): PointGrid {
  const cols = Math.max(1, Math.ceil(width / cell)), rows = Math.max(1, Math.ceil(height / cell))
  const cellOf = new Int32Array(px.length)
  const counts = new Int32Array(cols * rows + 1)
  for (let i = 0; i < px.length; i++) {
    const X = px[i], Y = py[i]
    if (X !== X || X < 0 || Y < 0 || X >= width || Y >= height) { cellOf[i] = -1; continue }
    const c = Math.floor(Y / cell) * cols + Math.floor(X / cell)
    cellOf[i] = c
    counts[c + 1]++
  }
  for (let c = 0; c < cols * rows; c++) counts[c + 1] += counts[c]
  const start = counts.slice()
  const fill = counts.slice(0, cols * rows)
  const items = new Int32Array(start[cols * rows])
  for (let i = 0; i < px.length; i++) if (cellOf[i] >= 0) items[fill[cellOf[i]]++] = i
  return { cell, cols, rows, start, items, px, py }
}

/**
 * The point nearest to (x, y) within `radius` pixels, or −1. Among points at the same spot the one
 * drawn last (highest index) wins, as it is the one on top. `accept` can restrict the candidates.
 */
export function nearestPoint(g: PointGrid, x: number, y: number, radius: number, accept?: (i: number) => boolean): number {
  const c0 = Math.max(0, Math.floor((x - radius) / g.cell)), c1 = Math.min(g.cols - 1, Math.floor((x + radius) / g.cell))
  const r0 = Math.max(0, Math.floor((y - radius) / g.cell)), r1 = Math.min(g.rows - 1, Math.floor((y + radius) / g.cell))
  let best = -1, bestD = radius * radius
  for (let r = r0; r <= r1; r++) {
    for (let c = c0; c <= c1; c++) {
      const cell = r * g.cols + c
      for (let k = g.start[cell]; k < g.start[cell + 1]; k++) {
        const i = g.items[k]
        const dx = g.px[i] - x, dy = g.py[i] - y, d = dx * dx + dy * dy
        if ((d < bestD || (d === bestD && i > best)) && (!accept || accept(i))) { best = i; bestD = d }
      }
    }
  }
  return best
}
