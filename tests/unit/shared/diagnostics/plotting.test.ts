import { describe, expect, it } from 'vitest'
import { demarcationCurves, oiiRatioCurve, reddeningVector, siiRatioCurve, whanLines } from '../../../../shared/diagnostics/plotting.ts'
import { kauffmann2003Line } from '../../../../shared/diagnostics/demarcation.ts'
import { electronDensityFromSiiRatio } from '../../../../shared/diagnostics/density.ts'

describe('plotting helpers', () => {
  it('sample the same demarcation curves the classifier uses', () => {
    const curves = demarcationCurves()
    expect(curves.map((c) => `${c.diagram}:${c.key}`)).toEqual(['nii:ka03', 'nii:ke01', 'nii:s07', 'sii:ke01', 'sii:ke06', 'oi:ke01', 'oi:ke06'])
    const ka = curves[0]
    ka.x.forEach((x, j) => expect(ka.y[j]).toBeCloseTo(kauffmann2003Line(x) as number, 12))
    expect(Math.max(...ka.x)).toBeLessThan(0.05) // never past the asymptote
    expect(demarcationCurves('sii').map((c) => c.key)).toEqual(['ke01', 'ke06'])
  })
  it('give the WHAN boundaries of Cid Fernandes et al. 2011', () => {
    const w = whanLines()
    expect(w.find((l) => l.key === 'sf-agn')?.x).toEqual([-0.4, -0.4])
    expect(w.find((l) => l.key === 'strong-weak-agn')?.y).toEqual([6, 6])
    expect(w.find((l) => l.key === 'retired')?.y).toEqual([3, 3])
    expect(w.find((l) => l.key === 'passive')?.y).toEqual([0.5, 0.5])
  })
  it('give density curves consistent with the inverse fit', () => {
    const c = siiRatioCurve(12000)
    expect(c.ne[0]).toBe(1)
    expect(c.ne[100]).toBeCloseTo(1e5, 6)
    expect(electronDensityFromSiiRatio(c.ratio[40], 12000) as number).toBeCloseTo(c.ne[40], 6)
    expect(oiiRatioCurve(1e4).ratio[0]).toBeCloseTo(1.4561, 4) // shared/science/README.md §3
    expect(() => siiRatioCurve(0)).toThrow(RangeError)
  })
  it('give a reddening vector that scales with E(B−V)', () => {
    const one = reddeningVector('calzetti00', 4.05, 1)
    const half = reddeningVector('calzetti00', 4.05, 0.5)
    expect(half.nii.dy).toBeCloseTo(one.nii.dy / 2, 14)
    expect(one.nii.dy).toBeGreaterThan(0) // dust raises [O III]/Hβ: 5007 Å is redder than Hβ, less extinguished
  })
})
