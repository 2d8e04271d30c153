import { describe, expect, it } from 'vitest'
import { mergeGalaxy, type StoredGalaxy } from '../../../shared/galaxy-merge.ts'

// `onExisting: merge` of an intake: a bookkeeping rule of this repository (no published source).
const stored: StoredGalaxy = {
  key: 'M-1', redshift: 0.05, ra: 150.1, dec: 2.2, fluxUnit: 1e-17,
  input: { lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, oi_6300: { upperLimit: 9 } }, ew: { halpha: 24.5 } },
}

describe('mergeGalaxy', () => {
  it('keeps stored lines, lays the new ones over them, keeps what is not given', () => {
    const m = mergeGalaxy(stored, { id: 'M-1', fluxUnit: 1e-17, lines: { hbeta: { flux: 82, error: 2 }, oiii_5007: { flux: 50, error: 3 } }, fwhm: { halpha: 210 } })
    expect(m).toEqual({
      id: 'M-1', redshift: 0.05, ra: 150.1, dec: 2.2, fluxUnit: 1e-17,
      lines: { halpha: { flux: 300, error: 6 }, hbeta: { flux: 82, error: 2 }, oi_6300: { upperLimit: 9 }, oiii_5007: { flux: 50, error: 3 } },
      ew: { halpha: 24.5 }, fwhm: { halpha: 210 },
    })
  })

  it('a redshift given anew wins; an absent flux unit keeps the stored one', () => {
    const m = mergeGalaxy(stored, { id: 'M-1', redshift: 0.07, lines: {} })
    expect(m.redshift).toBe(0.07)
    expect(m.fluxUnit).toBe(1e-17)
    expect(m.lines.halpha).toEqual({ flux: 300, error: 6 })
  })

  it('in another flux unit, kept lines are rescaled so their physical fluxes stay the same', () => {
    const m = mergeGalaxy(stored, { id: 'M-1', fluxUnit: 1e-16, lines: { oiii_5007: { flux: 5, error: 0.3 } } })
    expect(m.fluxUnit).toBe(1e-16)
    expect(m.lines.oiii_5007).toEqual({ flux: 5, error: 0.3 })
    // 300 × 1e-17 = 30 × 1e-16 erg s⁻¹ cm⁻²
    expect(m.lines.halpha!.flux!).toBeCloseTo(30, 12)
    expect(m.lines.halpha!.error!).toBeCloseTo(0.6, 12)
    expect(m.lines.oi_6300!.upperLimit!).toBeCloseTo(0.9, 12)
    expect(m.ew).toEqual({ halpha: 24.5 }) // Å: no flux unit
  })
})
