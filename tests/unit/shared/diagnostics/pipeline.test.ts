import { describe, expect, it } from 'vitest'
import { diagnoseGalaxy, diagnoseMany } from '../../../../shared/diagnostics/pipeline.ts'
import { DEFAULT_SETTINGS, METHOD_VERSION, ScienceSettingsError } from '../../../../shared/diagnostics/settings.ts'
import { extinctionK } from '../../../../shared/extinction/index.ts'
import { ScienceInputError } from '../../../../shared/flags.ts'
import { blackHoleMassGreeneHo05 } from '../../../../shared/diagnostics/black-hole.ts'
import { lineLuminosity, luminosityDistanceMpc } from '../../../../shared/diagnostics/luminosity.ts'
import { assertAllFinite } from '../../../../shared/stats/finite.ts'
import { fluxesAt, galaxy, settingsWith } from './helpers.ts'
import type { GalaxyInput } from '../../../../shared/diagnostics/types.ts'

const S = DEFAULT_SETTINGS
const run = (g: GalaxyInput, s = S) => {
  const r = diagnoseGalaxy(g, s)
  assertAllFinite(r)
  return r
}
const throwsAt = (fn: () => unknown, path: string) => {
  try {
    fn()
  } catch (e) {
    expect(e).toBeInstanceOf(ScienceInputError)
    expect((e as ScienceInputError).path).toBe(path)
    return
  }
  throw new Error(`expected a ScienceInputError at ${path}`)
}

describe('public entry point basics', () => {
  it('has the documented defaults and a method version', () => {
    // settings defaults of the public API (shared/science/README.md §10)
    expect(S).toMatchObject({ extinctionLaw: 'ccm89', rv: 3.1, intrinsicBalmer: 2.86, electronTemperature: 10000, minSnr: 3,
      allowNegative: false, sfrCalibration: 'kennicutt98', cosmology: { h0: 70, omegaM: 0.3 }, monteCarlo: { draws: 0, seed: 1 } })
    expect(METHOD_VERSION).toMatch(/^\d{4}\.\d+\.\d+$/)
  })
  it('diagnoseMany gives the same result as diagnoseGalaxy for each galaxy', () => {
    const gs = [galaxy('a', fluxesAt(-0.5, -0.3, -0.5, -1.6, 4)), galaxy('b', fluxesAt(0.1, 0.8, 0.0, -0.6, 5), 10)]
    expect(diagnoseMany(gs, S)).toEqual(gs.map((g) => diagnoseGalaxy(g, S)))
  })
})

