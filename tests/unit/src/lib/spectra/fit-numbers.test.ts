import { describe, expect, it } from 'vitest'
import type { SpectrumFitResult } from '../../../../../src/api/spectra-types'
import { chi2PerDof, compareLines, compareSummary, detectionCount, fitNumberRows, orderedLineIds, sigmaText } from '../../../../../src/lib/spectra/fit-numbers'
import { lineLabel } from '../../../../../shared/vocabulary/index.ts'

const detected = (flux: number, velocity: number, sigmaIntrinsic: number) => ({
  detected: true as const, flux, error: flux / 20, snr: 20, ew: 12, ewError: 0.5, velocity, velocityError: 3, sigma: sigmaIntrinsic + 10, sigmaError: 4, sigmaIntrinsic,
})

const before: SpectrumFitResult = {
  id: 'LNS-0000001',
  lines: {
    nii_6584: detected(40, 12, 95),
    halpha: detected(120, 10, 90),
    hei_5876: detected(5, 8, 80),
    oi_6300: { detected: false, upperLimit: 3 },
  },
  absorption: {},
  fit: { chi2: 1230, dof: 1000, components: 1, broadHalpha: false },
  measurements: { lines: {}, ew: {}, fwhm: {} },
  flags: [],
}

describe('fitted numbers', () => {
  it('order the lines as the vocabulary does, fit-only lines after, with their labels', () => {
    expect(orderedLineIds(before.lines)).toEqual(['halpha', 'nii_6584', 'oi_6300', 'hei_5876'])
    expect(lineLabel('hei_5876')).toBe('He I 5876')
    expect(lineLabel('nii_6584')).toBe('[N II] 6584')
  })

  it('give a row per line, upper limits as limits', () => {
    const rows = fitNumberRows(before)
    expect(rows.map((r) => r.label)).toEqual(['Hα 6563', '[N II] 6584', '[O I] 6300', 'He I 5876'])
    expect(rows[0]).toMatchObject({ detected: true, flux: 120, fluxError: 6, velocity: 10, sigmaIntrinsic: 90, ew: 12, snr: 20 })
    expect(rows[2]).toMatchObject({ detected: false, upperLimit: 3, flux: null, velocity: null })
  })

  it('list the components of a two-component line under it', () => {
    const two = { lines: { halpha: { ...detected(120, 10, 90), components: [
      { flux: 80, error: 4, velocity: 0, velocityError: 2, sigma: 70, sigmaError: 3, sigmaIntrinsic: 60 },
      { flux: 40, error: 5, velocity: -150, velocityError: 9, sigma: 310, sigmaError: 20, sigmaIntrinsic: 300 },
    ] } } }
    const rows = fitNumberRows(two)
    expect(rows.map((r) => [r.label, r.sub ?? false])).toEqual([['Hα 6563', false], ['component 1', true], ['component 2', true]])
    expect(rows[2]).toMatchObject({ flux: 40, snr: 8, velocity: -150, sigmaIntrinsic: 300 })
  })

  it('give χ²/dof and the detections', () => {
    expect(chi2PerDof(before.fit)).toBeCloseTo(1.23, 12)
    expect(chi2PerDof({ chi2: 5, dof: 0 })).toBeNull()
    expect(chi2PerDof({ chi2: null, dof: 10 })).toBeNull()
    expect(detectionCount(before)).toBe(3)
  })
})

describe('the σ cell', () => {
  it('says "unresolved" for a detected line at zero intrinsic width, not 0.000000 ± 0.000000', () => {
    expect(sigmaText({ detected: true, sigmaIntrinsic: 0, sigmaError: 3.55e-11 })).toBe('unresolved')
    expect(sigmaText({ detected: true, sigmaIntrinsic: 71.6, sigmaError: 2.4 })).toBe('71.6 ± 2.4')
  })
})

describe('refit comparison', () => {
  const after: SpectrumFitResult = {
    ...before,
    lines: { ...before.lines, halpha: detected(150, 4, 120), oi_6300: detected(6, 12, 100), oiii_5007: detected(30, 5, 90) },
    fit: { chi2: 1010, dof: 996, components: 1, broadHalpha: true },
  }

  it('gives the relative flux change and the velocity and σ differences per line', () => {
    const rows = compareLines(before, after)
    expect(rows.map((r) => r.id)).toEqual(['halpha', 'oiii_5007', 'nii_6584', 'oi_6300', 'hei_5876'])
    const ha = rows[0]
    expect(ha.flux).toEqual({ before: 120, after: 150, difference: 0.25 })
    expect(ha.velocity).toEqual({ before: 10, after: 4, difference: -6 })
    expect(ha.sigma).toEqual({ before: 90, after: 120, difference: 30 })
    const oiii = rows[1]
    expect(oiii.detected).toEqual([null, true])
    expect(oiii.flux).toEqual({ before: null, after: 30, difference: null })
    expect(rows[3].detected).toEqual([false, true])
  })

  it('sums up the fit: χ²/dof, components, broad Hα, detections', () => {
    const s = compareSummary(before, after)
    expect(s.chi2dof.before).toBeCloseTo(1.23, 12)
    expect(s.chi2dof.after).toBeCloseTo(1010 / 996, 12)
    expect(s.broadHalpha).toEqual([false, true])
    expect(s.detections).toEqual({ before: 3, after: 5, difference: 2 })
  })
})
