import { describe, expect, it } from 'vitest'
import { makeSprite, parseColour, projectPoints, rasterise, SYMBOL, type RasterInput } from '../../../../../src/lib/diagrams/point-raster'

// Geometry and compositing checks of the point layer. The "over" operator is Porter & Duff (1984,
// "Compositing Digital Images", SIGGRAPH); the rest is plain arithmetic on the inputs (common practice).

function centroid(s: ReturnType<typeof makeSprite>) {
  let m = 0, x = 0, y = 0
  for (let i = 0; i < s.cover.length; i++) { m += s.cover[i]; x += s.dx[i] * s.cover[i]; y += s.dy[i] * s.cover[i] }
  return { m, x: x / m, y: y / m }
}

describe('makeSprite', () => {
  it('covers a disc of the asked diameter', () => {
    const s = makeSprite(SYMBOL.circle, 5)
    const c = centroid(s)
    // area of a disc of radius 2.5 px is π·2.5² = 19.63 px²; 4×4 supersampling is good to a few per cent
    expect(c.m).toBeGreaterThan(19.63 * 0.95)
    expect(c.m).toBeLessThan(19.63 * 1.05)
    expect(Math.abs(c.x)).toBeLessThan(1e-9)
    expect(Math.abs(c.y)).toBeLessThan(1e-9)
    const centre = [...s.dx].findIndex((dx, i) => dx === 0 && s.dy[i] === 0)
    expect(s.cover[centre]).toBe(1)
  })

  it('points the limit triangles the way the value may go', () => {
    // a triangle's centroid lies a third of the way from its base to its tip: opposite the tip
    expect(centroid(makeSprite(SYMBOL.left, 6)).x).toBeGreaterThan(0.3)
    expect(centroid(makeSprite(SYMBOL.right, 6)).x).toBeLessThan(-0.3)
    expect(centroid(makeSprite(SYMBOL.down, 6)).y).toBeLessThan(-0.3) // pixel y grows downwards
    expect(centroid(makeSprite(SYMBOL.up, 6)).y).toBeGreaterThan(0.3)
    expect(Math.abs(centroid(makeSprite(SYMBOL.left, 6)).y)).toBeLessThan(1e-9)
  })
})

describe('projectPoints', () => {
  const view = { width: 100, height: 50, x0: 0, x1: 1, y0: 0, y1: 1, yLog: false }
  it('maps axis units to device pixels with y growing downwards', () => {
    const { px, py } = projectPoints([0.5, 0, NaN, 3], [0.5, 1, 0.5, 0.5], view)
    expect([px[0], py[0]]).toEqual([50, 25])
    expect([px[1], py[1]]).toEqual([0, 0])
    expect(Number.isNaN(px[2])).toBe(true) // not measured
    expect(Number.isNaN(px[3])).toBe(true) // far outside the window
  })
  it('takes log10 of the data on a log axis, whose range is in log10 (plotly convention)', () => {
    const { py } = projectPoints([0.5, 0.5], [10, -1], { ...view, y0: 0, y1: 2, yLog: true })
    expect(py[0]).toBe(25) // log10(10) = 1 is half-way up [0, 2]
    expect(Number.isNaN(py[1])).toBe(true) // no log of a negative width
  })
})

describe('rasterise', () => {
  const red = parseColour('#FF0000'), blue = parseColour('#0000FF')
  function input(over: Partial<RasterInput>): RasterInput {
    return {
      width: 21, height: 21, px: Float32Array.of(10), py: Float32Array.of(10), codes: Uint8Array.of(0),
      palette: [red, blue], symbols: null, layers: [{ diameter: 5, opacity: 1 }], ...over,
    }
  }
  const at = (out: Uint8ClampedArray, x: number, y: number) => Array.from(out.slice((y * 21 + x) * 4, (y * 21 + x) * 4 + 4))

  it('draws an opaque marker in its class colour and nothing elsewhere', () => {
    const out = new Uint8ClampedArray(21 * 21 * 4)
    const box = rasterise(out, input({}))
    expect(at(out, 10, 10)).toEqual([255, 0, 0, 255])
    expect(at(out, 0, 0)).toEqual([0, 0, 0, 0])
    expect(box.x0).toBeLessThanOrEqual(7)
    expect(box.x1).toBeGreaterThanOrEqual(14)
  })

  it('composites "over": blue at ½ over red at ½ gives α = ¾ and colour ⅓ red, ⅔ blue (Porter & Duff 1984)', () => {
    const out = new Uint8ClampedArray(21 * 21 * 4)
    rasterise(out, input({ px: Float32Array.of(10, 10), py: Float32Array.of(10, 10), codes: Uint8Array.of(0, 1), layers: [{ diameter: 5, opacity: 0.5 }] }))
    const [r, g, b, a] = at(out, 10, 10)
    expect(a).toBe(Math.round(0.75 * 255))
    expect(r).toBe(Math.round(255 / 3))
    expect(g).toBe(0)
    expect(b).toBe(Math.round((2 * 255) / 3))
  })

  it('draws only the masked points of a masked layer', () => {
    const out = new Uint8ClampedArray(21 * 21 * 4)
    rasterise(out, input({ px: Float32Array.of(4, 16), py: Float32Array.of(10, 10), codes: Uint8Array.of(0, 1), layers: [{ diameter: 3, opacity: 1, mask: Uint8Array.of(0, 1), maskValue: 1 }] }))
    expect(at(out, 4, 10)[3]).toBe(0)
    expect(at(out, 16, 10)).toEqual([0, 0, 255, 255])
  })

  it('draws error bars of the given half-length in pixels', () => {
    const out = new Uint8ClampedArray(21 * 21 * 4)
    rasterise(out, input({ layers: [{ diameter: 1, opacity: 0 }], errors: { ex: Float32Array.of(6), ey: null, colour: [0, 0, 0, 1] } }))
    expect(at(out, 4, 10)[3]).toBe(255) // 10 − 6
    expect(at(out, 16, 10)[3]).toBe(255) // 10 + 6
    expect(at(out, 3, 10)[3]).toBe(0)
    expect(at(out, 10, 6)[3]).toBe(0) // no y bar asked for
  })

  it('draws vertical bars too, clipped at the edge of the window', () => {
    const out = new Uint8ClampedArray(21 * 21 * 4)
    rasterise(out, input({ layers: [{ diameter: 1, opacity: 0 }], errors: { ex: null, ey: Float32Array.of(15), colour: [0, 0, 0, 1] } }))
    expect(at(out, 10, 0)[3]).toBe(255) // 10 − 15 is clipped to row 0
    expect(at(out, 10, 20)[3]).toBe(255)
    expect(at(out, 9, 10)[3]).toBe(0)
  })
})