describe('dust', () => {
  it('gives the shared/science/README.md §1.2 E(B−V) and A_V through the pipeline', () => {
    // python3-extinction 0.4.6, via shared/science/README.md §1.2: ccm89 Hα/Hβ = 4 → 0.3392, 1.0515; calzetti00 → 0.2864, 1.1598
    const g = galaxy('d', { halpha: 400, hbeta: 100 })
    const r = run(g)
    expect(r.extinction.ebv as number).toBeCloseTo(0.3392, 4)
    expect(r.extinction.av as number).toBeCloseTo(1.0515, 4)
    expect(r.extinction.source).toBe('halpha-hbeta')
    const c = run(g, settingsWith({ extinctionLaw: 'calzetti00', rv: 4.05 }))
    expect(c.extinction.ebv as number).toBeCloseTo(0.2864, 4)
    expect(c.extinction.av as number).toBeCloseTo(1.1598, 4)
  })
  it('gives E(B−V) errors by shared/science/README.md §9 and A_λ = k E(B−V)', () => {
    // σ_E = 2.5/(k_Hβ − k_Hα)/ln10 · √((σα/Fα)² + (σβ/Fβ)²) (shared/science/README.md §9)
    const r = run(galaxy('d', { halpha: 400, hbeta: 100 }, 20))
    const kHa = extinctionK('ccm89', 6562.8, 3.1)
    const kHb = extinctionK('ccm89', 4861.33, 3.1)
    const sigma = (2.5 / (kHb - kHa) / Math.LN10) * Math.sqrt(2 * 0.05 ** 2)
    expect(r.extinction.ebvError as number).toBeCloseTo(sigma, 12)
    expect(r.extinction.avError as number).toBeCloseTo(3.1 * sigma, 12)
    const ha = r.dereddened.halpha as { flux: number; error: number; aLambda: number }
    expect(ha.aLambda).toBeCloseTo(kHa * (r.extinction.ebv as number), 12)
    // Hα with its covariance: (σ/F)² = (k_Hβ/Δk)²(σα/Fα)² + (k_Hα/Δk)²(σβ/Fβ)² (shared/science/README.md §9)
    const dk = kHb - kHa
    expect(ha.error / ha.flux).toBeCloseTo(Math.sqrt((kHb / dk) ** 2 * 0.0025 + (kHa / dk) ** 2 * 0.0025), 12)
  })
  it('clips a decrement below intrinsic: ebv 0, balmer-below-intrinsic, ebvError of the raw estimate, no correction', () => {
    // public API (openapi/openapi.json); shared/science/README.md §1.2
    const r = run(galaxy('b', { halpha: 250, hbeta: 100, oiii_5007: 50 }, 20))
    expect(r.extinction).toMatchObject({ ebv: 0, av: 0, source: 'halpha-hbeta' })
    expect(r.extinction.flags).toContain('balmer-below-intrinsic')
    expect(r.extinction.ebvError as number).toBeGreaterThan(0)
    expect((r.dereddened.oiii_5007 as { flux: number }).flux).toBe(50)
    expect(r.flags).toContain('balmer-below-intrinsic')
  })
  it('falls back to Hγ/Hβ when Hα is missing (balmer-from-hgamma)', () => {
    // shared/science/README.md §1.2 fallback (project convention), intrinsic Hγ/Hβ = 0.468
    const kHg = extinctionK('ccm89', 4340.47, 3.1)
    const kHb = extinctionK('ccm89', 4861.33, 3.1)
    const hg = 100 * 0.468 * Math.pow(10, -0.4 * (kHg - kHb) * 0.3)
    const r = run(galaxy('g', { hbeta: 100, hgamma: hg }))
    expect(r.extinction.source).toBe('hgamma-hbeta')
    expect(r.extinction.ebv as number).toBeCloseTo(0.3, 12)
    expect(r.flags).toContain('balmer-from-hgamma')
  })
  it('without a decrement: ebv null, no-balmer-decrement, observed fluxes with aLambda null, sfr-not-dereddened', () => {
    // shared/science/README.md §1.2, §6
    const r = run(galaxy('n', { halpha: 400, nii_6584: 100 }, 20, { redshift: 0.05 }))
    expect(r.extinction.ebv).toBeNull()
    expect(r.extinction.source).toBeNull()
    expect(r.flags).toContain('no-balmer-decrement')
    expect(r.dereddened.halpha).toMatchObject({ flux: 400, aLambda: null })
    expect(r.sfr.flags).toContain('sfr-not-dereddened')
  })
})

describe('detections and limits (shared/science/README.md §9)', () => {
  it('turns a line below minSnr into an upper limit U = minSnr·σ with below-min-snr:<line>', () => {
    const g = galaxy('l', fluxesAt(-0.5, -0.3, -0.5, -1.6))
    g.lines.oiii_5007 = { flux: 10, error: 5 }
    const r = run(g)
    expect(r.flags).toContain('below-min-snr:oiii_5007')
    expect(r.dereddened.oiii_5007).toEqual({ upperLimit: 15 }) // decrement 2.86 → no correction
    expect(r.ratioLimits).toEqual({ oiiiHb: 'upper' })
    expect(r.flags).toContain('ratio-limit:oiiiHb:upper')
    expect(r.ratios.oiiiHb as number).toBeCloseTo(Math.log10(15 / 100), 12)
    expect(r.ratioErrors.oiiiHb).toBeNull()
  })
  it('[N II] undetected, point below Ka03 → star-forming', () => {
    // shared/science/README.md §9 example 1
    const g = galaxy('e1', fluxesAt(-0.8, -0.2, -0.5, -1.6))
    g.lines.nii_6584 = { upperLimit: 286 * Math.pow(10, -0.8) }
    const r = run(g)
    expect(r.ratioLimits.niiHa).toBe('upper')
    expect(r.classes.nii).toBe('star-forming')
    expect(r.distances.nii).toBeNull() // no exact point
  })
  it('Hβ undetected, limit point above Ke01 → agn', () => {
    // shared/science/README.md §9 example 2
    const g = galaxy('e2', fluxesAt(0.0, 0.6, 0.0, -0.5))
    g.lines.hbeta = { upperLimit: 100 }
    const r = run(g)
    expect(r.ratioLimits.oiiiHb).toBe('lower')
    expect(r.classes.nii).toBe('agn')
    expect(r.extinction.ebv).toBeNull()
  })
  it('[O III] upper limit with the point between Ka03 and Ke01 → unclassified, limit-not-decisive:nii', () => {
    // shared/science/README.md §9 example 3
    const g = galaxy('e3', fluxesAt(-0.3, 0.0, -0.5, -1.6))
    g.lines.oiii_5007 = { upperLimit: 100 }
    const r = run(g)
    expect(r.classes.nii).toBe('unclassified')
    expect(r.flags).toContain('limit-not-decisive:nii')
  })
  it('limits in numerator and denominator give no ratio', () => {
    const g = galaxy('e4', { nii_6584: 10 })
    g.lines.nii_6584 = { upperLimit: 10 }
    g.lines.halpha = { upperLimit: 10 }
    const r = run(g)
    expect(r.ratios.niiHa).toBeNull()
    expect(r.classes.nii).toBe('unclassified')
    expect(r.flags).toContain('missing-line:nii')
  })
  it('allowNegative: a negative flux becomes an upper limit instead of an error', () => {
    const g = galaxy('neg', fluxesAt(-0.5, -0.3, -0.5, -1.6))
    g.lines.oi_6300 = { flux: -4, error: 2 }
    throwsAt(() => diagnoseGalaxy(g, S), '/lines/oi_6300/flux')
    const r = run(g, settingsWith({ allowNegative: true }))
    expect(r.dereddened.oi_6300).toEqual({ upperLimit: 6 })
    expect(r.flags).toContain('below-min-snr:oi_6300')
  })
})

