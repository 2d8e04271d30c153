/**
 * The points of a sample diagram drawn straight into pixels. Plotly still draws the frame (axes,
 * grid, demarcation lines, selection outlines, zoom and pan); the points live on a canvas under it.
 * A JavaScript loop over typed arrays draws 100 000 markers in a few tens of milliseconds on any
 * machine, with or without a GPU, so a selection or a new colouring redraws all four panels at once.
 */

/** Marker shapes: limits are drawn as arrow-like triangles pointing the way the value may go. */
export const SYMBOL = { circle: 0, left: 1, right: 2, down: 3, up: 4, diamond: 5 } as const
export type SymbolCode = (typeof SYMBOL)[keyof typeof SYMBOL]
const SYMBOL_COUNT = 6

/** The nonzero pixels of one marker: offsets from its centre and coverage (0–1). */
export interface Sprite {
  dx: Int16Array
  dy: Int16Array
  cover: Float32Array
}

function inside(symbol: SymbolCode, x: number, y: number, r: number): boolean {
  // a triangle with its tip towards −u: tip at u = −r, base at u = 0.8 r
  const tri = (u: number, v: number) => u >= -r && u <= 0.8 * r && Math.abs(v) <= (u + r) / 1.8
  switch (symbol) {
    case SYMBOL.circle: return x * x + y * y <= r * r
    case SYMBOL.diamond: return Math.abs(x) + Math.abs(y) <= 1.2 * r
    case SYMBOL.left: return tri(x, y)
    case SYMBOL.right: return tri(-x, y)
    case SYMBOL.up: return tri(y, x) // pixel y grows downwards
    default: return tri(-y, x)
  }
}

/** A marker of the given diameter in device pixels, supersampled 4 × 4 so small markers keep their shape. */
export function makeSprite(symbol: SymbolCode, diameter: number): Sprite {
  // limit markers are drawn a little larger: a triangle covers less than a circle of the same size
  const r = (symbol === SYMBOL.circle ? diameter : diameter * 1.35) / 2
  const half = Math.ceil(r) + 1
  const dx: number[] = [], dy: number[] = [], cover: number[] = []
  const S = 4
  for (let j = -half; j <= half; j++) {
    for (let i = -half; i <= half; i++) {
      let hits = 0
      for (let t = 0; t < S; t++) for (let s = 0; s < S; s++) {
        if (inside(symbol, i - 0.5 + (s + 0.5) / S, j - 0.5 + (t + 0.5) / S, r)) hits++
      }
      if (hits) { dx.push(i); dy.push(j); cover.push(hits / (S * S)) }
    }
  }
  return { dx: Int16Array.from(dx), dy: Int16Array.from(dy), cover: Float32Array.from(cover) }
}

const spriteCache = new Map<string, Sprite[]>()
/** All six shapes at one diameter, cached: panels redraw often at the same two sizes. */
export function spritesAt(diameter: number): Sprite[] {
  const key = diameter.toFixed(2)
  let set = spriteCache.get(key)
  if (!set) {
    set = Array.from({ length: SYMBOL_COUNT }, (_, s) => makeSprite(s as SymbolCode, diameter))
    spriteCache.set(key, set)
  }
  return set
}

/** The visible window of a panel: axis range in axis units (log10 for a log axis) and the size in device pixels. */
export interface View {
  width: number
  height: number
  x0: number
  x1: number
  y0: number
  y1: number
  yLog: boolean
}

/**
 * Device-pixel centres of every point, NaN where a point has no position or lies well outside the
 * window. For a log axis the data are in linear units and the range in log10 (plotly's convention).
 */
export function projectPoints(x: ArrayLike<number>, y: ArrayLike<number>, view: View, margin = 8): { px: Float32Array; py: Float32Array } {
  const n = x.length
  const px = new Float32Array(n)
  const py = new Float32Array(n)
  const sx = view.width / (view.x1 - view.x0)
  const sy = view.height / (view.y1 - view.y0)
  for (let i = 0; i < n; i++) {
    const yv = view.yLog ? Math.log10(y[i]) : y[i]
    const X = (x[i] - view.x0) * sx
    const Y = view.height - (yv - view.y0) * sy
    // NaN fails both comparisons, so unplaced points fall out here too
    if (X >= -margin && X <= view.width + margin && Y >= -margin && Y <= view.height + margin) {
      px[i] = X
      py[i] = Y
    } else {
      px[i] = NaN
      py[i] = NaN
    }
  }
  return { px, py }
}

