import { describe, expect, it } from 'vitest'
import type { DiagramColumns } from '../../../../../src/api/types'
import { prepareDiagramArrays, pointTipText, fmtAxis } from '../../../../../src/lib/diagrams/diagram-arrays'
import { countSelected, errorBars, selectionMaskFor } from '../../../../../src/lib/diagrams/point-layers'
import type { View } from '../../../../../src/lib/diagrams/point-raster'

// What the point layers are painted from; error bars are the 1σ values scaled to pixels, a plain
// change of units (common practice).

const unclassified = ['unclassified']
const cols: DiagramColumns = {
  revision: 1, count: 2, ids: ['A', 'B'], redshift: [0.1, 0.2],
  class: { overall: [0, 0], nii: [0, 0], sii: [0, 0], oi: [0, 0], whan: [0, 0] },
  classNames: { overall: unclassified, nii: unclassified, sii: unclassified, oi: unclassified, whan: unclassified },
  x: { nii: [-0.5, 0.25], sii: [-0.4, 0.0], oi: [-1.5, -0.5] },
  y: [-0.25, 0.5],
  xErr: { nii: [0.5, 0.25], sii: [0.02, 0.03], oi: [0.05, 0.05] },
  yErr: [0.25, 0.5],
  xLimit: { nii: [0, 0], sii: [0, 0], oi: [0, 0] },
  yLimit: [0, 0],
  ewHalpha: [24, 8],
}
const a = prepareDiagramArrays(cols)
// 2 dex over 200 px on both axes: 100 px per dex
const view: View = { width: 200, height: 200, x0: -1, x1: 1, y0: -1, y1: 1, yLog: false }

describe('selectionMaskFor', () => {
  it('keeps a selection made for these arrays and drops a stale one', () => {
    const mask = Uint8Array.from([1, 0])
    expect(selectionMaskFor(a, mask)).toBe(mask)
    expect(selectionMaskFor(a, Uint8Array.from([1, 0, 1]))).toBeNull()
    expect(selectionMaskFor(null, mask)).toBeNull()
  })
})

describe('errorBars', () => {
  it('scales the 1σ errors to device pixels', () => {
    const e = errorBars(a, a.panels.nii, view, false, null)
    expect(Array.from(e.ex!)).toEqual([50, 25])
    expect(Array.from(e.ey!)).toEqual([25, 50])
    expect(e.colour).toEqual([0.24, 0.24, 0.24, 0.3])
    expect(errorBars(a, a.panels.nii, view, true, null).colour).toEqual([0.86, 0.86, 0.86, 0.35])
  })

  it('gives no bar to a point outside the mask, and no y bars on a log axis', () => {
    const e = errorBars(a, a.panels.nii, { ...view, yLog: true }, false, Uint8Array.from([0, 1]))
    expect(Array.from(e.ex!)).toEqual([0, 25])
    expect(e.ey).toBeNull()
  })
})

describe('countSelected', () => {
  it('counts the selected points that are inside the window', () => {
    expect(countSelected(Uint8Array.from([1, 1, 0]), Float32Array.from([3, NaN, 5]))).toBe(1)
    expect(countSelected(null, Float32Array.from([3]))).toBe(0)
  })
})

describe('pointTipText', () => {
  it('names the galaxy, its class and its position', () => {
    expect(pointTipText(a, a.panels.nii, 'overall', false, 1)).toEqual({ id: 'B', label: 'Unclassified', x: '0.250', y: '0.500' })
    // EW(Hα) on the WHAN panel's log axis, in Å
    expect(fmtAxis(24, true)).toBe('24.0 Å')
    expect(fmtAxis(NaN, false)).toBe('—')
  })
})