describe('classes and their flags', () => {
  it('classifies a star-forming, a Seyfert and a LINER nucleus on all diagrams', () => {
    expect(run(galaxy('sf', fluxesAt(-0.6, -0.3, -0.6, -1.8))).classes).toMatchObject(
      { nii: 'star-forming', sii: 'star-forming', oi: 'star-forming', overall: 'star-forming', niiSubtype: null })
    expect(run(galaxy('sy', fluxesAt(0.0, 0.9, -0.1, -0.8))).classes).toMatchObject(
      { nii: 'agn', sii: 'seyfert', oi: 'seyfert', overall: 'seyfert', niiSubtype: 'seyfert' })
    expect(run(galaxy('li', fluxesAt(0.2, 0.2, 0.1, -0.3))).classes).toMatchObject(
      { nii: 'agn', sii: 'liner', oi: 'liner', overall: 'liner', niiSubtype: 'liner' })
    expect(run(galaxy('co', fluxesAt(-0.3, 0.0, -0.6, -1.8))).classes.overall).toBe('composite')
    expect(run(galaxy('am', fluxesAt(-0.6, -0.3, 0.0, -1.8))).classes.overall).toBe('ambiguous')
  })
  it('handles the Ka03 asymptote trap at x = 0.10 in the pipeline', () => {
    // shared/science/README.md §2.2: never star-forming right of x = 0.05
    const r = run(galaxy('as', fluxesAt(0.1, -1.0, -0.6, -1.8)))
    expect(r.classes.nii).toBe('composite')
    expect(r.flags).toContain('beyond-asymptote:nii-ka03')
    expect(r.distances.nii?.ka03 as number).toBeGreaterThan(0)
  })
  it('flags the curve-crossing region (Ka03 above Ke01 for x < −1.2805) and keeps it star-forming', () => {
    // shared/science/README.md §2.2: at x = −1.5, Ke01 = 0.8804 < y = 0.89 < Ka03 = 0.9065
    const r = run(galaxy('cc', fluxesAt(-1.5, 0.89, -0.6, -1.8)))
    expect(r.classes.nii).toBe('star-forming')
    expect(r.flags).toContain('curve-crossing-region')
  })
  it('names why a diagram is unclassified and applies the missing-diagram conventions', () => {
    // shared/science/README.md §2.4 (project convention)
    const f = fluxesAt(-0.6, -0.3, -0.6, -1.8)
    delete f.oi_6300
    const noOi = run(galaxy('x1', f))
    expect(noOi.classes.oi).toBe('unclassified')
    expect(noOi.flags).toEqual(expect.arrayContaining(['missing-line:oi', 'overall-without-oi']))
    expect(noOi.classes.overall).toBe('star-forming')
    delete f.sii_6717
    delete f.sii_6731
    const niiOnly = run(galaxy('x2', f))
    expect(niiOnly.flags).toEqual(expect.arrayContaining(['missing-line:sii', 'overall-from-nii-only']))
    const agnOnly = run(galaxy('x3', { halpha: 286, hbeta: 100, nii_6584: 286, oiii_5007: 800 }))
    expect(agnOnly.classes.overall).toBe('seyfert') // S07 subtype (Schawinski et al. 2007)
    const noNii = run(galaxy('x4', { halpha: 286, hbeta: 100, oiii_5007: 50 }))
    expect(noNii.classes.overall).toBe('unclassified')
    expect(noNii.flags).toEqual(expect.arrayContaining(['missing-line:nii', 'overall-needs-nii', 'whan-needs-ew-halpha']))
  })
  it('gives WHAN classes when EW(Hα) is given', () => {
    // Cid Fernandes et al. 2011; shared/science/README.md §2.5 checks
    const f = fluxesAt(-0.395, 0.2, -0.5, -1.5)
    expect(run(galaxy('w1', f, 50, { ew: { halpha: 6.05 } })).classes.whan).toBe('strong-agn')
    expect(run(galaxy('w2', fluxesAt(-0.55, 0, -0.5, -1.5), 50, { ew: { halpha: 42 } })).classes.whan).toBe('star-forming')
    expect(run(galaxy('w3', f, 50, { ew: { halpha: 0.3, nii_6584: 0.2 } })).classes.whan).toBe('passive')
    const r = run(galaxy('w4', f, 50, { ew: { halpha: 0.3 } }))
    expect(r.classes.whan).toBe('retired')
    expect(r.flags).toContain('whan-passive-needs-ew-nii')
  })
  it('gives distances with first-order errors and the nearest curve', () => {
    // shared/science/README.md §2.6: (0.60, 0.00) → Ke01 +0.6027, Ka03 +0.9761, S07 −0.7448
    const r = run(galaxy('dd', fluxesAt(0.6, 0.0, 0.0, -0.5)))
    const d = r.distances.nii!
    expect(d.ke01).toBeCloseTo(0.6027, 4)
    expect(d.ka03).toBeCloseTo(0.9761, 4)
    expect(d.s07).toBeCloseTo(-0.7448, 4)
    expect(d.nearest).toBe('ke01')
    expect(d.nearestDistance).toBe(d.ke01)
    expect(d.ke01Error).toBeGreaterThan(0)
    expect(r.distances.sii?.nearest).toBe('ke01')
  })
})

