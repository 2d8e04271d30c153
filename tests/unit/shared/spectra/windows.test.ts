import { describe, expect, it } from 'vitest'
import { isCovered, prepareSpectrum, setupFit, sidebandContinuum, syntheticSpectrum } from '../../../../shared/spectra/index.ts'

/** Windows, coverage and side-band continua (project choices, shared/science/README.md §13.5). */
describe('coverage (README §13.5)', () => {
  const lo = Array.from({ length: 200 }, (_, i) => 6500 + i)
  const hi = lo.map((x) => x + 1)
  it('good pixels must span ±1000 km/s with both ends inside the spectrum', () => {
    const good = lo.map(() => 1)
    expect(isCovered(lo, hi, good, 6600, 1000)).toBe(true) // ±22 Å
    expect(isCovered(lo, hi, good, 6515, 1000)).toBe(false) // blue end outside
    expect(isCovered(lo, hi, good, 6600, 3000)).toBe(true) // ±66 Å
    expect(isCovered(lo, hi, good, 6600, 5000)).toBe(false)
  })
  it('and fill at least 80 % of the interval', () => {
    const holes = lo.map((x) => (x >= 6590 && x < 6598 ? 0 : 1)) // 8 of 44 Å bad: 82 % good
    expect(isCovered(lo, hi, holes, 6600, 1000)).toBe(true)
    const more = lo.map((x) => (x >= 6588 && x < 6598 ? 0 : 1)) // 10 of 44 Å bad: 77 % good
    expect(isCovered(lo, hi, more, 6600, 1000)).toBe(false)
  })
})

describe('side-band continuum with clipping (README §13.5)', () => {
  it('a straight line is recovered exactly; a cosmic ray is clipped and marked as an outlier', () => {
    const lam = Array.from({ length: 40 }, (_, i) => 6000 + i)
    const y = lam.map((x) => 10 + 0.05 * (x - 6020))
    y[5] += 50
    const c = sidebandContinuum(lam, y, lam.map(() => 0.1), lam.map(() => 1), 6020, 20)
    expect(c.c0).toBeCloseTo(10, 10)
    expect(c.c1).toBeCloseTo(0.05 * 20, 10)
    expect(c.outlier[5]).toBe(1)
    expect(c.used).toBe(39)
  })
})

describe('windows of a wide spectrum (README §13.5)', () => {
  const s = syntheticSpectrum({ seed: 1, redshift: 0.05, wavelength: { start: 3800, end: 7400, step: 1 }, continuum: { level: 10 }, noise: 0.3, lines: [] })
  const spec = prepareSpectrum(s.spectrum)
  it('do not overlap, with or without the broad-Hα window and Na I D', () => {
    for (const [broad, nad] of [[false, false], [true, true], [true, false], [false, true]]) {
      const setup = setupFit(spec, s.spectrum, broad, nad, 2)
      const spans = setup.pixels.windows.map((w) => [setup.pixels.lambda[w.start], setup.pixels.lambda[w.end - 1]])
      for (let i = 1; i < spans.length; i++) expect(spans[i][0]).toBeGreaterThan(spans[i - 1][1])
      expect(setup.pixels.windows.some((w) => w.absorption.length > 0)).toBe(nad)
      expect(setup.broadAllowed).toBe(broad)
    }
  })
  it('ties [O III] 4959 and [N II] 6548 to their covered parents at 2.98 and 3.05 (README §4, §13.6)', () => {
    const setup = setupFit(spec, s.spectrum, false, false, 1)
    const lines = setup.pixels.windows.flatMap((w) => w.lines)
    expect(lines.find((l) => l.id === 'oiii_4959')).toMatchObject({ parent: 'oiii_5007', ratio: 2.98 })
    expect(lines.find((l) => l.id === 'nii_6548')).toMatchObject({ parent: 'nii_6584', ratio: 3.05 })
    expect(lines.find((l) => l.id === 'halpha')?.expectedAngstrom).toBeCloseTo(6562.8 * 1.05, 9)
  })
})
