import { describe, expect, it } from 'vitest'
import { complexChips, complexWindow, LINE_COMPLEX_VIEWS } from '../../../../../src/lib/spectra/complexes'

const C = 299_792.458
const byId = (id: string) => LINE_COMPLEX_VIEWS.find((c) => c.id === id)!

describe('line-complex windows', () => {
  it('lists the ten complexes blue to red', () => {
    expect(LINE_COMPLEX_VIEWS.map((c) => c.id)).toEqual(['oii', 'hdelta', 'hgamma', 'oiii_4363', 'hbeta', 'nii_5755', 'nad', 'oi', 'halpha', 'sii'])
    const starts = LINE_COMPLEX_VIEWS.map((c) => Math.min(...c.restAngstrom))
    expect([...starts].sort((a, b) => a - b)).toEqual(starts)
  })

  it('puts the Hα + [N II] window at (1 + z) λ_rest widened by ±1500 km/s (Doppler, common practice)', () => {
    // [N II] 6548.05 and 6583.45 Å in air (NIST; shared/science/README.md §0) at z = 0.1
    const w = complexWindow(byId('halpha'), 0.1)
    expect(w.from).toBeCloseTo(6548.05 * 1.1 * (1 - 1500 / C), 6)
    expect(w.to).toBeCloseTo(6583.45 * 1.1 * (1 + 1500 / C), 6)
    expect(w.from).toBeCloseTo(7166.81, 1)
    expect(w.to).toBeCloseTo(7278.03, 1)
  })

  it('opens the Hα window to ±5000 km/s for a broad component, and only that window', () => {
    const w = complexWindow(byId('halpha'), 0, true)
    expect(w.from).toBeCloseTo(6548.05 * (1 - 5000 / C), 6)
    expect(w.to).toBeCloseTo(6583.45 * (1 + 5000 / C), 6)
    expect(complexWindow(byId('sii'), 0, true)).toEqual(complexWindow(byId('sii'), 0, false))
  })

  it('gives Hγ and [O III] 4363 (23 Å apart) windows of their own, each stopping short of the other line', () => {
    // Hγ 4340.47 and [O III] 4363.21 Å (NIST; shared/science/README.md §0)
    const g = complexWindow(byId('hgamma'), 0), o = complexWindow(byId('oiii_4363'), 0)
    expect(g.to).toBeCloseTo(4340.47 * (1 + 1000 / C), 6)
    expect(o.from).toBeCloseTo(4363.21 * (1 - 1000 / C), 6)
    expect(g.to).toBeLessThan(4363.21)
    expect(o.from).toBeGreaterThan(4340.47)
  })

  it('marks the complexes a spectrum covers and clips their windows to it', () => {
    // an SDSS-like coverage 3800–9200 Å at z = 0.05: [O II] 3727 lands at 3913 Å, [S II] 6731 at 7067 Å
    const chips = complexChips(0.05, 3800, 9200)
    expect(chips.every((c) => c.covered)).toBe(true)
    // a red-arm spectrum 5740–7500 Å at z = 0: Hβ is off, Hα is on, [N II] 5755's window is cut at 5740 Å
    const red = complexChips(0, 5740, 7500)
    expect(red.filter((c) => c.covered).map((c) => c.id)).toEqual(['nii_5755', 'nad', 'oi', 'halpha', 'sii'])
    const nii = red.find((c) => c.id === 'nii_5755')!
    expect(nii.window.from).toBe(5740)
    expect(nii.window.to).toBeCloseTo(5754.64 * (1 + 1500 / C), 6)
  })
})