describe('density, temperature, metallicity, SFR, black hole through the pipeline', () => {
  it('density with limit flags and ne null (shared/science/README.md §3)', () => {
    const g = galaxy('dn', { sii_6717: 120, sii_6731: 100, oii_3729: 146, oii_3726: 100 })
    const r = run(g)
    expect(r.density.sii?.ne as number).toBeCloseTo(203.8, 1) // Sanders et al. 2016 via shared/science/README.md §3
    expect(r.density.oii?.flag).toBe('low-density-limit') // 1.46 ≥ R(1) = 1.4561
    expect(r.density.oii?.ne).toBeNull()
    expect(r.flags).toContain('low-density-limit:oii')
    const hi = run(galaxy('dh', { sii_6717: 42, sii_6731: 100 }))
    expect(hi.density.sii).toMatchObject({ ne: null, flag: 'high-density-limit' })
  })
  it('[O III] temperature from dereddened fluxes, n_e assumed without [S II]', () => {
    // shared/science/README.md §4: ratio 211.96 at n_e = 100 → 10 000 K
    const g = galaxy('t1', { halpha: 286, hbeta: 100, oiii_5007: 300, oiii_4959: 100.67, oiii_4363: 400.67 / 211.96 })
    const r = run(g)
    expect(r.temperature.oiii?.te as number).toBeCloseTo(10000, -1)
    expect(r.temperature.oiii?.neUsed).toBe(100)
    expect(r.temperature.oiii?.flags).toContain('te-density-assumed')
    expect(r.temperature.oiii?.teError as number).toBeGreaterThan(0)
    expect(r.temperature.nii).toBeNull()
  })
  it('temperature flags: out of range, upper limit, fixed doublet ratio', () => {
    const out = run(galaxy('t2', { oiii_5007: 300, oiii_4959: 100, oiii_4363: 30 }))
    expect(out.temperature.oiii).toMatchObject({ te: null })
    expect(out.flags).toContain('te-out-of-range:oiii')
    const lim = galaxy('t3', { oiii_5007: 300, oiii_4959: 100 })
    lim.lines.oiii_4363 = { upperLimit: 1 }
    expect(run(lim).flags).toContain('te-upper-limit:oiii')
    const fixed = run(galaxy('t4', { nii_6584: 300, nii_5755: 400 / 99.82 }))
    expect(fixed.temperature.nii?.flags).toContain('te-from-fixed-doublet-ratio')
    expect(fixed.temperature.nii?.te as number).toBeCloseTo(10000, -2) // shared/science/README.md §4: 6584/6548 ≈ 3.05 → ratio ≈ 99.8
  })
  it('metallicity for star-forming nuclei only, with range flags', () => {
    // shared/science/README.md §5: N2 = −1.0 → PP04 8.330, cubic 8.280, M13 8.281
    const sf = run(galaxy('m1', fluxesAt(-1.0, -0.2, -0.6, -1.8, 2.8))) // below Case B: E(B−V) clipped to 0, no dust term
    expect(sf.metallicity.n2Pp04 as number).toBeCloseTo(8.33, 3)
    expect(sf.metallicity.n2Pp04Cubic as number).toBeCloseTo(8.28, 3)
    expect(sf.metallicity.n2M13 as number).toBeCloseTo(8.281, 3)
    // O3N2 = −0.2 − (−1.0) = 0.8 → PP04 8.474 = 8.73 − 0.32·0.8
    expect(sf.metallicity.o3n2Pp04 as number).toBeCloseTo(8.474, 3)
    expect(sf.metallicity.n2Pp04Error as number).toBeCloseTo(0.57 * Math.sqrt(2) * 0.02 / Math.LN10, 6)
    const edge = run(galaxy('m2', fluxesAt(-0.25, -1.0, -0.6, -1.8)))
    expect(edge.classes.overall).toBe('star-forming')
    expect(edge.metallicity.n2Pp04).toBeNull()
    expect(edge.metallicity.flags).toContain('n2Pp04-out-of-range')
    expect(edge.metallicity.n2M13 as number).toBeCloseTo(8.743 - 0.462 * 0.25, 6)
    const agn = run(galaxy('m3', fluxesAt(0.0, 0.9, -0.1, -0.8)))
    expect(agn.metallicity.n2Pp04).toBeNull()
    expect(agn.metallicity.flags).toEqual(['metallicity-not-star-forming'])
  })
  it('SFR from dereddened Hα (shared/science/README.md §6 checks) and its flags', () => {
    // F_corr(Hα) = 1e-14 at z = 0.05 → L = 5.912e40, SFR_K98 = 0.467, SFR_KE12 = 0.318 (shared/science/README.md §6)
    const f = fluxesAt(-0.6, -0.3, -0.6, -1.8)
    const scale = 1000 / (f.halpha as number)
    for (const k of Object.keys(f) as Array<keyof typeof f>) f[k] = (f[k] as number) * scale
    const g = galaxy('s1', f, 50, { redshift: 0.05, fluxUnit: 1e-17 })
    const r = run(g)
    expect(r.sfr.luminosityDistanceMpc as number).toBeCloseTo(222.2891, 4)
    expect((r.sfr.luminosityHalpha as number) / 5.912e40).toBeCloseTo(1, 3)
    expect(r.sfr.sfrHalpha as number).toBeCloseTo(0.467, 3)
    expect(r.sfr.sfrKe12 as number).toBeCloseTo(0.318, 3)
    expect(r.sfr.imf).toBe('salpeter')
    expect(r.sfr.flags).toEqual([])
    const ke = run(g, settingsWith({ sfrCalibration: 'kennicuttEvans12' }))
    expect(ke.sfr.sfrHalpha as number).toBeCloseTo(0.318, 3)
    expect(ke.sfr.imf).toBe('kroupa')
    const agn = run(galaxy('s2', fluxesAt(0.0, 0.9, -0.1, -0.8), 50, { redshift: 0.05 }))
    expect(agn.sfr.flags).toContain('sfr-not-star-forming')
    const noZ = run(galaxy('s3', f))
    expect(noZ.sfr.luminosityHalpha).toBeNull()
    expect(noZ.flags).toContain('luminosity-needs-redshift')
  })
  it('black-hole mass from the observed broad Hα (Greene & Ho 2005)', () => {
    const g = galaxy('bh', { halpha_broad: 500 }, 25, { redshift: 0.1, fluxUnit: 1e-16, fwhm: { halpha_broad: 3000 } })
    const r = run(g)
    const l = lineLuminosity(500e-16, luminosityDistanceMpc(0.1, 70, 0.3))
    expect(r.blackHoleMass?.luminosityBroadHalpha as number).toBeCloseTo(l, -30)
    expect((r.blackHoleMass?.massSolar as number) / blackHoleMassGreeneHo05(l, 3000)).toBeCloseTo(1, 12)
    expect(r.blackHoleMass?.log10MassError as number).toBeCloseTo((0.55 * 0.04) / Math.LN10, 12)
    const noFwhm = run(galaxy('bh2', { halpha_broad: 500 }, 25, { redshift: 0.1 }))
    expect(noFwhm.blackHoleMass).toBeNull()
    expect(noFwhm.flags).toContain('black-hole-needs-fwhm')
    const noZ = run(galaxy('bh3', { halpha_broad: 500 }, 25, { fwhm: { halpha_broad: 3000 } }))
    expect(noZ.flags).toContain('black-hole-needs-redshift')
    const lim = galaxy('bh4', {}, 25, { redshift: 0.1, fwhm: { halpha_broad: 3000 } })
    lim.lines.halpha_broad = { upperLimit: 10 }
    expect(run(lim).flags).toContain('black-hole-broad-halpha-limit')
    expect(run(galaxy('bh5', { halpha: 100 })).blackHoleMass).toBeNull()
  })
})

