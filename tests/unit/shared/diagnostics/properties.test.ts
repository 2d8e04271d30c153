import { describe, expect, it } from 'vitest'
import { diagnoseGalaxy } from '../../../../shared/diagnostics/pipeline.ts'
import { reddeningVector } from '../../../../shared/diagnostics/plotting.ts'
import { extinctionK } from '../../../../shared/extinction/index.ts'
import type { ExtinctionLaw } from '../../../../shared/vocabulary/extinction-laws.ts'
import { AIR_WAVELENGTH_ANGSTROM, type LineId } from '../../../../shared/vocabulary/lines.ts'
import { createRng } from '../../../../shared/stats/rng.ts'
import { assertAllFinite } from '../../../../shared/stats/finite.ts'
import { GalaxyResultSchema } from '../../../../shared/schemas/diagnostics-result.schema.ts'
import { galaxy, settingsWith } from './helpers.ts'
import type { GalaxyInput } from '../../../../shared/diagnostics/types.ts'

const LAWS: Array<[ExtinctionLaw, number]> = [['ccm89', 3.1], ['odonnell94', 3.1], ['calzetti00', 4.05], ['fitzpatrick99', 3.1]]

/** Invented intrinsic fluxes (Hα/Hβ exactly 2.86) of a composite-like nucleus. */
function intrinsic(): Record<string, number> {
  return {
    halpha: 286, hbeta: 100, hgamma: 46.8, oiii_5007: 150, oiii_4959: 50, oiii_4363: 1.5, nii_6584: 120, nii_6548: 40,
    nii_5755: 1.6, sii_6717: 50, sii_6731: 40, oi_6300: 12, oii_3726: 150, oii_3729: 180,
  }
}

function redden(fluxes: Record<string, number>, law: ExtinctionLaw, rv: number, ebv: number): Record<string, number> {
  const out: Record<string, number> = {}
  for (const [id, f] of Object.entries(fluxes)) out[id] = f * Math.pow(10, -0.4 * extinctionK(law, AIR_WAVELENGTH_ANGSTROM[id as LineId], rv) * ebv)
  return out
}

describe('property: reddening then dereddening returns the input', () => {
  for (const [law, rv] of LAWS) {
    it(`${law}: every dereddened flux equals the intrinsic one and E(B−V) is recovered`, () => {
      // exact identity of the foreground screen (shared/science/README.md §1.2)
      const base = intrinsic()
      for (const ebv of [0.05, 0.4, 1.2]) {
        const s = settingsWith({ extinctionLaw: law, rv })
        const r = diagnoseGalaxy(galaxy('p', redden(base, law, rv, ebv), 40), s)
        expect(r.extinction.ebv as number).toBeCloseTo(ebv, 12)
        for (const [id, f] of Object.entries(base)) {
          const d = r.dereddened[id as LineId] as { flux: number }
          expect(d.flux / f, `${law} ${id} E=${ebv}`).toBeCloseTo(1, 12)
        }
      }
    })
  }
})

describe('property: adding dust moves a galaxy along the reddening vector only', () => {
  for (const [law, rv] of LAWS) {
    it(`${law}: Δ(observed ratios) = reddeningVector, dereddened quantities stay put`, () => {
      // log ratio shift −0.4 (k₁ − k₂) E(B−V) (shared/science/README.md §2.1); exact for [N II], [O I], [O III]/Hβ;
      // for the [S II] sum the mean-k vector is exact to < 5e-4 dex per magnitude (the two k differ by 0.007)
      const base = intrinsic()
      const s = settingsWith({ extinctionLaw: law, rv })
      const r0 = diagnoseGalaxy(galaxy('p0', base, 40), s)
      for (const ebv of [0.2, 0.7]) {
        const r = diagnoseGalaxy(galaxy('p1', redden(base, law, rv, ebv), 40), s)
        const v = reddeningVector(law, rv, ebv)
        expect((r.ratios.niiHa as number) - (r0.ratios.niiHa as number)).toBeCloseTo(v.nii.dx, 12)
        expect((r.ratios.oiiiHb as number) - (r0.ratios.oiiiHb as number)).toBeCloseTo(v.nii.dy, 12)
        expect((r.ratios.oiHa as number) - (r0.ratios.oiHa as number)).toBeCloseTo(v.oi.dx, 12)
        expect(Math.abs((r.ratios.siiHa as number) - (r0.ratios.siiHa as number) - v.sii.dx)).toBeLessThan(5e-4 * ebv)
        // dereddening-based quantities do not move at all
        expect(r.metallicity.n2Pp04).toEqual(r0.metallicity.n2Pp04 === null ? null : expect.closeTo(r0.metallicity.n2Pp04 as number, 10))
        // T_e: the [S II] density in its iteration uses the observed doublet (shared/science/README.md §3: 0.6% per mag) and
        // the iteration stops at |ΔT| < 0.1 K (§4), so T_e moves by well under 0.5 K
        expect(Math.abs((r.temperature.oiii?.te as number) - (r0.temperature.oiii?.te as number))).toBeLessThan(0.5)
      }
    })
  }
  it('matches the CCM89 shifts quoted in shared/science/README.md §2.1', () => {
    // shared/science/README.md §2.1 (corrected − observed): y −0.054 E, x_N −0.004 E, x_S −0.031 E, x_O +0.050 E
    const v = reddeningVector('ccm89', 3.1, 1)
    expect(-v.nii.dy).toBeCloseTo(-0.054, 3)
    expect(-v.nii.dx).toBeCloseTo(-0.004, 3)
    expect(-v.sii.dx).toBeCloseTo(-0.031, 3)
    expect(-v.oi.dx).toBeCloseTo(0.05, 3)
  })
})

