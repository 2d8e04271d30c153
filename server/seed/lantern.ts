import { createRng, type Rng } from '../../shared/stats/rng.ts'
import { extinctionK } from '../../shared/extinction/index.ts'
import { AIR_WAVELENGTH_ANGSTROM, type LineId } from '../../shared/vocabulary/lines.ts'
import type { OverallClass } from '../../shared/vocabulary/classes.ts'
import { doubletRatioFromDensity, SANDERS16_OII, SANDERS16_SII } from '../../shared/diagnostics/density.ts'
import { KA03, KE01_NII, hyperbolaY } from '../../shared/diagnostics/demarcation.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'

/**
 * The invented "Lantern Nuclei Survey": a seeded synthetic sample for the demo. Nothing here is a
 * real measurement. Each population gets intrinsic log ratios in its region of the diagrams, Case B
 * Balmer lines, a random dust screen E(B−V) ∈ [0, 1] (CCM89, R_V = 3.1), then noise consistent with
 * the quoted errors; lines measured below S/N 2 are sent as 3σ upper limits.
 */
export type Population = Extract<OverallClass, 'star-forming' | 'composite' | 'seyfert' | 'liner'>

const uniform = (rng: Rng, a: number, b: number) => a + (b - a) * rng.nextFloat()
const normal = (rng: Rng, mu: number, sigma: number) => mu + sigma * rng.nextNormal()
// the demo stays left of both asymptotes, where these are finite
const ka03 = (x: number) => hyperbolaY(KA03, x)!
const ke01 = (x: number) => hyperbolaY(KE01_NII, x)!

/** Intrinsic log ratios (x_N, y, x_S, x_O) and EW(Hα) for one population member. */
function ratiosFor(pop: Population, rng: Rng) {
  switch (pop) {
    case 'star-forming': {
      // the star-forming sequence: low [N II]/Hα with high [O III]/Hβ, and [S II], [O I] following it
      const x = uniform(rng, -1.3, -0.45)
      return { x, y: Math.min(ka03(x) - Math.abs(normal(rng, 0.2, 0.1)), 0.85), xs: normal(rng, 0.8 * x - 0.15, 0.06), xo: normal(rng, x - 0.95, 0.12), ew: uniform(rng, 8, 120) }
    }
    case 'composite': {
      const x = uniform(rng, -0.38, -0.12)
      const lo = ka03(x), hi = ke01(x)
      return { x, y: lo + (hi - lo) * uniform(rng, 0.25, 0.75), xs: normal(rng, -0.5, 0.05), xo: normal(rng, -1.5, 0.1), ew: uniform(rng, 4, 25) }
    }
    case 'seyfert': {
      const x = uniform(rng, -0.1, 0.35)
      const xs = uniform(rng, -0.38, -0.08)
      const y = uniform(rng, Math.max(0.6, 1.05 * x + 0.55, 1.89 * xs + 0.86), 1.2)
      return { x, y, xs, xo: uniform(rng, -1.0, Math.min(-0.5, (y - 1.4) / 1.18)), ew: uniform(rng, 7, 40) }
    }
    case 'liner': {
      const x = uniform(rng, -0.05, 0.3)
      const y = uniform(rng, 0.0, Math.min(0.4, 1.05 * x + 0.35))
      return { x, y, xs: uniform(rng, -0.12, 0.2), xo: uniform(rng, -0.72, -0.35), ew: uniform(rng, 0.3, 5.5) }
    }
  }
}

const siiRatio = (n: number) => doubletRatioFromDensity(SANDERS16_SII, n, 1e4)
const oiiRatio = (n: number) => doubletRatioFromDensity(SANDERS16_OII, n, 1e4)

