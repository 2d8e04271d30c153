import { diagnoseGalaxy, DEFAULT_SETTINGS, assertAllFinite } from './shared/science.ts'
const g = { id: 'LNS-0000001', redshift: 0.05, fluxUnit: 1e-17, lines: {
  halpha: { flux: 400, error: 4 }, hbeta: { flux: 100, error: 2 }, oiii_5007: { flux: 60, error: 2 }, oiii_4959: { flux: 20, error: 2 },
  oiii_4363: { flux: 1.2, error: 0.2 }, nii_6584: { flux: 120, error: 3 }, nii_6548: { flux: 40, error: 2 }, sii_6717: { flux: 60, error: 2 },
  sii_6731: { flux: 50, error: 2 }, oi_6300: { flux: 10, error: 1 }, oii_3726: { flux: 100, error: 3 }, oii_3729: { flux: 120, error: 3 },
  nii_5755: { flux: 1, error: 0.5 }, halpha_broad: { flux: 300, error: 20 }, hgamma: {upperLimit: 5} }, ew: { halpha: 24.5 }, fwhm: { halpha_broad: 2500 } } as any
const r = diagnoseGalaxy(g, DEFAULT_SETTINGS)
console.log(JSON.stringify(r, null, 1).slice(0, 6000))
assertAllFinite(r)
const r2 = diagnoseGalaxy(g, { ...DEFAULT_SETTINGS, monteCarlo: { draws: 500, seed: 1 } })
assertAllFinite(r2)
console.log(JSON.stringify(r2.extinction), JSON.stringify(r2.classes))
import { GalaxyResultSchema } from './shared/schemas/diagnostics-result.schema.ts'
console.log(GalaxyResultSchema.safeParse(r).success, GalaxyResultSchema.safeParse(r2).success, JSON.stringify(GalaxyResultSchema.safeParse(r2).error?.issues?.slice(0,3)))