/** A colour as straight RGB in 0–1 plus an opacity. */
export type Rgba = [number, number, number, number]

export function parseColour(css: string): [number, number, number] {
  const hex = /^#([0-9a-f]{6})$/i.exec(css.trim())
  if (hex) {
    const v = parseInt(hex[1], 16)
    return [((v >> 16) & 255) / 255, ((v >> 8) & 255) / 255, (v & 255) / 255]
  }
  const rgb = /^rgba?\(\s*([\d.]+)[\s,]+([\d.]+)[\s,]+([\d.]+)/i.exec(css.trim())
  if (rgb) return [Number(rgb[1]) / 255, Number(rgb[2]) / 255, Number(rgb[3]) / 255]
  return [0.5, 0.5, 0.5]
}

/** Premultiplied RGBA accumulation, one buffer shared by all panels (they draw one after the other). */
let scratch = new Float32Array(0)

export interface PointLayer {
  /** indices into px/py to draw, in drawing order; all points when absent */
  order?: ArrayLike<number>
  /** which points to draw: a point is drawn where mask[i] === maskValue; all when absent */
  mask?: Uint8Array
  maskValue?: number
  diameter: number
  opacity: number
}

export interface ErrorBars {
  /** half-lengths in device pixels; NaN or 0 draws nothing */
  ex: Float32Array | null
  ey: Float32Array | null
  colour: Rgba
  /** selected points keep full-strength bars, the others are dimmed like their markers */
  mask?: Uint8Array
  dimmed?: number
}

export interface RasterInput {
  width: number
  height: number
  px: Float32Array
  py: Float32Array
  /** class code per point, an index into palette */
  codes: Uint8Array
  palette: [number, number, number][]
  symbols: Uint8Array | null
  errors?: ErrorBars | null
  layers: PointLayer[]
  /** device pixels per CSS pixel: line widths follow it */
  scale?: number
}

function blend(buf: Float32Array, o: number, r: number, g: number, b: number, a: number) {
  const k = 1 - a
  buf[o] = r * a + buf[o] * k
  buf[o + 1] = g * a + buf[o + 1] * k
  buf[o + 2] = b * a + buf[o + 2] * k
  buf[o + 3] = a + buf[o + 3] * k
}

/**
 * One error bar: `thick` parallel runs of pixels along an axis from c − h to c + h (clipped to
 * `len`), the runs at k, k + 1, … across it (clipped to `across`). `at` gives a pixel's offset.
 */
function bar(buf: Float32Array, c: number, h: number, len: number, k: number, across: number, thick: number,
  at: (along: number, across: number) => number, step: number, r: number, g: number, b: number, a: number) {
  const from = Math.max(0, Math.round(c - h)), to = Math.min(len - 1, Math.round(c + h))
  for (let t = 0; t < thick; t++) {
    const j = k + t
    if (j < 0 || j >= across) continue
    for (let s = from, o = at(from, j); s <= to; s++, o += step) blend(buf, o, r, g, b, a)
  }
}

function drawErrors(buf: Float32Array, inp: RasterInput, e: ErrorBars) {
  const { width: W, height: H, px, py } = inp
  const [r, g, b, alpha] = e.colour
  const thick = Math.max(1, Math.round(inp.scale ?? 1))
  const xy = (x: number, y: number) => (y * W + x) * 4
  const yx = (y: number, x: number) => (y * W + x) * 4
  for (let i = 0; i < px.length; i++) {
    const X = px[i], Y = py[i]
    if (X !== X) continue
    const a = e.mask && e.mask[i] !== 1 ? alpha * (e.dimmed ?? 1) : alpha
    if (a <= 0) continue
    const hx = e.ex ? e.ex[i] : 0, hy = e.ey ? e.ey[i] : 0
    if (hx > 0.5) bar(buf, X, hx, W, Math.round(Y), H, thick, xy, 4, r, g, b, a)
    if (hy > 0.5) bar(buf, Y, hy, H, Math.round(X), W, thick, yx, W * 4, r, g, b, a)
  }
}

function drawLayer(buf: Float32Array, inp: RasterInput, layer: PointLayer) {
  const { width: W, height: H, px, py, codes, palette, symbols } = inp
  const sprites = spritesAt(layer.diameter)
  const n = layer.order ? layer.order.length : px.length
  const { mask } = layer
  const want = layer.maskValue ?? 1
  for (let k = 0; k < n; k++) {
    const i = layer.order ? layer.order[k] : k
    if (mask && mask[i] !== want) continue
    const X = px[i]
    if (X !== X) continue
    const cx = Math.round(X), cy = Math.round(py[i])
    const s = sprites[symbols ? symbols[i] : 0]
    const c = palette[codes[i]] ?? palette[palette.length - 1]
    const r = c[0], g = c[1], b = c[2]
    const { dx, dy, cover } = s
    for (let p = 0; p < cover.length; p++) {
      const xx = cx + dx[p], yy = cy + dy[p]
      if (xx < 0 || yy < 0 || xx >= W || yy >= H) continue
      blend(buf, (yy * W + xx) * 4, r, g, b, layer.opacity * cover[p])
    }
  }
}

/** A pixel rectangle: columns x0 ≤ x < x1, rows y0 ≤ y < y1; empty when x1 ≤ x0. */
export interface Box { x0: number; y0: number; x1: number; y1: number }

/** Where anything can be drawn: every drawn marker and bar, with room for the largest sprite. */
function extent(inp: RasterInput): Box {
  const { width: W, height: H, px, py } = inp
  let pad = 2
  for (const l of inp.layers) pad = Math.max(pad, Math.ceil(l.diameter * 0.7) + 2)
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity
  const drawnBy = (i: number) => inp.layers.some((l) => !l.mask || l.mask[i] === (l.maskValue ?? 1))
  const ex = inp.errors?.ex, ey = inp.errors?.ey
  for (let i = 0; i < px.length; i++) {
    const X = px[i]
    if (X !== X || !drawnBy(i)) continue
    const Y = py[i]
    const hx = ex && ex[i] > 0 ? ex[i] : 0, hy = ey && ey[i] > 0 ? ey[i] : 0
    if (X - hx < x0) x0 = X - hx
    if (X + hx > x1) x1 = X + hx
    if (Y - hy < y0) y0 = Y - hy
    if (Y + hy > y1) y1 = Y + hy
  }
  if (x1 < x0) return { x0: 0, y0: 0, x1: 0, y1: 0 }
  return {
    x0: Math.max(0, Math.floor(x0) - pad), y0: Math.max(0, Math.floor(y0) - pad),
    x1: Math.min(W, Math.ceil(x1) + pad + 1), y1: Math.min(H, Math.ceil(y1) + pad + 1),
  }
}

/**
 * Draws error bars then each layer of markers into `out` (straight RGBA bytes, as ImageData holds,
 * all zero on entry). Only the rectangle that can hold something is cleared, blended and
 * converted; it is returned so the caller uploads just that part (a small selection costs little).
 */
export function rasterise(out: Uint8ClampedArray, inp: RasterInput): Box {
  const W = inp.width
  const size = W * inp.height * 4
  if (scratch.length < size) scratch = new Float32Array(size)
  const buf = scratch
  const box = extent(inp)
  if (box.x1 <= box.x0 || box.y1 <= box.y0) return box
  for (let y = box.y0; y < box.y1; y++) buf.fill(0, (y * W + box.x0) * 4, (y * W + box.x1) * 4)
  if (inp.errors) drawErrors(buf, inp, inp.errors)
  for (const layer of inp.layers) drawLayer(buf, inp, layer)
  for (let y = box.y0; y < box.y1; y++) {
    for (let o = (y * W + box.x0) * 4, end = (y * W + box.x1) * 4; o < end; o += 4) {
      const a = buf[o + 3]
      if (a <= 0) continue
      const k = 255 / a
      out[o] = buf[o] * k
      out[o + 1] = buf[o + 1] * k
      out[o + 2] = buf[o + 2] * k
      out[o + 3] = a * 255
    }
  }
  return box
}