export function generateLanternSurvey(count = 2400, seed = 20261202): Array<GalaxyInputDto & { population: Population }> {
  const rng = createRng(seed)
  const out: Array<GalaxyInputDto & { population: Population }> = []
  const k = (id: string) => extinctionK('ccm89', AIR_WAVELENGTH_ANGSTROM[id as LineId], 3.1)
  for (let i = 0; i < count; i++) {
    const u = rng.nextFloat()
    const pop: Population = u < 0.55 ? 'star-forming' : u < 0.72 ? 'composite' : u < 0.86 ? 'seyfert' : 'liner'
    const r = ratiosFor(pop, rng)
    const z = uniform(rng, 0.01, 0.3)
    const ebv = Math.pow(rng.nextFloat(), 1.3) // more lightly reddened nuclei than heavily reddened ones
    const hb = Math.exp(normal(rng, Math.log(pop === 'liner' ? 250 : 600), 0.6)) * Math.pow(0.05 / z, 0.8)
    const ne = Math.exp(normal(rng, Math.log(pop === 'seyfert' ? 400 : 120), 0.8))
    const intrinsic: Record<string, number> = {
      hbeta: hb, halpha: 2.86 * hb, hgamma: 0.468 * hb, hdelta: 0.259 * hb,
      oiii_5007: hb * 10 ** r.y,
      nii_6584: 2.86 * hb * 10 ** r.x,
      oi_6300: 2.86 * hb * 10 ** r.xo,
    }
    intrinsic.oiii_4959 = intrinsic.oiii_5007 / 2.98
    intrinsic.nii_6548 = intrinsic.nii_6584 / 3.05
    const sii = 2.86 * hb * 10 ** r.xs, rs = siiRatio(ne)
    intrinsic.sii_6731 = sii / (1 + rs)
    intrinsic.sii_6717 = sii - intrinsic.sii_6731
    const oii = hb * (pop === 'star-forming' ? uniform(rng, 1.5, 4) : uniform(rng, 2.5, 6)), ro = oiiRatio(ne)
    intrinsic.oii_3726 = oii / (1 + ro)
    intrinsic.oii_3729 = oii - intrinsic.oii_3726
    if (rng.nextFloat() < 0.25) intrinsic.oiii_4363 = (intrinsic.oiii_5007 + intrinsic.oiii_4959) / uniform(rng, 60, 250)
    if (rng.nextFloat() < 0.1) intrinsic.nii_5755 = (intrinsic.nii_6584 + intrinsic.nii_6548) / uniform(rng, 50, 150)
    const fwhm: Record<string, number> = {}
    if (pop === 'seyfert' && rng.nextFloat() < 0.2) {
      intrinsic.halpha_broad = 2.86 * hb * uniform(rng, 0.5, 3)
      fwhm.halpha_broad = uniform(rng, 1800, 5500)
    }
    const lines: GalaxyInputDto['lines'] = {}
    const noiseFloor = uniform(rng, 1.5, 4)
    for (const [id, f0] of Object.entries(intrinsic)) {
      const observed = id === 'halpha_broad' ? f0 : f0 * 10 ** (-0.4 * k(id) * ebv)
      const error = Math.hypot(noiseFloor, 0.03 * observed)
      const measured = observed + error * rng.nextNormal()
      ;(lines as Record<string, unknown>)[id] = measured / error < 2
        ? { upperLimit: round(3 * error) }
        : { flux: round(measured), error: round(error) }
    }
    const ewHa = r.ew * Math.exp(normal(rng, 0, 0.1))
    out.push({
      id: `LNS-${String(1000 + i * 7).padStart(7, '0')}`,
      redshift: Number(z.toFixed(5)),
      fluxUnit: 1e-17,
      ra: Number(uniform(rng, 120, 240).toFixed(5)),
      dec: Number(uniform(rng, -5, 60).toFixed(5)),
      lines,
      ew: { halpha: Number(ewHa.toFixed(2)), nii_6584: Number((ewHa * 10 ** r.x).toFixed(2)) },
      ...(Object.keys(fwhm).length ? { fwhm } : {}),
      population: pop,
    })
  }
  return out
}

const round = (v: number) => Number(v.toPrecision(5))