describe('property: classification is invariant to the flux unit', () => {
  it('scaling every flux and error leaves ratios, classes, flags and distances unchanged', () => {
    const rng = createRng(7)
    for (let j = 0; j < 50; j++) {
      const f: Record<string, number> = {}
      for (const [id, v] of Object.entries(intrinsic())) f[id] = v * Math.pow(10, 1.2 * (rng.nextFloat() - 0.5))
      const a = diagnoseGalaxy(galaxy('u', f, 8, { redshift: 0.03, fluxUnit: 1e-17, ew: { halpha: 10 } }), settingsWith())
      const scaled: Record<string, number> = {}
      for (const [id, v] of Object.entries(f)) scaled[id] = v * 1e3
      const b = diagnoseGalaxy(galaxy('u', scaled, 8, { redshift: 0.03, fluxUnit: 1e-20, ew: { halpha: 10 } }), settingsWith())
      expect(b.classes).toEqual(a.classes)
      expect(b.flags).toEqual(a.flags)
      for (const k of Object.keys(a.ratios) as Array<keyof typeof a.ratios>) {
        if (a.ratios[k] === null) expect(b.ratios[k]).toBeNull()
        else expect(b.ratios[k] as number).toBeCloseTo(a.ratios[k] as number, 10)
      }
      expect(b.sfr.luminosityHalpha as number).toBeCloseTo(a.sfr.luminosityHalpha as number, -28)
    }
  })
})

describe('property: never NaN or Infinity, every unclassified explained, schema-valid', () => {
  it('holds for 400 random galaxies with missing lines, limits, low S/N and extreme ratios', () => {
    const rng = createRng(2026)
    const ids = Object.keys(intrinsic()).concat(['hdelta', 'halpha_broad']) as LineId[]
    for (let j = 0; j < 400; j++) {
      const g: GalaxyInput = { id: `r${j}`, lines: {}, redshift: rng.nextFloat() < 0.8 ? rng.nextFloat() * 0.5 : undefined }
      for (const id of ids) {
        const u = rng.nextFloat()
        if (u < 0.2) continue
        const flux = Math.pow(10, 4 * rng.nextFloat() - 1)
        if (u < 0.3) g.lines[id] = { upperLimit: flux }
        else g.lines[id] = { flux: (rng.nextFloat() < 0.1 ? -1 : 1) * flux, error: flux / (0.5 + 30 * rng.nextFloat()) }
      }
      if (rng.nextFloat() < 0.5) g.ew = { halpha: 20 * rng.nextFloat() - 1, nii_6584: rng.nextFloat() }
      if (rng.nextFloat() < 0.5) g.fwhm = { halpha_broad: 500 + 5000 * rng.nextFloat() }
      const s = settingsWith({ allowNegative: true, monteCarlo: { draws: j % 20 === 0 ? 50 : 0, seed: j } })
      const r = diagnoseGalaxy(g, s)
      assertAllFinite(r)
      expect(GalaxyResultSchema.safeParse(r).success).toBe(true)
      for (const d of ['nii', 'sii', 'oi', 'whan'] as const) {
        if (r.classes[d] === 'unclassified') {
          expect(r.flags.some((f) => f.endsWith(`:${d}`) || f.startsWith(`${d}-`) || f.startsWith(`whan-`)), `${g.id} ${d}`).toBe(true)
        }
      }
      if (r.classes.overall === 'unclassified') {
        expect(r.flags.some((f) => f === 'overall-needs-nii' || f === 'limit-not-decisive:nii-subtype')).toBe(true)
      }
    }
  })
})
