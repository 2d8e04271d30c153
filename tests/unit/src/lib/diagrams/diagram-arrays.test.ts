import { describe, expect, it } from 'vitest'
import type { DiagramColumns } from '../../../../../src/api/types'
import { classLabelAt, indicesOfClass, limitSymbol, limitSymbolCode, prepareDiagramArrays } from '../../../../../src/lib/diagrams/diagram-arrays'
import { parseColour, SYMBOL } from '../../../../../src/lib/diagrams/point-raster'
import { CLASS_COLOURS } from '../../../../../shared/vocabulary/index.ts'

const names = {
  overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
  nii: ['star-forming', 'composite', 'agn', 'unclassified'],
  sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
}

const cols: DiagramColumns = {
  revision: 1, count: 3, ids: ['A', 'B', 'C'], redshift: [0.1, 0.2, null],
  class: { overall: [0, 2, 5], nii: [0, 2, 3], sii: [0, 1, 3], oi: [0, 1, 3], whan: [0, 1, 5] },
  classNames: names,
  x: { nii: [-0.5, 0.1, null], sii: [-0.4, 0.0, null], oi: [-1.5, -0.5, null] },
  y: [-0.2, 0.8, 0.1],
  xErr: { nii: [0.02, 0.03, null], sii: [0.02, 0.03, null], oi: [0.05, 0.05, null] },
  yErr: [0.02, 0.04, null],
  xLimit: { nii: [0, 1, 0], sii: [0, 0, 0], oi: [0, -1, 0] },
  yLimit: [0, 0, 1],
  ewHalpha: [24, 8, -1],
}

describe('prepareDiagramArrays', () => {
  const a = prepareDiagramArrays(cols)

  it('keeps the revision, redshifts and the measured EW (NaN where missing)', () => {
    expect(a.revision).toBe(1)
    // Float32 columns, as the binary form delivers them
    expect(Array.from(a.redshift)).toEqual([Math.fround(0.1), Math.fround(0.2), NaN])
    expect(Array.from(a.ew)).toEqual([24, 8, -1])
  })

  it('turns missing values into NaN and counts what can be placed', () => {
    expect(Array.from(a.panels.nii.x)).toEqual([-0.5, Math.fround(0.1), NaN])
    expect(a.panels.nii.placed).toBe(2)
    // WHAN needs a positive EW for its log axis
    expect(Number.isNaN(a.panels.whan.y[2])).toBe(true)
    expect(a.panels.whan.placed).toBe(2)
  })

  it('marks limits with arrow-like symbols', () => {
    expect(Array.from(a.panels.nii.symbols!)).toEqual([SYMBOL.circle, SYMBOL.left, SYMBOL.down])
    expect(a.panels.oi.symbols![1]).toBe(SYMBOL.right)
    // the WHAN panel has [N II] limits only; a panel without any limit needs no symbol array
    expect(Array.from(a.panels.whan.symbols!)).toEqual([SYMBOL.circle, SYMBOL.left, SYMBOL.circle])
    expect(prepareDiagramArrays({ ...cols, xLimit: { nii: [0, 0, 0], sii: [0, 0, 0], oi: [0, 0, 0] }, yLimit: [0, 0, 0] }).panels.nii.symbols).toBeNull()
    expect(limitSymbol(1, -1)).toBe('diamond')
    expect(limitSymbol(0, -1)).toBe('triangle-up')
    expect(limitSymbolCode(1, -1)).toBe(SYMBOL.diamond)
    expect(limitSymbolCode(0, -1)).toBe(SYMBOL.up)
  })

  it('colours by class with the Okabe–Ito hues', () => {
    expect(Array.from(a.codes.overall)).toEqual([0, 2, 5])
    expect(a.palettes.overall[a.codes.overall[0]]).toEqual(parseColour(CLASS_COLOURS['star-forming']))
    expect(a.palettes.overall[a.codes.overall[1]]).toEqual(parseColour(CLASS_COLOURS.seyfert))
    expect(classLabelAt(a, 'whan', 1)).toBe('Strong AGN')
    expect(classLabelAt(a, 'whan', 2)).toBe('Unclassified')
  })

  it('finds the galaxies of a class under one classification or any of several', () => {
    expect(indicesOfClass(a, 'seyfert', ['overall'])).toEqual([1])
    expect(indicesOfClass(a, 'star-forming', ['overall'])).toEqual([0])
    // 'seyfert' is a [S II] and [O I] class but not an [N II] one (that says 'agn')
    expect(indicesOfClass(a, 'seyfert', ['nii', 'sii', 'oi', 'whan'])).toEqual([1])
    expect(indicesOfClass(a, 'unclassified', ['nii', 'whan'])).toEqual([2])
    expect(indicesOfClass(a, 'no-such-class', ['overall'])).toEqual([])
  })

  it('maps a code outside the vocabulary to its last name (unclassified)', () => {
    const odd = prepareDiagramArrays({ ...cols, class: { ...cols.class, overall: [0, 99, -1] } })
    expect(Array.from(odd.codes.overall)).toEqual([0, 5, 5])
  })
})
