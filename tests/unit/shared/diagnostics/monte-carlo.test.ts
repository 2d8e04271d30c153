import { describe, expect, it } from 'vitest'
import { diagnoseGalaxy, diagnoseMany } from '../../../../shared/diagnostics/pipeline.ts'
import { fluxesAt, galaxy, settingsWith } from './helpers.ts'

const mc = (draws: number, seed = 1) => settingsWith({ monteCarlo: { draws, seed } })
const halfWidth = (p: { p16: number; p84: number } | undefined) => ((p as { p84: number }).p84 - (p as { p16: number }).p16) / 2

describe('Monte Carlo (shared/science/README.md §9)', () => {
  const f = { ...fluxesAt(-0.7, -0.2, -0.5, -1.6, 4.2), oiii_4959: 21, oiii_4363: 1.8, hgamma: 40 }
  it('is reproducible with a seed and independent of the batch position', () => {
    const g = galaxy('LNS-0000042', f, 15, { redshift: 0.05, ew: { halpha: 30 } })
    const a = diagnoseGalaxy(g, mc(300, 5))
    const b = diagnoseGalaxy(g, mc(300, 5))
    expect(b).toEqual(a)
    const inBatch = diagnoseMany([galaxy('other', f, 5), g], mc(300, 5))[1]
    expect(inBatch).toEqual(a)
    const c = diagnoseGalaxy(g, mc(300, 6))
    expect(c.extinction.ebvPercentiles).not.toEqual(a.extinction.ebvPercentiles)
  })
  it('adds percentiles to every measured number and class probabilities summing to 1', () => {
    const r = diagnoseGalaxy(galaxy('p', f, 15, { redshift: 0.05, ew: { halpha: 30 } }), mc(200))
    expect(r.extinction.ebvPercentiles).toBeDefined()
    expect(r.ratios.niiHaPercentiles).toBeDefined()
    expect((r.dereddened.halpha as { fluxPercentiles?: unknown }).fluxPercentiles).toBeDefined()
    expect(r.metallicity.n2Pp04Percentiles).toBeDefined()
    expect(r.sfr.sfrHalphaPercentiles).toBeDefined()
    expect(r.distances.nii?.ka03Percentiles).toBeDefined()
    expect(r.temperature.oiii?.tePercentiles).toBeDefined()
    expect(r.extinction).not.toHaveProperty('ebvErrorPercentiles')
    for (const d of ['nii', 'sii', 'oi', 'whan', 'overall'] as const) {
      const p = r.classes.classProbabilities![d] as Record<string, number>
      expect(Object.values(p).reduce((s, v) => s + v, 0)).toBeCloseTo(1, 12)
    }
  })
  it('percentile half-widths match the analytic σ within a few per cent at S/N = 100', () => {
    // common practice (shared/science/README.md §9): for S/N ≳ 20 the MC 16–84% half-width matches the first-order σ;
    // 4000 draws give a sampling error of the width of ≈ 1/√(2N) ≈ 1.1%, hence the 5% tolerance
    const r = diagnoseGalaxy(galaxy('hs', f, 100, { redshift: 0.05 }), mc(4000, 3))
    const pairs: Array<[number | undefined, number | null]> = [
      [halfWidth(r.extinction.ebvPercentiles), r.extinction.ebvError],
      [halfWidth(r.ratios.niiHaPercentiles), r.ratioErrors.niiHa],
      [halfWidth(r.ratios.siiHaPercentiles), r.ratioErrors.siiHa],
      [halfWidth((r.dereddened.oiii_5007 as { fluxPercentiles: { p16: number; p84: number } }).fluxPercentiles), (r.dereddened.oiii_5007 as { error: number }).error],
      [halfWidth((r.dereddened.halpha as { fluxPercentiles: { p16: number; p84: number } }).fluxPercentiles), (r.dereddened.halpha as { error: number }).error],
      [halfWidth(r.metallicity.o3n2Pp04Percentiles), r.metallicity.o3n2Pp04Error],
      [halfWidth(r.sfr.luminosityHalphaPercentiles), r.sfr.luminosityHalphaError],
      [halfWidth(r.density.sii?.nePercentiles), r.density.sii?.neError ?? null],
      [halfWidth(r.distances.nii?.ka03Percentiles), r.distances.nii?.ka03Error ?? null],
    ]
    for (const [mcWidth, analytic] of pairs) expect((mcWidth as number) / (analytic as number)).toBeCloseTo(1, 1)
    for (const [mcWidth, analytic] of pairs) expect(Math.abs((mcWidth as number) / (analytic as number) - 1)).toBeLessThan(0.05)
  })
  it('gives mixed class probabilities near a boundary', () => {
    // a point 0.01 dex below Ka03 at x = −0.4 (Ka03 = −0.0556, shared/science/README.md §2.2) with σ ≈ 0.02 dex
    const r = diagnoseGalaxy(galaxy('edge', fluxesAt(-0.4, -0.0656, -0.6, -1.8), 30), mc(2000, 9))
    const p = r.classes.classProbabilities!.nii
    expect(p['star-forming']).toBeGreaterThan(0.4)
    expect(p['star-forming']).toBeLessThan(0.9)
    expect(p.composite).toBeGreaterThan(0.1)
  })
  it('counts non-positive draws as unclassified instead of dropping them', () => {
    // shared/science/README.md §9: with S/N = 1, P(draw ≤ 0) = Φ(−1) = 0.159; √(p(1−p)/N) = 0.008 for N = 2000
    const g = galaxy('low', fluxesAt(-0.6, -0.3, -0.6, -1.8), 50)
    g.lines.nii_6584 = { flux: 30, error: 30 }
    const r = diagnoseGalaxy(g, settingsWith({ minSnr: 0.5, monteCarlo: { draws: 2000, seed: 4 } }))
    expect(Math.abs(r.classes.classProbabilities!.nii.unclassified - 0.159)).toBeLessThan(0.03)
  })
})
