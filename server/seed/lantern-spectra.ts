import { createRng, type Rng } from '../../shared/stats/rng.ts'
import { syntheticSpectrum, type SyntheticLine, type SyntheticSpectrum } from '../../shared/spectra/synthetic.ts'
import type { FitLineId } from '../../shared/spectra/lines.ts'
import type { GalaxyInputDto } from '../../shared/schemas/galaxy.schema.ts'
import type { Population } from './lantern.ts'

/**
 * Invented 1-D spectra for part of the invented "Lantern Nuclei Survey" (nothing here is a real
 * observation). Each chosen nucleus gets a spectrum drawn by the seeded generator of
 * shared/spectra/synthetic.ts from its own table fluxes: narrow lines with one velocity and width,
 * a continuum set by its EW(Hα), noise set so that the Hα flux error matches the table's, and
 * — as the demo needs — broad Hα where the table has one, a second blueshifted wing component in
 * some AGN, and Na I D absorption (with He I 5876 emission) in some.
 */

/** Spectrograph of the invented survey: a linear grid of 1.25 Å per pixel, FWHM 2.8 Å (R ≈ 2,300 at Hα). */
export const LANTERN_SPECTRUM = { step: 1.25, restStart: 3680, restEnd: 6960, fwhmAngstrom: 2.8 } as const

export interface LanternSpectrum {
  galaxyId: string
  /** what the demo shows this nucleus for */
  kind: 'narrow' | 'broad-line' | 'two-component' | 'sodium'
  spectrum: SyntheticSpectrum['spectrum']
}

const FITTED: readonly FitLineId[] = [
  'hbeta', 'hgamma', 'hdelta', 'oiii_5007', 'oiii_4363', 'nii_6584', 'nii_5755', 'sii_6717', 'sii_6731', 'oi_6300', 'oii_3726', 'oii_3729', 'halpha',
]

const uniform = (rng: Rng, a: number, b: number) => a + (b - a) * rng.nextFloat()

/** The table flux of a line, or a fraction of its upper limit (a weak line is still drawn, below the noise). */
function tableFlux(g: GalaxyInputDto, id: string): number | undefined {
  const m = (g.lines as Record<string, { flux?: number; upperLimit?: number } | undefined>)[id]
  if (!m) return undefined
  return m.flux !== undefined ? Math.max(m.flux, 0) : m.upperLimit !== undefined ? 0.3 * m.upperLimit : undefined
}

function tableError(g: GalaxyInputDto, id: string): number | undefined {
  return (g.lines as Record<string, { error?: number } | undefined>)[id]?.error
}

/**
 * Spectra for `count` nuclei of the survey, chosen evenly through it, with every broad-line nucleus
 * among them; seeded, so the demo is the same on every machine.
 * @example generateLanternSpectra([], { count: 0 }).length // 0
 */
