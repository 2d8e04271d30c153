import { describe, expect, it } from 'vitest'
import { decodeDiagramColumns, encodeDiagramColumns, typedColumns, type DiagramColumnsJson } from '../../../shared/diagram-columns.ts'

// The binary form of the diagram columns: a lossless round trip apart from Float32 rounding
// (IEEE 754 single precision keeps 24 bits of mantissa, a relative 6e-8: common practice).

const doc: DiagramColumnsJson = {
  revision: 3, count: 3, ids: ['A-1', 'B-2', 'Ω-3'], redshift: [0.1234, null, 0.5],
  class: { overall: [0, 2, 5], nii: [0, 2, 3], sii: [0, 1, 3], oi: [0, 1, 3], whan: [0, 1, 5] },
  classNames: { overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'], nii: ['star-forming', 'composite', 'agn', 'unclassified'], sii: ['star-forming', 'seyfert', 'liner', 'unclassified'], oi: ['star-forming', 'seyfert', 'liner', 'unclassified'], whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'] },
  x: { nii: [-0.4523, 0.1, null], sii: [-0.4, 0, null], oi: [-1.5, -0.5, null] },
  y: [-0.2, 0.8, 0.1], xErr: { nii: [0.02, 0.03, null], sii: [0.02, 0.03, null], oi: [0.05, 0.05, null] }, yErr: [0.02, 0.04, null],
  xLimit: { nii: [0, 1, 0], sii: [0, 0, 0], oi: [0, -1, 0] }, yLimit: [0, 0, 1], ewHalpha: [24.5, -1.25, null],
}

describe('diagram columns, binary form', () => {
  const bytes = encodeDiagramColumns(typedColumns(doc))
  const back = decodeDiagramColumns(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer)

  it('round-trips header, IDs (any Unicode) and class vocabularies exactly', () => {
    expect(back.revision).toBe(3)
    expect(back.count).toBe(3)
    expect(back.ids).toEqual(['A-1', 'B-2', 'Ω-3'])
    expect(back.classNames).toEqual(doc.classNames)
  })

  it('keeps numbers to Float32 precision and missing values as NaN', () => {
    expect(back.x.nii[0]).toBeCloseTo(-0.4523, 7)
    expect(Math.fround(-0.4523)).toBe(back.x.nii[0])
    expect(Number.isNaN(back.x.nii[2])).toBe(true)
    expect(Number.isNaN(back.redshift[1])).toBe(true)
    expect(back.ewHalpha[1]).toBe(-1.25) // exactly representable
  })

  it('keeps class codes and limit flags as small integers', () => {
    expect(Array.from(back.class.overall)).toEqual([0, 2, 5])
    expect(Array.from(back.xLimit.oi)).toEqual([0, -1, 0])
    expect(Array.from(back.yLimit)).toEqual([0, 0, 1])
  })

  it('places every column on a 4-byte boundary, so Float32 views need no copy', () => {
    expect(back.y.byteOffset % 4).toBe(0)
    expect(back.xErr.oi.byteOffset % 4).toBe(0)
  })

  it('refuses what is not this format, or is cut short', () => {
    expect(() => decodeDiagramColumns(new ArrayBuffer(4))).toThrow(/too short/)
    expect(() => decodeDiagramColumns(new Uint8Array(16).buffer)).toThrow(/not this format/)
    const cut = bytes.slice(0, bytes.length - 8)
    expect(() => decodeDiagramColumns(cut.buffer)).toThrow(/overruns/)
  })

  it('maps a code that is not a small integer to −1 (no class)', () => {
    const odd = typedColumns({ ...doc, class: { ...doc.class, overall: [0, 300, 1.5] } })
    expect(Array.from(odd.class.overall)).toEqual([0, -1, -1])
  })
})
