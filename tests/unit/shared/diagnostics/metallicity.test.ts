import { describe, expect, it } from 'vitest'
import {
  D16_NII_HA_WEIGHT, METALLICITY_CALIBRATIONS, n2Index, n2M13, n2Pp04, n2Pp04Cubic, n2s2haD16, n2s2haIndex, o3n2Index, o3n2M13, o3n2Pp04,
} from '../../../../shared/diagnostics/metallicity.ts'

const cal = (key: string) => METALLICITY_CALIBRATIONS.find((c) => c.key === key)!

describe('strong-line metallicities (shared/science/README.md §5 check values, 3 d.p. → ±0.0006)', () => {
  it('N2: Pettini & Pagel 2004 linear and cubic, Marino et al. 2013', () => {
    // Pettini & Pagel 2004, MNRAS 348, L59; Marino et al. 2013, A&A 559, A114, eq. 4
    const n2 = [-1.5, -1.0, -0.5, -0.35]
    const pp = [8.045, 8.33, 8.615, 8.7]
    const cubic = [8.08, 8.28, 8.63, 8.8]
    const m13 = [8.05, 8.281, 8.512, 8.581]
    n2.forEach((x, j) => {
      expect(Math.abs(n2Pp04(x) - pp[j])).toBeLessThan(6e-4)
      expect(Math.abs(n2Pp04Cubic(x) - cubic[j])).toBeLessThan(6e-4)
      expect(Math.abs(n2M13(x) - m13[j])).toBeLessThan(6e-4)
    })
  })
  it('O3N2: Pettini & Pagel 2004 and Marino et al. 2013', () => {
    // Marino et al. 2013, eq. 2
    const idx = [-0.5, 0, 1.0, 1.8]
    const pp = [8.89, 8.73, 8.41, 8.154]
    const m13 = [8.64, 8.533, 8.319, 8.148]
    idx.forEach((x, j) => {
      expect(Math.abs(o3n2Pp04(x) - pp[j])).toBeLessThan(6e-4)
      expect(Math.abs(o3n2M13(x) - m13[j])).toBeLessThan(6e-4)
    })
  })
  it('N2S2Hα: Dopita et al. 2016, flagged beyond 9.05', () => {
    // Dopita et al. 2016, Ap&SS 361, 61; near-linear up to 9.05 
    const y = [-1.0, -0.5, 0.0, 0.3]
    const z = [7.694, 8.27, 8.771, 9.105]
    y.forEach((v, j) => expect(Math.abs(n2s2haD16(v) - z[j])).toBeLessThan(6e-4))
    expect(cal('n2s2haD16').inRange(0.0)).toBe(true)
    expect(cal('n2s2haD16').inRange(0.3)).toBe(false)
  })
  it('have the published index ranges (open intervals)', () => {
    // shared/science/README.md §5 table
    expect(cal('n2Pp04').inRange(-0.3)).toBe(false)
    expect(cal('n2Pp04').inRange(-0.31)).toBe(true)
    expect(cal('n2Pp04Cubic').inRange(-2.5)).toBe(false)
    expect(cal('o3n2Pp04').inRange(1.9)).toBe(false)
    expect(cal('o3n2Pp04').inRange(-0.99)).toBe(true)
    expect(cal('n2M13').inRange(-0.25)).toBe(true)
    expect(cal('n2M13').inRange(-1.6)).toBe(false)
    expect(cal('o3n2M13').inRange(1.7)).toBe(false)
  })
  it('slopes are the derivatives of the formulas', () => {
    for (const c of METALLICITY_CALIBRATIONS) {
      const x = -0.7
      expect(c.slope(x), c.key).toBeCloseTo((c.value(x + 1e-6) - c.value(x - 1e-6)) / 2e-6, 6)
    }
  })
})

describe('strong-line indices (shared/science/README.md §5)', () => {
  it('are the logarithms the calibrations are written in', () => {
    // N2, O3N2: Pettini & Pagel 2004, MNRAS 348, L59; y: Dopita et al. 2016, Ap&SS 361, 61 with weight 0.264 (§5 table)
    expect(n2Index(10, 100)).toBe(-1)
    expect(o3n2Index(300, 100, 10, 100)).toBeCloseTo(Math.log10(30), 14)
    expect(D16_NII_HA_WEIGHT).toBe(0.264)
    expect(n2s2haIndex(30, 30, 100)).toBeCloseTo(0.264 * Math.log10(0.3), 14)
    // §5 check: D16 y = 0 → 8.771, reached with [N II]/[S II] = 10^0.264 at N2 = −1
    expect(n2s2haD16(n2s2haIndex(10, 10 / 10 ** 0.264, 100))).toBeCloseTo(8.771, 3)
  })
})
