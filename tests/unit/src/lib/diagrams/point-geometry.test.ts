import { describe, expect, it } from 'vitest'
import { buildGrid, nearestPoint, parsePath, pointsInShapes, shapesFromEvent } from '../../../../../src/lib/diagrams/point-geometry'

// Selection and picking on the columnar arrays; expected values follow from the inputs (common practice).

describe('shapesFromEvent', () => {
  it('reads every outline plotly keeps (shift adds outlines), boxes and lassos', () => {
    const shapes = shapesFromEvent({
      selections: [
        { type: 'rect', x0: 0, x1: 1, y0: 2, y1: 1 },
        { type: 'path', path: 'M0,0L1,0L1,1Z' },
      ],
    })
    expect(shapes).toEqual([
      { kind: 'box', x: [0, 1], y: [2, 1] },
      { kind: 'lasso', x: [0, 1, 1], y: [0, 0, 1] },
    ])
  })
  it('falls back to range and lassoPoints', () => {
    expect(shapesFromEvent({ range: { x: [0, 1], y: [0, 1] } })).toEqual([{ kind: 'box', x: [0, 1], y: [0, 1] }])
    expect(shapesFromEvent({ lassoPoints: { x: [0, 1, 1], y: [0, 0, 1] } })).toEqual([{ kind: 'lasso', x: [0, 1, 1], y: [0, 0, 1] }])
    expect(shapesFromEvent({})).toEqual([])
  })
  it('parses exponents and negative numbers in a path', () => {
    expect(parsePath('M-1.5e-1,2L3,-4L5,6Z')).toEqual({ x: [-0.15, 3, 5], y: [2, -4, 6] })
    expect(parsePath('M1,2')).toBeNull()
  })
})

describe('pointsInShapes', () => {
  const x = [0.1, 0.5, 0.9, NaN, 0.5]
  const y = [0.1, 0.5, 0.9, 0.5, 0.95]
  it('selects inside a box whichever corner came first, and never an unplaced point', () => {
    expect(pointsInShapes(x, y, [{ kind: 'box', x: [0.6, 0.2], y: [0.7, 0.3] }], false)).toEqual([1])
  })
  it('takes the union of several outlines', () => {
    expect(pointsInShapes(x, y, [{ kind: 'box', x: [0, 0.2], y: [0, 0.2] }, { kind: 'box', x: [0.8, 1], y: [0.8, 1] }], false)).toEqual([0, 2])
  })
  it('tests a lasso by the even–odd rule', () => {
    // triangle (0,0) (1,0) (1,1): holds points below the diagonal
    expect(pointsInShapes([0.9, 0.1, 0.5], [0.1, 0.9, 0.2], [{ kind: 'lasso', x: [0, 1, 1], y: [0, 0, 1] }], false)).toEqual([0, 2])
  })
  it('compares in log10 on a log axis, where outlines are straight', () => {
    // a lasso from EW 1 Å to 100 Å along a diagonal: the midpoint in log is 10 Å, not 50.5 Å
    const lasso = { kind: 'lasso' as const, x: [0, 1, 1], y: [1, 1, 100] }
    expect(pointsInShapes([0.5, 0.5], [5, 20], [lasso], true)).toEqual([0])
    expect(pointsInShapes([0.5], [-3], [{ kind: 'box', x: [0, 1], y: [0.1, 1000] }], true)).toEqual([])
  })
})

describe('nearestPoint', () => {
  const px = Float32Array.of(10, 30, 31, NaN)
  const py = Float32Array.of(10, 10, 10, 10)
  const grid = buildGrid(px, py, 64, 32, 8)
  it('finds the closest point within the radius', () => {
    expect(nearestPoint(grid, 12, 11, 6)).toBe(0)
    expect(nearestPoint(grid, 29, 10, 6)).toBe(1)
    expect(nearestPoint(grid, 50, 20, 6)).toBe(-1)
  })
  it('prefers the one drawn on top (higher index) at equal distance, and honours a filter', () => {
    expect(nearestPoint(grid, 30.5, 10, 6)).toBe(2)
    expect(nearestPoint(grid, 30.5, 10, 6, (i) => i !== 2)).toBe(1)
  })
})
