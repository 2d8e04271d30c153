import { describe, expect, it } from 'vitest'
import { changesWindow, hasFigure, hasSelectionOutline, readFrame, viewOf } from '../../../../../src/lib/diagrams/plotly-frame'

// The typed reading of plotly's figure state on its element; the expected values are the inputs
// rearranged or scaled (common practice). Plotly keeps a log axis's range in log10 (its convention).

/** An element as plotly leaves it after a draw: margins 62/30, plotting area 576 × 400 CSS px. */
function drawn(yType = 'linear', range: [number, number] = [-1.5, 1.6]) {
  const gd = document.createElement('div')
  Object.assign(gd, {
    _fullLayout: { _size: { l: 62, t: 30, w: 576, h: 400 }, width: 652, height: 478, xaxis: { range: [-2.1, 1.0] }, yaxis: { range, type: yType } },
    layout: { selections: [{ type: 'rect' }] },
  })
  return gd
}

describe('readFrame', () => {
  it('gives the plotting area, the figure size and the window', () => {
    expect(readFrame(drawn())).toEqual({
      area: { left: 62, top: 30, width: 576, height: 400 }, width: 652, height: 478, xRange: [-2.1, 1.0], yRange: [-1.5, 1.6], yLog: false,
    })
    expect(readFrame(drawn('log', [-1, 3]))!.yLog).toBe(true)
  })

  it('is null before plotly has laid the figure out', () => {
    const gd = document.createElement('div')
    expect(readFrame(gd)).toBeNull()
    expect(readFrame(undefined)).toBeNull()
    // the figure exists as soon as the draw starts, its layout a little later
    Object.assign(gd, { _fullLayout: {} })
    expect(hasFigure(gd)).toBe(true)
    expect(readFrame(gd)).toBeNull()
    expect(hasFigure(document.createElement('div'))).toBe(false)
  })
})

describe('viewOf', () => {
  const frame = readFrame(drawn())!

  it('sizes the view in device pixels', () => {
    expect(viewOf(frame, 2)).toEqual({ width: 1152, height: 800, x0: -2.1, x1: 1.0, y0: -1.5, y1: 1.6, yLog: false })
    // never below one pixel
    expect(viewOf({ ...frame, area: { ...frame.area, width: 0.2 } }, 1).width).toBe(1)
  })

  it('follows a drag in progress: either end, or the whole range', () => {
    expect(viewOf(frame, 1, { 'xaxis.range[0]': -1, 'yaxis.range[1]': 1 })).toMatchObject({ x0: -1, x1: 1.0, y0: -1.5, y1: 1 })
    expect(viewOf(frame, 1, { 'xaxis.range': [-0.5, 0.5] })).toMatchObject({ x0: -0.5, x1: 0.5 })
    // anything else in the event is not a range
    expect(viewOf(frame, 1, { 'xaxis.range[0]': 'auto', dragmode: 'pan' })).toMatchObject({ x0: -2.1, x1: 1.0 })
  })
})

describe('plotly events and outlines', () => {
  it('tells a change of window from a change of outline', () => {
    expect(changesWindow({ 'xaxis.range[0]': -1 })).toBe(true)
    expect(changesWindow({ autosize: true })).toBe(true)
    expect(changesWindow({ selections: [] })).toBe(false)
    expect(changesWindow(undefined)).toBe(false)
  })

  it('sees a box or lasso outline left on the frame', () => {
    expect(hasSelectionOutline(drawn())).toBe(true)
    expect(hasSelectionOutline(document.createElement('div'))).toBe(false)
  })
})