describe('impossible input throws a typed error naming the path', () => {
  const base = () => galaxy('bad', { halpha: 300, hbeta: 100 })
  it('names each bad field', () => {
    const cases: Array<[(g: GalaxyInput) => void, string]> = [
      [(g) => { g.lines.hbeta = { flux: 100, error: 0 } }, '/lines/hbeta/error'],
      [(g) => { g.lines.hbeta = { flux: 100, error: -3 } }, '/lines/hbeta/error'],
      [(g) => { g.lines.hbeta = { flux: Number.NaN, error: 3 } }, '/lines/hbeta/flux'],
      [(g) => { g.lines.hbeta = { flux: Infinity, error: 3 } }, '/lines/hbeta/flux'],
      [(g) => { g.lines.hbeta = { flux: -100, error: 3 } }, '/lines/hbeta/flux'],
      [(g) => { g.lines.hbeta = { upperLimit: 0 } }, '/lines/hbeta/upperLimit'],
      [(g) => { (g.lines as Record<string, unknown>).hepsilon = { flux: 1, error: 1 } }, '/lines/hepsilon'],
      [(g) => { g.fluxUnit = 0 }, '/fluxUnit'],
      [(g) => { g.redshift = Number.POSITIVE_INFINITY }, '/redshift'],
      [(g) => { g.ew = { halpha: Number.NaN } }, '/ew/halpha'],
      [(g) => { g.fwhm = { halpha_broad: -5 } }, '/fwhm/halpha_broad'],
      [(g) => { (g as { id: unknown }).id = '' }, '/id'],
    ]
    for (const [mutate, path] of cases) {
      const g = base()
      mutate(g)
      throwsAt(() => diagnoseGalaxy(g, S), path)
    }
  })
  it('prefixes the galaxy index in diagnoseMany', () => {
    const bad = base()
    bad.lines.hbeta = { flux: 80, error: -3 }
    throwsAt(() => diagnoseMany([base(), bad], S), '/1/lines/hbeta/error')
  })
  it('refuses impossible settings with ScienceSettingsError (a RangeError) naming the field', () => {
    const bad: Array<[Partial<typeof S>, string]> = [
      [{ rv: 0 }, '/settings/rv'], [{ intrinsicBalmer: Number.NaN }, '/settings/intrinsicBalmer'], [{ minSnr: 0 }, '/settings/minSnr'],
      [{ extinctionLaw: 'smc' as never }, '/settings/extinctionLaw'], [{ cosmology: { h0: 70, omegaM: 1.5 } }, '/settings/cosmology/omegaM'],
      [{ monteCarlo: { draws: 1.5, seed: 1 } }, '/settings/monteCarlo/draws'], [{ electronTemperature: -1 }, '/settings/electronTemperature'],
    ]
    for (const [over, path] of bad) {
      try {
        diagnoseGalaxy(base(), settingsWith(over))
        throw new Error('no throw')
      } catch (e) {
        expect(e).toBeInstanceOf(ScienceSettingsError)
        expect(e).toBeInstanceOf(RangeError)
        expect((e as ScienceSettingsError).path).toBe(path)
      }
    }
  })
})