export function generateLanternSpectra(
  galaxies: ReadonlyArray<GalaxyInputDto & { population?: Population }>, opts: { count?: number; seed?: number } = {},
): LanternSpectrum[] {
  const count = Math.min(opts.count ?? 300, galaxies.length)
  if (count === 0) return []
  const rng = createRng(opts.seed ?? 20261203)
  const broad = galaxies.filter((g) => tableFlux(g, 'halpha_broad') !== undefined)
  const step = galaxies.length / count
  const chosen = new Map<string, GalaxyInputDto & { population?: Population }>()
  for (const g of broad.slice(0, Math.floor(count / 6))) chosen.set(g.id, g)
  for (let i = 0; chosen.size < count && i < galaxies.length; i++) {
    const g = galaxies[Math.floor(i * step) % galaxies.length]!
    if (!chosen.has(g.id) && tableFlux(g, 'halpha') !== undefined && (g.redshift ?? 0) > 0) chosen.set(g.id, g)
  }
  const out: LanternSpectrum[] = []
  let index = 0
  for (const g of chosen.values()) {
    const ha = tableFlux(g, 'halpha')
    if (ha === undefined || !(ha > 0)) continue
    const z = g.redshift ?? 0.05
    const agn = g.population === 'seyfert' || g.population === 'liner'
    const sigma = agn ? uniform(rng, 120, 260) : uniform(rng, 55, 130)
    const velocity = 30 * rng.nextNormal()
    const hasBroad = tableFlux(g, 'halpha_broad') !== undefined
    const twoComponent = !hasBroad && g.population === 'seyfert' && rng.nextFloat() < 0.45
    const sodium = !hasBroad && !twoComponent && rng.nextFloat() < 0.2
    const lines: SyntheticLine[] = []
    for (const id of FITTED) {
      const f = tableFlux(g, id)
      if (f === undefined || f === 0) continue
      if (twoComponent) {
        // a blueshifted, wider wing carrying a share of every narrow line (more of [O III]: an outflow)
        const share = id === 'oiii_5007' ? 0.5 : 0.35
        lines.push({ id, flux: f * (1 - share), sigma, velocity })
        lines.push({ id, flux: f * share, sigma: uniform(rng, 2.2, 3) * sigma, velocity: velocity - uniform(rng, 150, 320) })
      } else lines.push({ id, flux: f, sigma, velocity })
    }
    const broadFlux = tableFlux(g, 'halpha_broad')
    const broadFwhm = g.fwhm?.halpha_broad
    if (broadFlux !== undefined && broadFlux > 0) {
      lines.push({ id: 'halpha_broad', flux: broadFlux, sigma: (broadFwhm ?? 3000) / 2.3548, velocity: velocity + 80 * rng.nextNormal() })
    }
    if (sodium) lines.push({ id: 'hei_5876', flux: 0.11 * ha, sigma, velocity })
    // continuum from EW(Hα) (rest frame): level = F(Hα) / (EW · (1 + z)) per observed Å
    const ew = g.ew?.halpha && g.ew.halpha > 0 ? g.ew.halpha : 20
    const level = ha / (ew * (1 + z))
    // per-pixel noise that gives Hα the table's flux error: σ_F ≈ n √(2√π σ_λ Δλ) for a Gaussian line
    const sigmaLambda = Math.hypot((6562.8 * (1 + z) * sigma) / 299_792.458, LANTERN_SPECTRUM.fwhmAngstrom / 2.3548)
    const haError = tableError(g, 'halpha') ?? 0.05 * ha
    const pixel = LANTERN_SPECTRUM.step * (1 + z)
    // a two-component nucleus is a deeper exposure (half the noise): at the table's S/N of ~30 a
    // fit keeps the wing in only a few of them (BIC and detection, shared/science/README.md §13.7)
    const noise = haError / Math.sqrt(2 * Math.sqrt(Math.PI) * sigmaLambda * pixel) / (twoComponent ? 2 : 1)
    const s = syntheticSpectrum({
      seed: (opts.seed ?? 20261203) + index++, id: g.id, redshift: z,
      wavelength: { start: LANTERN_SPECTRUM.restStart * (1 + z), end: LANTERN_SPECTRUM.restEnd * (1 + z), step: pixel },
      continuum: { level, slope: uniform(rng, -0.08, 0.02) }, noise, resolution: { fwhmAngstrom: LANTERN_SPECTRUM.fwhmAngstrom }, lines,
      ...(sodium ? { nad: { logN: uniform(rng, 12.6, 13.6), b: uniform(rng, 50, 140), velocity: -uniform(rng, 0, 220) } } : {}),
    })
    // the flux densities are in the table's flux unit (the lines were drawn from its fluxes)
    const spectrum = { ...s.spectrum, fluxUnit: g.fluxUnit ?? 1e-17 }
    out.push({ galaxyId: g.id, kind: hasBroad ? 'broad-line' : twoComponent ? 'two-component' : sodium ? 'sodium' : 'narrow', spectrum })
  }
  return out
}
